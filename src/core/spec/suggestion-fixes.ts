/**
 * Quick fixes for did-you-means (`requre` → `require`, `kind: cascde` → `cascode`, `10uA` in a
 * length → `10u`, `1mv` → `1mV`): the suggested word replaces only its token, and the fix is
 * offered only when the edited text, read again, no longer has the finding and the edit made no
 * error of its own: none at the edited key or value, no duplicate key. Errors elsewhere that the
 * typo hid (the roles of a kind that could not be read) are the designer's, not the fix's.
 * A suggestion is a guess at intent, so the fix is never preferred: fix-all does not
 * apply it, the designer does.
 */
import type { Finding, TextEdit } from '../types';
import { parseSpec, type ParsedSpec } from './index';
import { applyEdits } from '../text/edits';

/** Re-reads per file (each parses the whole text; a hostile file may hold hundreds of typos)… */
const MAX_SUGGESTION_CHECKS = 20;
/** …and characters re-read in all, so a large file gets fewer (a 512 KiB file: two). */
const MAX_SUGGESTION_CHARS = 1_048_576;

/** `parsed.findings` with a verified fix on each finding whose suggestion holds. */
export function withSuggestionFixes(parsed: ParsedSpec, file?: string): Finding[] {
  const list = parsed.suggestions;
  if (!list || list.length === 0) return parsed.findings;
  const fixes = new Map<Finding, TextEdit>();
  const before = new Set(parsed.findings.filter((f) => f.severity === 'error').map((f) => `${f.code}@${JSON.stringify(f.path)}`));
  const checks = Math.min(MAX_SUGGESTION_CHECKS, Math.floor(MAX_SUGGESTION_CHARS / Math.max(1, parsed.text.length)));
  for (const s of list.slice(0, checks)) {
    try {
      const token = parsed.source.text(s.range);
      const q = token[0];
      const quoted = token.length >= 2 && (q === '"' || q === "'") && token[token.length - 1] === q;
      const edit: TextEdit = { range: s.range, newText: quoted ? `${q}${s.word}${q}` : s.word };
      const after = parseSpec(applyEdits(parsed.text, [edit]), file, parsed.tables ? { tables: parsed.tables } : {});
      const at = s.finding.path;
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
