/**
 * "Fix everything": apply the preferred fix of each finding, re-check, and repeat while the file
 * gets better. Fixes interact (widening a mirror changes its ratio error), so every round is
 * re-checked from the text, never trusted from the previous round's numbers.
 *
 * Progress is measured as (errors, warnings), compared in that order: a round is kept only if it
 * removes an error, or removes a warning without adding an error. Info findings are suggestions
 * and are never applied. At most MAX_ROUNDS rounds.
 */
import type { Finding, Fix, Severity, TextEdit } from '../types';
import { mirrorIndexOfPath } from '../mirror-at';
import { applyEdits } from '../text/edits';

export const MAX_ROUNDS = 8;

export interface FixAllResult {
  text: string;
  rounds: number;
  applied: { code: string; title: string }[];
  remaining: Finding[];
  /** The spec has mirrors with errors (FileReport.withheld): no fix is offered until they are fixed. */
  withheld?: boolean;
}

interface Candidate { code: string; fix: Fix; severity: Severity; group: string }

/**
 * @param file the file name, passed through for the caller's `check` (kept in the signature so a
 *   front end can bind one `check` for many files)
 * @param check analyses a text and returns its findings (with fixes), e.g. `analyzeText(t, file)`
 */
export function fixAll(text: string, file: string, check: (text: string) => { findings: Finding[]; withheld?: readonly unknown[] }): FixAllResult {
  void file;
  let current = text;
  const first = safeCheck(check, current);
  let findings = first?.findings ?? [];
  let rounds = 0;
  const applied: { code: string; title: string }[] = [];

  while (rounds < MAX_ROUNDS) {
    const candidates = preferredFixes(findings);
    if (candidates.length === 0) break;
    rounds++;
    const before = score(findings);
    let accepted = false;
    // First the whole compatible set at once (the usual case: independent findings) …
    const batch = compatibleSet(candidates);
    const tried = tryCandidates(current, batch, check);
    if (tried && better(score(tried.findings), before)) {
      current = tried.text;
      findings = tried.findings;
      applied.push(...batch.map((c) => ({ code: c.code, title: c.fix.title })));
      accepted = true;
    } else {
      // … else one fix at a time, errors first, keeping the first that helps.
      for (const c of candidates) {
        const one = tryCandidates(current, [c], check);
        if (one && better(score(one.findings), before)) {
          current = one.text;
          findings = one.findings;
          applied.push({ code: c.code, title: c.fix.title });
          accepted = true;
          break;
        }
      }
    }
    if (!accepted) break;
  }
  const result: FixAllResult = { text: current, rounds, applied, remaining: findings };
  if (applied.length === 0 && (first?.withheld?.length ?? 0) > 0) result.withheld = true;
  return result;
}

function safeCheck(check: (text: string) => { findings: Finding[]; withheld?: readonly unknown[] }, text: string): { findings: Finding[]; withheld?: readonly unknown[] } | undefined {
  try {
    return check(text);
  } catch {
    return undefined;
  }
}

/** Preferred fixes of error and warning findings, errors first, in reading order. */
function preferredFixes(findings: Finding[]): Candidate[] {
  const out: Candidate[] = [];
  for (const severity of ['error', 'warning'] as const) {
    for (const f of findings) {
      if (f.severity !== severity) continue;
      const fix = f.fixes?.find((x) => x.preferred);
      if (fix && fix.edits.length > 0) out.push({ code: f.code, fix, severity, group: groupOf(f) });
    }
  }
  return out;
}

function tryCandidates(text: string, cs: Candidate[], check: (text: string) => { findings: Finding[] }): { text: string; findings: Finding[] } | undefined {
  const edits = mergeEdits(cs.flatMap((c) => c.fix.edits));
  if (!edits) return undefined;
  let next: string;
  try {
    next = applyEdits(text, edits);
  } catch {
    return undefined;
  }
  const checked = safeCheck(check, next);
  return checked ? { text: next, findings: checked.findings } : undefined;
}

/** Fixes of one mirror interact (widening changes the ratio): one per mirror and round. */
function groupOf(f: Finding): string {
  const index = mirrorIndexOfPath(f.path);
  return index !== undefined ? `mirrors/${index}` : f.path.join('/');
}

/** Greedy: keep each candidate whose edits do not clash with those already kept, one per mirror. */
function compatibleSet(cs: Candidate[]): Candidate[] {
  const kept: Candidate[] = [];
  const groups = new Set<string>();
  let edits: TextEdit[] = [];
  for (const c of cs) {
    if (groups.has(c.group) && !kept.some((k) => sameFix(k.fix, c.fix))) continue;
    const merged = mergeEdits([...edits, ...c.fix.edits]);
    if (merged) {
      kept.push(c);
      groups.add(c.group);
      edits = merged;
    }
  }
  return kept;
}

function sameFix(a: Fix, b: Fix): boolean {
  return a.edits.length === b.edits.length && a.edits.every((e, i) => sameEdit(e, b.edits[i]));
}

/** Drop duplicate edits (two findings, one fix); undefined when two different edits overlap. */
export function mergeEdits(edits: TextEdit[]): TextEdit[] | undefined {
  const unique: TextEdit[] = [];
  for (const e of edits) {
    if (!unique.some((u) => sameEdit(u, e))) unique.push(e);
  }
  const sorted = [...unique].sort((a, b) => cmp(a.range.start, b.range.start) || cmp(a.range.end, b.range.end));
  for (let i = 1; i < sorted.length; i++) {
    const prev = sorted[i - 1];
    const cur = sorted[i];
    // Overlap, or two different insertions at one point (their order would be a guess).
    if (cmp(cur.range.start, prev.range.end) < 0) return undefined;
    if (cmp(cur.range.start, prev.range.start) === 0 && (isEmpty(cur) || isEmpty(prev))) return undefined;
  }
  return sorted;
}

function sameEdit(a: TextEdit, b: TextEdit): boolean {
  return cmp(a.range.start, b.range.start) === 0 && cmp(a.range.end, b.range.end) === 0 && a.newText === b.newText;
}

function isEmpty(e: TextEdit): boolean {
  return cmp(e.range.start, e.range.end) === 0;
}

function cmp(a: { line: number; character: number }, b: { line: number; character: number }): number {
  return a.line - b.line || a.character - b.character;
}

function score(findings: Finding[]): [number, number] {
  let errors = 0;
  let warnings = 0;
  for (const f of findings) {
    if (f.severity === 'error') errors++;
    else if (f.severity === 'warning') warnings++;
  }
  return [errors, warnings];
}

function better(a: [number, number], b: [number, number]): boolean {
  return a[0] < b[0] || (a[0] === b[0] && a[1] < b[1]);
}
