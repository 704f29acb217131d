/**
 * Text edits (LSP ranges on one text), the one place that applies and composes them:
 * - `applyEdits`: apply non-overlapping edits;
 * - `EditLog`: a fix built step by step (replace size tokens, then insert an override,
 *   re-parsing between structural steps so the next insertion sees the new mapping) yet handed
 *   out as the minimal edits on the ORIGINAL text — each step's edits, made on the current text,
 *   are mapped back and merged where they touch;
 * - `editsBetween`: the edits that turn one text into another (a line diff, each hunk trimmed to
 *   the characters that really differ);
 * - `minimalEdit`: the one edit replacing the differing middle (the editor's fix-all).
 * Offsets and positions go through `LineIndex` (lines.ts).
 */
import { diffLines } from 'diff';
import type { TextEdit } from '../types';
import { LineIndex } from './lines';

/** Apply non-overlapping edits (LSP ranges in `text`). Throws on overlapping edits. */
export function applyEdits(text: string, edits: TextEdit[]): string {
  const lines = LineIndex.of(text);
  const spans = edits.map((e, i) => ({ s: lines.offset(e.range.start), e: lines.offset(e.range.end), t: e.newText, i }));
  spans.sort((a, b) => a.s - b.s || a.i - b.i);
  for (let k = 1; k < spans.length; k++) {
    if (spans[k].s < spans[k - 1].e) throw new Error('applyEdits: overlapping edits');
  }
  let out = '';
  let pos = 0;
  for (const sp of spans) {
    out += text.slice(pos, sp.s) + sp.t;
    pos = Math.max(pos, sp.e);
  }
  return out + text.slice(pos);
}

interface Span { s: number; e: number; text: string }  // original [s, e) becomes text

export class EditLog {
  private spans: Span[] = [];
  /** The current text's line starts, spliced from the original's edit by edit (lines.ts): a
   *  step's positions are read without scanning, or even building, the text so far. */
  private lines: LineIndex;
  private built?: string;

  constructor(private readonly original: string) {
    this.lines = LineIndex.of(original);
  }

  /** The text so far (built when asked, from the original and the recorded edits). */
  get text(): string {
    if (this.built === undefined) {
      let out = '';
      let pos = 0;
      for (const sp of this.spans) {
        out += this.original.slice(pos, sp.s) + sp.text;
        pos = sp.e;
      }
      this.built = out + this.original.slice(pos);
    }
    return this.built;
  }

  /** Record edits made on the current text (non-overlapping among themselves). */
  apply(edits: TextEdit[]): void {
    const lines = this.lines;
    const batch = edits
      .map((e) => ({ cs: lines.offset(e.range.start), ce: lines.offset(e.range.end), text: e.newText }))
      .sort((a, b) => b.cs - a.cs); // last first: earlier offsets stay valid
    for (const b of batch) this.applyOne(b.cs, b.ce, b.text);
  }

  private applyOne(cs: number, ce: number, text: string): void {
    // Output spans of the recorded edits in current-text offsets, and the shift before each.
    let shift = 0;
    const before: number[] = [];
    const out = this.spans.map((sp) => {
      before.push(shift);
      const os = sp.s + shift;
      const oe = os + sp.text.length;
      shift += sp.text.length - (sp.e - sp.s);
      return { os, oe };
    });
    const toOrig = (c: number): number => {
      // c lies outside every output span (or on its border): undo the shifts before it.
      let d = 0;
      for (let i = 0; i < this.spans.length; i++) {
        if (out[i].oe <= c) d += this.spans[i].text.length - (this.spans[i].e - this.spans[i].s);
      }
      return c - d;
    };
    // The current text's characters [a, b), from the original and the recorded edits.
    const current = (a: number, b: number): string => {
      let r = '';
      let pos = a;
      for (let i = 0; i < out.length && pos < b; i++) {
        const { os, oe } = out[i];
        if (oe <= pos) continue;
        if (os > pos) {
          const g = Math.min(os, b);
          r += this.original.slice(pos - before[i], g - before[i]);
          pos = g;
          if (pos >= b) break;
        }
        const t = Math.min(oe, b);
        r += this.spans[i].text.slice(pos - os, t - os);
        pos = t;
      }
      return pos < b ? r + this.original.slice(pos - shift, b - shift) : r;
    };
    const hit: number[] = [];
    for (let i = 0; i < out.length; i++) if (out[i].os <= ce && out[i].oe >= cs) hit.push(i);
    if (hit.length === 0) {
      const s = toOrig(cs);
      const e = s + (ce - cs);
      this.spans.push({ s, e, text });
    } else {
      const first = hit[0];
      const last = hit[hit.length - 1];
      const S = Math.min(cs, out[first].os);
      const E = Math.max(ce, out[last].oe);
      const origS = S === out[first].os ? this.spans[first].s : toOrig(S);
      const origE = E === out[last].oe ? this.spans[last].e : toOrig(E) ;
      const merged = current(S, cs) + text + current(ce, E);
      this.spans.splice(first, last - first + 1, { s: origS, e: origE, text: merged });
    }
    this.spans.sort((a, b) => a.s - b.s || a.e - b.e);
    this.lines = this.lines.spliced(cs, ce, text);
    this.built = undefined;
  }

  /** The recorded change as edits on the original text. */
  edits(): TextEdit[] {
    const lines = LineIndex.of(this.original);
    return this.spans
      .filter((sp) => !(sp.e === sp.s && sp.text === '') && this.original.slice(sp.s, sp.e) !== sp.text)
      .map((sp) => ({ range: lines.range(sp.s, sp.e), newText: sp.text }));
  }
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
  const lines = new LineIndex(before);
  return hunks.map((h) => {
    let s = h.s, e = h.e, t = h.text;
    // Trim what the hunk keeps at either end, so only the changed characters are replaced.
    let p = 0;
    while (p < t.length && s + p < e && before[s + p] === t[p]) p++;
    s += p; t = t.slice(p);
    let q = 0;
    while (q < t.length && e - q > s && before[e - 1 - q] === t[t.length - 1 - q]) q++;
    e -= q; t = t.slice(0, t.length - q);
    return { range: lines.range(s, e), newText: t };
  });
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
    range: new LineIndex(before).range(head, before.length - tail),
    newText: after.slice(head, after.length - tail),
  };
}

function isHighSurrogate(c: number): boolean { return c >= 0xd800 && c <= 0xdbff; }
function isLowSurrogate(c: number): boolean { return c >= 0xdc00 && c <= 0xdfff; }
