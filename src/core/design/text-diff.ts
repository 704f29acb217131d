/**
 * The edits that turn one text into another, on the first text's coordinates: a line diff,
 * each changed hunk trimmed to the characters that really differ. Lets a fix be built in steps
 * (replace a token, re-parse, insert a key) and still be handed out as minimal edits on the
 * original text.
 */
import { diffLines } from 'diff';
import type { Position, TextEdit } from '../types';

function positionAt(text: string, offset: number): Position {
  let line = 0, start = 0;
  for (let i = 0; i < offset; i++) if (text.charCodeAt(i) === 10) { line++; start = i + 1; }
  return { line, character: offset - start };
}

export function editsBetween(before: string, after: string): TextEdit[] {
  if (before === after) return [];
  const hunks: { s: number; e: number; text: string }[] = [];
  let at = 0;          // offset in `before`
  let open: { s: number; e: number; text: string } | undefined;
  for (const part of diffLines(before, after)) {
    if (!part.added && !part.removed) {
      if (open) { hunks.push(open); open = undefined; }
      at += part.value.length;
      continue;
    }
    open ??= { s: at, e: at, text: '' };
    if (part.removed) { at += part.value.length; open.e = at; } else open.text += part.value;
  }
  if (open) hunks.push(open);
  return hunks.map((h) => {
    let s = h.s, e = h.e, t = h.text;
    // Trim what the hunk keeps at either end, so only the changed characters are replaced.
    let p = 0;
    while (p < t.length && s + p < e && before[s + p] === t[p]) p++;
    s += p; t = t.slice(p);
    let q = 0;
    while (q < t.length && e - q > s && before[e - 1 - q] === t[t.length - 1 - q]) q++;
    e -= q; t = t.slice(0, t.length - q);
    return { range: { start: positionAt(before, s), end: positionAt(before, e) }, newText: t };
  });
}
