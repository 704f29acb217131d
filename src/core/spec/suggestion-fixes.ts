/**
 * Quick fixes for did-you-means (`requre` → `require`, `kind: cascde` → `cascode`, `10uA` in a
 * length → `10u`, `1mv` → `1mV`): the suggested word replaces only its token, and the fix is
 * offered only when the edited text, read again, no longer has the finding and the edit made no
 * error of its own: none at the edited key or value, no duplicate key. Errors elsewhere that the
 * typo hid (the roles of a kind that could not be read) are the designer's, not the fix's.
 * A suggestion is a guess at intent, so the fix is never preferred: fix-all does not
 * apply it, the designer does.
 *
 * The edited text is read again as a whole-file read would read it, at a mirror's cost where
 * that is exact: a suggestion inside one mirror of a plain spec re-reads that mirror's lines
 * alone (spec/fragment.ts) and validates and elaborates the data with that mirror replaced —
 * the same checks on the same data, without parsing the rest of the file again. Only which
 * findings remain is asked, so the re-read searches no did-you-mean of its own.
 */
import type { Finding, SpecPath, TextEdit } from '../types';
import { parseSpec, type ParsedSpec } from './index';
import { refusal } from './document';
import { elaborate } from './elaborate';
import { FindingSink } from './findings';
import { MirrorFragments } from './fragment';
import { isRecord } from './params';
import { validateSchema } from './schema';
import { YamlSourceMap } from './source-map';
import { LineIndex } from '../text/lines';
import { applyEdits } from '../text/edits';
import { WORK } from '../work';

/** Re-reads per file (a whole-file one parses the whole text; a hostile file may hold hundreds of typos)… */
export const MAX_SUGGESTION_CHECKS = 20;
/** …and characters re-read in all, so a large file gets fewer (a 512 KiB file: two). */
const MAX_SUGGESTION_CHARS = 1_048_576;

/** What a re-read tells a suggestion's check. */
interface Reread { parsed: boolean; findings: Finding[] }

/**
 * `parsed.findings` with a verified fix on each finding whose suggestion holds. `reread`
 * 'whole-file' reads every edited text whole (the plain definition, which the local re-read must
 * match: test/fuzz/suggestion-local.test.ts).
 */
export function withSuggestionFixes(parsed: ParsedSpec, file?: string, reread: 'local' | 'whole-file' = 'local'): Finding[] {
  const list = parsed.suggestions;
  if (!list || list.length === 0) return parsed.findings;
  const fixes = new Map<Finding, TextEdit>();
  const before = new Set(parsed.findings.filter((f) => f.severity === 'error').map((f) => `${f.code}@${JSON.stringify(f.path)}`));
  const checks = Math.min(MAX_SUGGESTION_CHECKS, Math.floor(MAX_SUGGESTION_CHARS / Math.max(1, parsed.text.length)));
  const frags = reread === 'local' ? MirrorFragments.of(parsed) : undefined;
  for (const s of list.slice(0, checks)) {
    try {
      const token = parsed.source.text(s.range);
      const q = token[0];
      const quoted = token.length >= 2 && (q === '"' || q === "'") && token[token.length - 1] === q;
      const edit: TextEdit = { range: s.range, newText: quoted ? `${q}${s.word}${q}` : s.word };
      const at = s.finding.path;
      const after = readEdited(parsed, applyEdits(parsed.text, [edit]), edit, at, frags, file);
      const same = JSON.stringify(at);
      if (!after.parsed || after.findings.some((f) => f.code === s.finding.code && JSON.stringify(f.path) === same)) continue;
      const made = after.findings.some((f) => f.severity === 'error' && !before.has(`${f.code}@${JSON.stringify(f.path)}`) &&
        (f.code === 'duplicate-key' || (f.path.length >= at.length && at.every((p, i) => f.path[i] === p))));
      if (made) continue;
      fixes.set(s.finding, edit);
    } catch {
      // A suggestion that cannot be checked is not offered.
    }
  }
  if (fixes.size === 0) return parsed.findings;
  return parsed.findings.map((f) => {
    const edit = fixes.get(f);
    if (!edit) return f;
    const token = parsed.source.text(edit.range).trim();
    return { ...f, fixes: [{ title: `Change \`${token}\` to \`${edit.newText.trim()}\``, edits: [edit] }] };
  });
}

/**
 * The findings of `text` (the original with `edit` applied): the edited mirror's lines read alone
 * when the edit lies inside mirror `path[1]` and the item reads alone exactly, else the whole text.
 * Findings' ranges are the original text's (only codes and paths are compared).
 */
function readEdited(parsed: ParsedSpec, text: string, edit: TextEdit, path: SpecPath, frags: MirrorFragments | undefined, file?: string): Reread {
  const i = path[0] === 'mirrors' && typeof path[1] === 'number' ? path[1] : undefined;
  const data = parsed.data;
  const base = parsed.source;
  if (frags && i !== undefined && isRecord(data) && Array.isArray(data.mirrors) && base instanceof YamlSourceMap &&
    frags.holds(i, [edit]) && !refusal(text, new LineIndex(text))) {
    const frag = frags.read(text, i);
    if (frag) {
      WORK.rereadChars += frag.end - frag.start;
      const sink = new FindingSink(base, undefined, false);
      const edited = { ...data, mirrors: data.mirrors.map((m: unknown, k: number) => (k === i ? frag.data : m)) };
      validateSchema(edited, sink);
      elaborate(edited, sink, undefined, parsed.tables);
      return { parsed: true, findings: sink.list };
    }
  }
  WORK.rereadChars += text.length;
  return parseSpec(text, file, { ...(parsed.tables ? { tables: parsed.tables } : {}), words: false });
}
