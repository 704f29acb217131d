/**
 * Offsets ↔ LSP positions (0-based line, UTF-16 character: JS string indexes are UTF-16), the one
 * place that does this arithmetic. A text's line starts are indexed once; each lookup is a binary
 * search (O(log n)), so a finding on the last line of a 500 KB file costs what one on the first
 * does.
 *
 * A byte-order mark (U+FEFF at offset 0) is not a column: editors strip it before they count, so
 * line 1 is counted from the character after it, and position (0, 0) maps to the offset after it
 * (an edit there lands behind the mark, which stays first in the file).
 */
import type { Position, Range } from '../types';

const BOM = 0xfeff;

export class LineIndex {
  /**
   * The index of `text`, shared: the last few texts indexed are kept, so every finding, fix and
   * edit of one text (the spec being analysed, a fix's edited text) scans its line starts once.
   */
  static of(text: string): LineIndex {
    for (const l of recent) if (l.text === text) return l;
    const l = new LineIndex(text);
    recent[next] = l;
    next = (next + 1) % recent.length;
    return l;
  }

  /** Offset of the first character of each line. A line ends at \n (a \r before it stays on the line). */
  private readonly starts: number[] = [0];
  /** 1 when the text starts with a byte-order mark, else 0. */
  private readonly bom: number;
  private readonly length: number;
  /** The text, or how to make it (`spliced`: built only when read). */
  private source: string | (() => string);

  constructor(text: string, spliced?: { starts: number[]; bom: number; length: number; text: () => string }) {
    this.source = spliced ? spliced.text : text;
    if (spliced) {
      this.starts = spliced.starts;
      this.bom = spliced.bom;
      this.length = spliced.length;
      return;
    }
    for (let i = text.indexOf('\n'); i >= 0; i = text.indexOf('\n', i + 1)) this.starts.push(i + 1);
    this.bom = text.charCodeAt(0) === BOM ? 1 : 0;
    this.length = text.length;
  }

  get text(): string {
    if (typeof this.source !== 'string') this.source = this.source();
    return this.source;
  }

  /**
   * The index of this text with [s, e) replaced by `inserted`, made from this one's line starts:
   * neither this text nor the edited one is scanned, and the edited text is built only if read
   * (a fix composed step by step on a big file: text/edits.ts `EditLog`).
   */
  spliced(s: number, e: number, inserted: string): LineIndex {
    const delta = inserted.length - (e - s);
    const starts = this.starts.slice(0, this.lineOf(s) + 1);
    for (let i = inserted.indexOf('\n'); i >= 0; i = inserted.indexOf('\n', i + 1)) starts.push(s + i + 1);
    for (let k = this.lineOf(e) + 1; k < this.starts.length; k++) starts.push(this.starts[k] + delta);
    const bom = s > 0 ? this.bom : (inserted.length > 0 ? inserted : this.text.slice(e)).charCodeAt(0) === BOM ? 1 : 0;
    return new LineIndex('', { starts, bom, length: this.length + delta, text: () => this.text.slice(0, s) + inserted + this.text.slice(e) });
  }

  get lineCount(): number {
    return this.starts.length;
  }

  /** The line holding `offset` (clamped to the text). */
  lineOf(offset: number): number {
    const o = Math.max(0, Math.min(offset, this.length));
    let lo = 0;
    let hi = this.starts.length - 1;
    while (lo < hi) {
      const mid = (lo + hi + 1) >> 1;
      if (this.starts[mid] <= o) lo = mid; else hi = mid - 1;
    }
    return lo;
  }

  position(offset: number): Position {
    const o = Math.max(0, Math.min(offset, this.length));
    const line = this.lineOf(o);
    return { line, character: Math.max(0, o - this.contentStart(line)) };
  }

  range(start: number, end: number): Range {
    return { start: this.position(start), end: this.position(Math.max(start, end)) };
  }

  /** Offset of a position; a character past the line's end is clamped to it (before the line
   *  break, as LSP asks), a line past the last to the end of the text. */
  offset(p: Position): number {
    if (p.line >= this.starts.length) return this.length;
    const line = Math.max(0, p.line);
    const end = line + 1 < this.starts.length ? this.starts[line + 1] - 1 : this.length;
    return Math.min(this.contentStart(line) + Math.max(0, p.character), end);
  }

  /** Offset just past the end of the line holding `offset`, before its line break. */
  lineEnd(offset: number): number {
    const nl = this.text.indexOf('\n', offset);
    const end = nl < 0 ? this.text.length : nl;
    return end > 0 && this.text[end - 1] === '\r' ? end - 1 : end;
  }

  /** Offset of the first character of the line holding `offset` (after a byte-order mark). */
  lineStart(offset: number): number {
    return this.contentStart(this.lineOf(offset));
  }

  /** The source text of a range. */
  slice(r: Range): string {
    return this.text.slice(this.offset(r.start), this.offset(r.end));
  }

  private contentStart(line: number): number {
    return line === 0 ? this.bom : this.starts[line];
  }
}

/** The texts LineIndex.of indexed last (a ring: the analysed text and a few edited ones). */
const recent: LineIndex[] = [];
for (let i = 0; i < 4; i++) recent.push(new LineIndex(''));
let next = 0;

export const ZERO_RANGE: Range = { start: { line: 0, character: 0 }, end: { line: 0, character: 0 } };

/** The range `d` lines further down (a fragment's range placed in its file, or a range below an edit that added lines). */
export function linesDown(r: Range, d: number): Range {
  return { start: { line: r.start.line + d, character: r.start.character }, end: { line: r.end.line + d, character: r.end.character } };
}
