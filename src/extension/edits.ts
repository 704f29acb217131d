/**
 * Text-edit plumbing for quick fixes: which edits a "fix all" applies from one report, and the
 * one minimal edit that turns a text into another (for the core's verified multi-round fix-all).
 * Pure: no `vscode`.
 */
import type { Finding, Position, TextEdit } from '../core/types';
import { mergeEdits } from '../core/rules/fix-all';

/** LSP position of a UTF-16 offset. */
export function positionAt(text: string, offset: number): Position {
  let line = 0;
  let start = 0;
  for (;;) {
    const nl = text.indexOf('\n', start);
    if (nl < 0 || nl >= offset) break;
    line++;
    start = nl + 1;
  }
  return { line, character: offset - start };
}

/** One edit replacing the differing middle of `before` by that of `after`; undefined if equal.
 *  Everything outside the changed span (comments, formatting, the cursor) stays put. */
export function minimalEdit(before: string, after: string): TextEdit | undefined {
  if (before === after) return undefined;
  let head = 0;
  const max = Math.min(before.length, after.length);
  while (head < max && before.charCodeAt(head) === after.charCodeAt(head)) head++;
  // Do not split a surrogate pair.
  if (head > 0 && isHighSurrogate(before.charCodeAt(head - 1))) head--;
  let tail = 0;
  while (tail < max - head && before.charCodeAt(before.length - 1 - tail) === after.charCodeAt(after.length - 1 - tail)) tail++;
  if (tail > 0 && isLowSurrogate(before.charCodeAt(before.length - tail))) tail--;
  return {
    range: { start: positionAt(before, head), end: positionAt(before, before.length - tail) },
    newText: after.slice(head, after.length - tail),
  };
}

function isHighSurrogate(c: number): boolean { return c >= 0xd800 && c <= 0xdbff; }
function isLowSurrogate(c: number): boolean { return c >= 0xdc00 && c <= 0xdfff; }

/**
 * The preferred fix of every error and warning finding, as one set of non-overlapping edits
 * (reading order; a fix that clashes with an earlier one is left for the next round).
 */
export function preferredEdits(findings: Finding[]): { edits: TextEdit[]; count: number } {
  let edits: TextEdit[] = [];
  let count = 0;
  for (const f of findings) {
    if (f.severity === 'info') continue;
    const fix = f.fixes?.find((x) => x.preferred);
    if (!fix || fix.edits.length === 0) continue;
    const merged = mergeEdits([...edits, ...fix.edits]);
    if (!merged) continue;
    edits = merged;
    count++;
  }
  return { edits, count };
}
