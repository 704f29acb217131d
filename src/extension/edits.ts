/**
 * Which edits a "fix all" applies from one report (the one minimal edit that turns a text into
 * another is the core's `minimalEdit`, text/edits.ts). Pure: no `vscode`.
 */
import type { Finding, TextEdit } from '../core/types';
import { mergeEdits } from '../core/rules/fix-all';

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
