/** Replacements on the original text plus key insertions, composed into edits on the original. */
import { parseDocument } from 'yaml';
import type { SpecPath, TextEdit } from '../types';
import type { ParsedSpec } from '../spec/index';
import { YAML_OPTIONS } from '../spec/document';
import { insertKeyEdits, insertStyle, type InsertStyle } from '../spec/edit';
import type { MirrorFragments } from '../spec/fragment';
import { LineIndex, linesDown } from '../text/lines';
import { YamlSourceMap } from '../spec/source-map';
import { EditLog } from '../text/edits';

export interface KeyInsert { parent: SpecPath; key: string; text: string }

/**
 * `frags`: insert into a mirror by re-reading that mirror's lines alone (spec/fragment.ts) rather
 * than the whole text after each step; the same edits, without a whole-file parse per step.
 */
export function buildEdits(parsed: ParsedSpec, replacements: TextEdit[], inserts: KeyInsert[], _file?: string, frags?: MirrorFragments): TextEdit[] | undefined {
  const log = new EditLog(parsed.text);
  log.apply(replacements);
  for (let i = 0; i < inserts.length; i++) {
    const ins = inserts[i];
    // The first insertion with nothing before it reads the original; later ones read the text
    // so far, so an insertion sees the mapping the previous one created.
    let edits: TextEdit[] | undefined;
    if (i === 0 && replacements.length === 0) edits = insertKeyEdits(parsed, ins.parent, ins.key, ins.text);
    else edits = (frags && insertLocally(frags, parsed, log, ins)) ?? insertKeyEdits(reread(log.text, parsed.json), ins.parent, ins.key, ins.text);
    if (edits.length === 0) return undefined;
    log.apply(edits);
  }
  const edits = log.edits();
  return edits.length > 0 ? edits : undefined;
}

/** The insertion computed on the mirror's own lines of the text so far, moved to full-text lines; undefined when that cannot be done exactly. */
function insertLocally(frags: MirrorFragments, parsed: ParsedSpec, log: EditLog, ins: KeyInsert): TextEdit[] | undefined {
  const [root, index] = ins.parent;
  if (root !== 'mirrors' || typeof index !== 'number') return undefined;
  // The log's edits on the original make its text: the item is read from them alone.
  const frag = frags.readEdits(index, log.edits());
  const style = styleOf(parsed);
  if (!frag || !style) return undefined;
  return insertKeyEdits(frag.parsed, ins.parent.slice(2), ins.key, ins.text, style).map((e) => ({ newText: e.newText, range: linesDown(e.range, frag.line) }));
}

const styles = new WeakMap<ParsedSpec, InsertStyle | undefined>();

/** The whole original document's insert style, once per parse. */
function styleOf(parsed: ParsedSpec): InsertStyle | undefined {
  if (!styles.has(parsed)) styles.set(parsed, insertStyle(parsed));
  return styles.get(parsed);
}

/** The YAML tree of an edited text (all an insertion needs: no schema, no elaboration). */
function reread(text: string, json: boolean | undefined): ParsedSpec {
  const doc = parseDocument(text, YAML_OPTIONS);
  return { text, parsed: doc.errors.length === 0, findings: [], source: new YamlSourceMap(doc, LineIndex.of(text)), json };
}
