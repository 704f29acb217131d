/**
 * What must hold for any text given to `analyzeText` (design: "bad input always yields a clear
 * finding at the right line/column — never a crash or hang"):
 *  - it returns (no exception) and reports no `internal-error` (a caught defect is still a defect);
 *  - it answers within a time bound (checked by the caller, after warm-up);
 *  - every range it hands out — findings, related locations, fix edits, anchors — lies inside
 *    the document, in the Language Server Protocol's terms: line < line count, character ≤ the
 *    line's length (lines split at \r\n, \n and \r, as LSP and YAML both do);
 *  - the fixes' edits do not overlap and apply;
 *  - the report survives JSON (what the CLI and the extension's worker send).
 * Used by test/fuzz/*.test.ts and scripts/fuzz.ts.
 */
import type { FileReport, Range } from '../../src/core/types';
import { analyzeText } from '../../src/core/analyze';
import { applyEdits } from '../../src/core/text/edits';

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

export interface Checked {
  problems: string[];
  ms: number;
  report?: FileReport;
}

/** Analyse one text and list what is wrong; `ms` is the wall time of the call. */
export function checkText(text: string, file: string): Checked {
  const t0 = performance.now();
  let report: FileReport;
  try {
    report = analyzeText(text, file);
  } catch (e) {
    return { problems: [`analyzeText threw: ${(e as Error)?.stack ?? String(e)}`], ms: performance.now() - t0 };
  }
  const ms = performance.now() - t0;
  return { problems: reportProblems(text, report), ms, report };
}
