/** "Did you mean" by edit distance (optimal string alignment: insert, delete, substitute, swap). */
import { WORK } from '../work';

/** Rows of the distance table, kept between calls: a search compares hundreds of short names. */
let rows = [new Int32Array(16), new Int32Array(16), new Int32Array(16)];

/**
 * The distance between a and b when it is at most `max`; otherwise some number above `max`.
 * A search only asks whether a candidate is within reach and closer than the best so far, so the
 * table stops as soon as no alignment can end within `max` (each row's minimum, with the row
 * before it for a swap, bounds every later row).
 */
function editDistance(a: string, b: string, max = Infinity): number {
  const m = a.length;
  const n = b.length;
  if (Math.abs(m - n) > max) return Math.abs(m - n);
  WORK.distances++;
  if (rows[0].length <= n) rows = [new Int32Array(n + 1), new Int32Array(n + 1), new Int32Array(n + 1)];
  let [prev2, prev, cur] = rows;
  for (let j = 0; j <= n; j++) prev[j] = j;
  let prevMin = 0;
  for (let i = 1; i <= m; i++) {
    cur[0] = i;
    let rowMin = i;
    for (let j = 1; j <= n; j++) {
      const cost = a[i - 1] === b[j - 1] ? 0 : 1;
      let d = Math.min(prev[j] + 1, cur[j - 1] + 1, prev[j - 1] + cost);
      if (i > 1 && j > 1 && a[i - 1] === b[j - 2] && a[i - 2] === b[j - 1]) d = Math.min(d, prev2[j - 2] + 1);
      cur[j] = d;
      if (d < rowMin) rowMin = d;
    }
    if (rowMin > max && prevMin >= max) return max + 1;
    prevMin = rowMin;
    [prev2, prev, cur] = [prev, cur, prev2];
  }
  return prev[n];
}

/** Candidates compared at most: a spec of 40 000 params must not cost 40 000 comparisons for each
 *  unknown name (a designer's spec has tens). */
const MAX_SUGGEST_CANDIDATES = 500;

/** The closest candidate within a length-dependent distance, or undefined. */
function closest(word: string, candidates: Iterable<string>): string | undefined {
  const w = word.toLowerCase();
  const limit = w.length <= 3 ? 1 : w.length <= 6 ? 2 : 3;
  let best: string | undefined;
  let bestD = Infinity;
  let seen = 0;
  for (const c of candidates) {
    if (++seen > MAX_SUGGEST_CANDIDATES) break;
    if (Math.abs(c.length - w.length) > limit) continue;  // the distance is at least that
    // Only a distance within the limit, below the best so far and shorter than the word counts.
    const d = editDistance(w, c.toLowerCase(), Math.min(limit, bestD - 1, w.length - 1));
    if (d < bestD && d <= limit && d < w.length) {
      best = c;
      bestD = d;
      if (d === 0) break;  // nothing comes closer
    }
  }
  return best;
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
