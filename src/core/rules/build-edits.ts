/** Replacements on the original text plus key insertions, composed into edits on the original. */
import type { SpecPath, TextEdit } from '../types';
import { parseSpec, type ParsedSpec } from '../spec/index';
import { insertKeyEdits } from '../spec/edit';
import { EditLog } from './compose';

export interface KeyInsert { parent: SpecPath; key: string; text: string }

export function buildEdits(parsed: ParsedSpec, replacements: TextEdit[], inserts: KeyInsert[], file?: string): TextEdit[] | undefined {
  const log = new EditLog(parsed.text);
  log.apply(replacements);
  let current: ParsedSpec = parsed;
  for (let i = 0; i < inserts.length; i++) {
    // Re-parse after each step so an insertion sees the mapping the previous one created.
    if (i > 0 || replacements.length > 0) current = parseSpec(log.text, file);
    const ins = inserts[i];
    const edits = insertKeyEdits(current, ins.parent, ins.key, ins.text);
    if (edits.length === 0) return undefined;
    log.apply(edits);
  }
  const edits = log.edits();
  return edits.length > 0 ? edits : undefined;
}
