/**
 * What must hold for any text given to `analyzeText` (design: "bad input always yields a clear
 * finding at the right line/column — never a crash or hang"):
 *  - it returns (no exception) and reports no `internal-error` (a caught defect is still a defect);
 *  - its work is bounded by the input's size (src/core/work.ts, counted, never timed): did-you-mean
 *    edit distances at most WORK_PER_CHAR.distances per character (plus a fixed list's worth),
 *    characters re-read to check did-you-mean fixes at most MAX_SUGGESTION_CHECKS times the text;
 *    `npm run fuzz` also holds each case to a 200 ms wall-clock bound;
 *  - every range it hands out — findings, related locations, fix edits, anchors — lies inside
 *    the document, in the Language Server Protocol's terms: line < line count, character ≤ the
 *    line's length (lines split at \r\n, \n and \r, as LSP and YAML both do);
 *  - the fixes' edits do not overlap and apply;
 *  - the report survives JSON (what the CLI and the extension's worker send).
 * Used by test/fuzz/*.test.ts and scripts/fuzz.ts.
 */
import type { FileReport, Range } from '../../src/core/types';
import { analyzeText } from '../../src/core/analyze';
import { MAX_SUGGESTION_CHECKS } from '../../src/core/spec/suggestion-fixes';
import { applyEdits } from '../../src/core/text/edits';
import { WORK } from '../../src/core/work';

/** Line lengths of a text, with LSP's line breaks. */
export function lineLengths(text: string): number[] {
  return text.split(/\r\n|\r|\n/).map((l) => l.length);
}

function rangeProblem(r: Range | undefined, lines: number[], what: string): string | undefined {
  if (!r || !r.start || !r.end) return `${what}: no range`;
  for (const [p, side] of [[r.start, 'start'], [r.end, 'end']] as const) {
    if (!Number.isInteger(p.line) || !Number.isInteger(p.character) || p.line < 0 || p.character < 0) return `${what}: ${side} ${JSON.stringify(p)} is not a position`;
    if (p.line >= lines.length) return `${what}: ${side} line ${p.line} ≥ line count ${lines.length}`;
    if (p.character > lines[p.line]) return `${what}: ${side} ${p.line}:${p.character} past the line's ${lines[p.line]} characters`;
  }
  if (r.start.line > r.end.line || (r.start.line === r.end.line && r.start.character > r.end.character)) return `${what}: start after end`;
  return undefined;
}

/** Everything wrong with one report of `text` (empty when all holds). */
export function reportProblems(text: string, report: FileReport): string[] {
  const out: string[] = [];
  const lines = lineLengths(text);
  for (const f of report.findings) {
    if (f.code === 'internal-error') out.push(`internal-error: ${f.message}`);
    if (!f.message || typeof f.message !== 'string') out.push(`${f.code}: empty message`);
    const p = rangeProblem(f.range, lines, `finding ${f.code}`);
    if (p) out.push(p);
    for (const rel of f.related ?? []) {
      const q = rangeProblem(rel.range, lines, `related of ${f.code}`);
      if (q) out.push(q);
    }
    for (const fix of f.fixes ?? []) {
      for (const e of fix.edits) {
        const q = rangeProblem(e.range, lines, `fix edit of ${f.code}`);
        if (q) out.push(q);
      }
      try {
        applyEdits(text, fix.edits);
      } catch (e) {
        out.push(`fix of ${f.code} does not apply: ${(e as Error).message}`);
      }
    }
  }
  for (const a of report.anchors) {
    const q = rangeProblem(a.range, lines, `anchor ${a.kind}`);
    if (q) out.push(q);
  }
  try {
    const back = JSON.parse(JSON.stringify(report)) as FileReport;
    if (back.findings.length !== report.findings.length) out.push('the report changes through JSON');
  } catch (e) {
    out.push(`the report does not survive JSON: ${(e as Error).message}`);
  }
  return out;
}

/**
 * The work bounds, per character of input. A name's did-you-mean is searched once, on the first
 * read, among at most 500 candidates of about its length (spec/suggest.ts), and the re-reads that
 * check the fixes search none: the generated inputs stay near one distance per character (the
 * 990-param file with 50 unknown names: 0.3); four leaves room for denser files and fails at once
 * if every check searches again (that file: 5.5). A check re-reads at most the whole text, one
 * mirror's lines where that is exact (spec/suggestion-fixes.ts).
 */
export const WORK_PER_CHAR = { distances: 4, rereadChars: MAX_SUGGESTION_CHECKS } as const;
/** Distances a short text may take whatever its size: one search over the schema's keys. */
const FIXED_DISTANCES = 50;

export type Work = { -readonly [K in keyof typeof WORK]: number };

/** The work bounds that `work`, done on `text`, breaks (empty when it holds them). */
export function workProblems(text: string, work: Work): string[] {
  const out: string[] = [];
  const n = text.length;
  if (work.distances > WORK_PER_CHAR.distances * n + FIXED_DISTANCES) {
    out.push(`${work.distances} edit distances for ${n} characters (bound ${WORK_PER_CHAR.distances} per character + ${FIXED_DISTANCES})`);
  }
  if (work.rereadChars > WORK_PER_CHAR.rereadChars * n) {
    out.push(`${work.rereadChars} characters re-read for ${n} characters (bound ${WORK_PER_CHAR.rereadChars} per character)`);
  }
  return out;
}

export interface Checked {
  problems: string[];
  /** Wall time of the call: a figure to print (and `npm run fuzz`'s bound), never a test's assertion. */
  ms: number;
  /** The counted work of the call (src/core/work.ts). */
  work: Work;
  report?: FileReport;
}

/** Analyse one text and list what is wrong, the work bounds included. */
export function checkText(text: string, file: string): Checked {
  const before = { ...WORK };
  const done = (): Work => Object.fromEntries(Object.entries(WORK).map(([k, v]) => [k, v - before[k as keyof Work]])) as Work;
  const t0 = performance.now();
  let report: FileReport;
  try {
    report = analyzeText(text, file);
  } catch (e) {
    return { problems: [`analyzeText threw: ${(e as Error)?.stack ?? String(e)}`], ms: performance.now() - t0, work: done() };
  }
  const ms = performance.now() - t0;
  const work = done();
  return { problems: [...reportProblems(text, report), ...workProblems(text, work)], ms, work, report };
}
