/**
 * Composing text edits. A fix is built step by step (replace size tokens, then insert an
 * override, re-parsing between structural steps so the next insertion sees the new mapping),
 * yet it must be handed out as edits on the ORIGINAL text. `EditLog` records each step's edits
 * (made on the current text) and maps them back, merging edits that touch into one, so the
 * result is the minimal set of original regions that change.
 */
import type { Position, Range, TextEdit } from '../types';

/** Offsets of each line start (0-based lines, UTF-16 offsets, LF or CRLF endings). */
export function lineStarts(text: string): number[] {
  const starts = [0];
  for (let i = 0; i < text.length; i++) if (text.charCodeAt(i) === 10) starts.push(i + 1);
  return starts;
}

export function toOffset(starts: number[], textLength: number, p: Position): number {
  if (p.line >= starts.length) return textLength;
  return Math.min(starts[p.line] + p.character, p.line + 1 < starts.length ? starts[p.line + 1] : textLength);
}

export function toPosition(starts: number[], offset: number): Position {
  let lo = 0;
  let hi = starts.length - 1;
  while (lo < hi) {
    const mid = (lo + hi + 1) >> 1;
    if (starts[mid] <= offset) lo = mid; else hi = mid - 1;
  }
  return { line: lo, character: offset - starts[lo] };
}

/** Apply non-overlapping edits given in one text's coordinates. */
export function applyTextEdits(text: string, edits: TextEdit[]): string {
  const starts = lineStarts(text);
  const spans = edits.map((e) => ({ s: toOffset(starts, text.length, e.range.start), e: toOffset(starts, text.length, e.range.end), t: e.newText }))
    .sort((a, b) => a.s - b.s || a.e - b.e);
  let out = '';
  let at = 0;
  for (const sp of spans) {
    if (sp.s < at) throw new Error('overlapping edits');
    out += text.slice(at, sp.s) + sp.t;
    at = sp.e;
  }
  return out + text.slice(at);
}

interface Span { s: number; e: number; text: string }  // original [s, e) becomes text

export class EditLog {
  private spans: Span[] = [];
  private current: string;

  constructor(private readonly original: string) {
    this.current = original;
  }

  get text(): string {
    return this.current;
  }

  /** Record edits made on the current text (non-overlapping among themselves). */
  apply(edits: TextEdit[]): void {
    const starts = lineStarts(this.current);
    const len = this.current.length;
    const batch = edits
      .map((e) => ({ cs: toOffset(starts, len, e.range.start), ce: toOffset(starts, len, e.range.end), text: e.newText }))
      .sort((a, b) => b.cs - a.cs); // last first: earlier offsets stay valid
    for (const b of batch) this.applyOne(b.cs, b.ce, b.text);
  }

  private applyOne(cs: number, ce: number, text: string): void {
    // Output spans of the recorded edits in current-text offsets.
    let shift = 0;
    const out = this.spans.map((sp) => {
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
    const hit: number[] = [];
    for (let i = 0; i < out.length; i++) if (out[i].os <= ce && out[i].oe >= cs) hit.push(i);
    const nextCurrent = this.current.slice(0, cs) + text + this.current.slice(ce);
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
      const merged = nextCurrent.slice(S, E + (text.length - (ce - cs)));
      this.spans.splice(first, last - first + 1, { s: origS, e: origE, text: merged });
    }
    this.spans.sort((a, b) => a.s - b.s || a.e - b.e);
    this.current = nextCurrent;
  }

  /** The recorded change as edits on the original text. */
  edits(): TextEdit[] {
    const starts = lineStarts(this.original);
    return this.spans
      .filter((sp) => !(sp.e === sp.s && sp.text === '') && this.original.slice(sp.s, sp.e) !== sp.text)
      .map((sp) => ({ range: rangeOf(starts, sp.s, sp.e), newText: sp.text }));
  }
}

function rangeOf(starts: number[], s: number, e: number): Range {
  return { start: toPosition(starts, s), end: toPosition(starts, e) };
}
