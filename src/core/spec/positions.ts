/** Offsets ↔ LSP positions (0-based line, UTF-16 character: JS string indexes are UTF-16). */
import type { Position, Range } from '../types';

export class LineIndex {
  /** Offset of the first character of each line. A line ends at \n (a \r before it stays on the line). */
  private readonly starts: number[] = [0];

  constructor(readonly text: string) {
    for (let i = text.indexOf('\n'); i >= 0; i = text.indexOf('\n', i + 1)) this.starts.push(i + 1);
  }

  position(offset: number): Position {
    const o = Math.max(0, Math.min(offset, this.text.length));
    let lo = 0;
    let hi = this.starts.length - 1;
    while (lo < hi) {
      const mid = (lo + hi + 1) >> 1;
      if (this.starts[mid] <= o) lo = mid; else hi = mid - 1;
    }
    return { line: lo, character: o - this.starts[lo] };
  }

  range(start: number, end: number): Range {
    return { start: this.position(start), end: this.position(Math.max(start, end)) };
  }

  offset(p: Position): number {
    const line = Math.max(0, Math.min(p.line, this.starts.length - 1));
    return Math.min(this.starts[line] + Math.max(0, p.character), this.text.length);
  }

  /** Offset just past the end of the line holding `offset`, before its line break. */
  lineEnd(offset: number): number {
    const nl = this.text.indexOf('\n', offset);
    const end = nl < 0 ? this.text.length : nl;
    return end > 0 && this.text[end - 1] === '\r' ? end - 1 : end;
  }

  lineStart(offset: number): number {
    return this.starts[this.position(offset).line];
  }
}

export const ZERO_RANGE: Range = { start: { line: 0, character: 0 }, end: { line: 0, character: 0 } };
