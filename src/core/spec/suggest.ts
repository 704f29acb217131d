/** "Did you mean" by edit distance (optimal string alignment: insert, delete, substitute, swap). */

export function editDistance(a: string, b: string): number {
  const m = a.length;
  const n = b.length;
  if (Math.abs(m - n) > 8) return Math.abs(m - n);
  let prev2 = new Array<number>(n + 1).fill(0);
  let prev = Array.from({ length: n + 1 }, (_, j) => j);
  for (let i = 1; i <= m; i++) {
    const cur = new Array<number>(n + 1);
    cur[0] = i;
    for (let j = 1; j <= n; j++) {
      const cost = a[i - 1] === b[j - 1] ? 0 : 1;
      let d = Math.min(prev[j] + 1, cur[j - 1] + 1, prev[j - 1] + cost);
      if (i > 1 && j > 1 && a[i - 1] === b[j - 2] && a[i - 2] === b[j - 1]) d = Math.min(d, prev2[j - 2] + 1);
      cur[j] = d;
    }
    prev2 = prev;
    prev = cur;
  }
  return prev[n];
}

/** Candidates compared at most: a spec of 40 000 params must not cost 40 000 comparisons for each
 *  unknown name (a designer's spec has tens). */
export const MAX_SUGGEST_CANDIDATES = 500;

/** The closest candidate within a length-dependent distance, or undefined. */
export function closest(word: string, candidates: Iterable<string>): string | undefined {
  const w = word.toLowerCase();
  const limit = w.length <= 3 ? 1 : w.length <= 6 ? 2 : 3;
  let best: string | undefined;
  let bestD = Infinity;
  let seen = 0;
  for (const c of candidates) {
    if (++seen > MAX_SUGGEST_CANDIDATES) break;
    if (Math.abs(c.length - w.length) > limit) continue;  // the distance is at least that
    const d = editDistance(w, c.toLowerCase());
    if (d < bestD && d <= limit && d < w.length) {
      best = c;
      bestD = d;
    }
  }
  return best;
}

/** " — did you mean `x`?" or "". */
export function didYouMean(word: string, candidates: Iterable<string>): string {
  return askIf(suggestion(word, candidates));
}

/** The words of a suggestion already found ("; did you mean `x`?"), or "" without one. */
export function askIf(word: string | undefined): string {
  return word !== undefined ? `; did you mean \`${word}\`?` : '';
}

/** The word a did-you-mean proposes (never the word itself), or undefined. */
export function suggestion(word: string, candidates: Iterable<string>): string | undefined {
  const c = closest(word, candidates);
  return c !== undefined && c !== word ? c : undefined;
}
