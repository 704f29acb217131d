/**
 * The one offset ↔ position index. Positions follow the Language Server Protocol 3.17
 * (§ Position: zero-based line, `character` in UTF-16 code units; a character past the line's
 * end means the line's end). A byte-order mark is not a column: Unicode 15, §23.8 "Specials"
 * (U+FEFF at the start of a text is a signature, not content) — editors strip it before they
 * count, so the positions here agree with theirs.
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { LineIndex } from '../../src/core/text/lines';
import { applyEdits, minimalEdit } from '../../src/core/text/edits';

const pos = (line: number, character: number) => ({ line, character });

describe('LineIndex', () => {
  it('round-trips every offset with LF, CRLF and a last line without a break', () => {
    const text = 'a: 1\r\nbb: 2\nccc: 3';
    const lines = new LineIndex(text);
    for (let off = 0; off <= text.length; off++) expect(lines.offset(lines.position(off))).toBe(off);
    expect(lines.position(text.indexOf('bb'))).toEqual(pos(1, 0));
    expect(lines.lineCount).toBe(3);
  });

  it('clamps a character past the line end to the line end, a line past the last to the text end', () => {
    const text = 'ab\ncd\n';
    const lines = new LineIndex(text);
    expect(lines.offset(pos(0, 99))).toBe(2);
    expect(lines.offset(pos(7, 0))).toBe(text.length);
    expect(lines.slice({ start: pos(1, 0), end: pos(1, 99) })).toBe('cd');
  });

  it('a byte-order mark is not a column: line 1 counts from the character after it', () => {
    const text = '\uFEFFformat: 1\ntitle: x\n';
    const lines = new LineIndex(text);
    expect(lines.position(text.indexOf('format'))).toEqual(pos(0, 0));
    expect(lines.position(text.indexOf(': 1'))).toEqual(pos(0, 6));
    expect(lines.position(text.indexOf('title'))).toEqual(pos(1, 0));
    expect(lines.offset(pos(0, 0))).toBe(1);
    expect(lines.lineStart(text.indexOf('1'))).toBe(1);
    // An edit at (0, 0) lands behind the mark, which stays first.
    expect(applyEdits(text, [{ range: { start: pos(0, 0), end: pos(0, 0) }, newText: '# a\n' }])).toBe('\uFEFF# a\nformat: 1\ntitle: x\n');
    const after = text.replace('format: 1', 'format: 2');
    expect(applyEdits(text, [minimalEdit(text, after)!])).toBe(after);
  });

  it('property: position → offset → position is the identity on positions that exist', () => {
    const unit = fc.constantFrom('a', ' ', '\n', '\r\n', 'µ', '\u{1D707}');
    fc.assert(fc.property(fc.boolean(), fc.array(unit, { maxLength: 60 }), (bom, parts) => {
      const text = (bom ? '\uFEFF' : '') + parts.join('');
      const lines = new LineIndex(text);
      for (let off = bom ? 1 : 0; off <= text.length; off++) {
        const p = lines.position(off);
        expect(lines.offset(p)).toBe(off);
      }
    }), { numRuns: 300 });
  });

  it('property: an index spliced from the original\'s equals the edited text\'s own (no text scanned)', () => {
    // Check value: a LineIndex built by scanning the edited text, position for position.
    const unit = fc.constantFrom('a', ' ', '\n', '\r\n', 'µ', '\uFEFF');
    fc.assert(fc.property(fc.boolean(), fc.array(unit, { maxLength: 30 }), fc.nat(), fc.nat(6), fc.array(unit, { maxLength: 4 }), (bom, parts, a, len, ins) => {
      const text = (bom ? '\uFEFF' : '') + parts.join('');
      const s = a % (text.length + 1), e = Math.min(text.length, s + len), inserted = ins.join('');
      const edited = text.slice(0, s) + inserted + text.slice(e);
      const spliced = new LineIndex(text).spliced(s, e, inserted), fresh = new LineIndex(edited);
      expect(spliced.lineCount).toBe(fresh.lineCount);
      for (let off = 0; off <= edited.length; off++) expect(spliced.position(off)).toEqual(fresh.position(off));
      for (let line = 0; line <= fresh.lineCount; line++) {
        for (let character = 0; character < 8; character++) expect(spliced.offset(pos(line, character))).toBe(fresh.offset(pos(line, character)));
      }
      expect(spliced.text).toBe(edited);
    }), { numRuns: 300 });
  });

  it('lookups are a binary search: 200 000 lines need no more work per lookup than 20 (counted, not timed)', () => {
    // Count the comparisons through the `starts` array: ⌈log2(lines)⌉ + 1 at most.
    const text = 'x\n'.repeat(200_000);
    const lines = new LineIndex(text);
    let reads = 0;
    const starts = (lines as unknown as { starts: number[] }).starts;
    const counted = new Proxy(starts, { get(t, k) { if (typeof k === 'string' && /^\d+$/.test(k)) reads++; return Reflect.get(t, k); } });
    (lines as unknown as { starts: number[] }).starts = counted;
    expect(lines.position(text.length - 1)).toEqual(pos(199_999, 1));
    expect(reads).toBeLessThanOrEqual(Math.ceil(Math.log2(200_001)) + 2);
  });
});
