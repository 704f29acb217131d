/**
 * Turning new device sizes into minimal text edits. A value shared through `size:` (or a
 * mirror-level `devices.<role>` in a bank) is rewritten only when every device that inherits it
 * changes the same way; otherwise the changed devices get their own override, inserted under
 * `devices.<role>`. New values are written in the style of the token they replace.
 */
import type { ResolvedSpec, SpecPath, TextEdit } from '../types';
import type { ParsedSpec } from '../spec/index';
import { replaceValueEdit } from '../spec/edit';
import { allDevices, sameRef, sizeOf, type DeviceRef, type SizeKey } from '../sizing/devices';
import { insertedStyle, readStyle, writeLike } from '../sizing/token-style';
import { overridePath, sizeToken } from './sites';
import { buildEdits, type KeyInsert } from './build-edits';
import type { MirrorFragments } from '../spec/fragment';

export interface SizeChange { ref: DeviceRef; key: SizeKey; value: number }

/** What changed, for fix titles: `w 2u → 3.2u`. */
export interface ChangeNote { key: string; from?: string; to: string }

export interface SizePlan { edits: TextEdit[]; notes: ChangeNote[] }

const UNIT: Record<SizeKey, string> = { w: 'm', l: 'm', m: '', area: '' };

export function formatValue(key: SizeKey | 'v', value: number, token: string | undefined, json: boolean): string {
  const unit = key === 'v' ? 'V' : UNIT[key];
  const style = token !== undefined ? readStyle(token, unit) : insertedStyle(json);
  if (key === 'm') return writeLike(Math.round(value), { ...style, prefixed: false });
  if (key === 'area') return writeLike(value, { ...style, prefixed: false });
  return writeLike(value, style);
}

/** Plain-value edits for a set of size changes, or undefined when an edit cannot be placed. */
export function planSizeEdits(parsed: ParsedSpec, spec: ResolvedSpec, changes: SizeChange[], json: boolean, file?: string, frags?: MirrorFragments): SizePlan | undefined {
  const replacements: TextEdit[] = [];
  const notes: ChangeNote[] = [];
  const inserts: KeyInsert[] = [];
  const done = new Set<string>();
  const close = (a: number, b: number) => Math.abs(a - b) <= 1e-9 * Math.max(Math.abs(a), Math.abs(b));

  for (const c of changes) {
    const current = sizeOf(spec, c.ref);
    if (!current) return undefined;
    if (close(current[c.key] ?? 1, c.value)) continue;
    const tok = sizeToken(parsed, spec, c.ref, c.key);
    const own = overridePath(spec, c.ref);
    if (tok) {
      const id = tok.path.join('/');
      if (done.has(id)) continue;
      // Every device that reads this token, and whether all of them change to this value.
      const users = allDevices(spec, c.ref.mirror).filter((r) => {
        const t = sizeToken(parsed, spec, r, c.key);
        return t !== undefined && t.path.join('/') === id;
      });
      const allSame = users.every((u) => {
        const ch = changes.find((x) => x.key === c.key && sameRef(x.ref, u));
        return ch !== undefined && close(ch.value, c.value);
      });
      const isOwn = tok.path.length === own.length + 1 && own.every((p, i) => tok.path[i] === p);
      if (allSame || isOwn) {
        const text = formatValue(c.key, c.value, tok.text, json);
        const edit = replaceValueEdit(parsed, tok.path, text);
        if (!edit) return undefined;
        replacements.push(edit);
        notes.push({ key: noteKey(tok.path), from: tok.text.trim(), to: text });
        done.add(id);
        continue;
      }
    }
    const id = [...own, c.key].join('/');
    if (done.has(id)) continue;
    done.add(id);
    const text = formatValue(c.key, c.value, undefined, json);
    inserts.push({ parent: own, key: c.key, text });
    notes.push({ key: noteKey([...own, c.key]), to: text });
  }

  const edits = buildEdits(parsed, replacements, inserts, file, frags);
  return edits ? { edits, notes } : undefined;
}

/** A short label for a token: `w` for size.w, `out.w` for devices.out.w, `b.out.w` in a bank. */
function noteKey(path: SpecPath): string {
  const tail = path.slice(2);
  if (tail[0] === 'size') return String(tail[1]);
  if (tail[0] === 'devices') return tail.slice(1).join('.');
  if (tail[0] === 'outputs') return ['outputs', ...tail.slice(1)].join('.').replace(/^outputs\.(\d+)\.devices\./, 'outputs[$1].');
  return tail.join('.');
}

export function notesText(notes: ChangeNote[], max = 3): string {
  const shown = notes.slice(0, max).map((n) => (n.from !== undefined ? `${n.key} ${n.from} → ${n.to}` : `${n.key}: ${n.to}`));
  return notes.length > max ? `${shown.join(', ')}, …` : shown.join(', ');
}
