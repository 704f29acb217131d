/**
 * Cursor paths and text edits. Positions follow the Language Server Protocol 3.17 (§ Position:
 * zero-based line, `character` counted in UTF-16 code units by default), which VS Code uses too.
 * YAML structure per YAML 1.2.2 (block and flow mappings; JSON is a subset, §1.3).
 */
import { describe, expect, it } from 'vitest';
import { pathAt } from '../../src/extension/specPath';
import { preferredEdits } from '../../src/extension/edits';
import { applyEdits, minimalEdit } from '../../src/core/text/edits';
import { LineIndex } from '../../src/core/text/lines';

const offsetAt = (text: string, p: { line: number; character: number }) => new LineIndex(text).offset(p);
const positionAt = (text: string, offset: number) => new LineIndex(text).position(offset);
import { FILE, SPEC_TEXT } from './fixture';

const pos = (line: number, character: number) => ({ line, character });

describe('pathAt', () => {
  it('walks block mappings and sequences to the key or value under the cursor', () => {
    expect(pathAt(SPEC_TEXT, pos(10, 12))).toEqual(['mirrors', 0, 'devices', 'out', 'w']);
    expect(pathAt(SPEC_TEXT, pos(10, 8))).toEqual(['mirrors', 0, 'devices', 'out', 'w']);  // on the key
    expect(pathAt(SPEC_TEXT, pos(9, 7))).toEqual(['mirrors', 0, 'devices', 'out']);
    expect(pathAt(SPEC_TEXT, pos(3, 11))).toEqual(['mirrors', 0, 'name']);
  });

  it('walks flow mappings', () => {
    expect(pathAt(SPEC_TEXT, pos(7, 16))).toEqual(['mirrors', 0, 'size', 'w']);
    expect(pathAt(SPEC_TEXT, pos(7, 23))).toEqual(['mirrors', 0, 'size', 'l']);
  });

  it('reads JSON (a subset of YAML 1.2)', () => {
    const json = '{\n  "mirrors": [\n    { "name": "a", "devices": { "out": { "m": 4 } } }\n  ]\n}\n';
    const col = json.split('\n')[2].indexOf('4');
    expect(pathAt(json, pos(2, col))).toEqual(['mirrors', 0, 'devices', 'out', 'm']);
  });

  it('counts characters in UTF-16 code units (LSP default encoding)', () => {
    // U+1D707 (mathematical italic mu) is two UTF-16 code units but one code point: a
    // code-point count would land one character early.
    const text = 'x: { a: "\u{1D707}", b: 1 }\n';
    const col = text.indexOf('b');
    expect(col).toBe(14);
    expect(pathAt(text, pos(0, col))).toEqual(['x', 'b']);
    expect(offsetAt(text, pos(0, 200))).toBe(text.indexOf('\n'));  // clamped to the line end
    expect(offsetAt('a\nb: 1\n', pos(1, 3))).toBe(5);
  });

  it('gives up (undefined) on text that does not parse', () => {
    expect(pathAt('mirrors: [\n  - name: a\n', pos(1, 6))).toBeUndefined();
  });
});

describe('minimalEdit', () => {
  it('replaces only the changed span, so comments and the rest stay untouched', () => {
    const before = SPEC_TEXT;
    const after = before.replace('        w: 10u', '        w: 12.5u');
    const edit = minimalEdit(before, after);
    expect(edit).toBeDefined();
    expect(edit!.range.start.line).toBe(10);
    expect(edit!.range.end.line).toBe(10);
    expect(applyEdits(before, [edit!])).toBe(after);
    expect(minimalEdit(before, before)).toBeUndefined();
  });

  it('never splits a surrogate pair', () => {
    const before = 'x: "\u{1D707}a"\n';
    const after = 'x: "\u{1D708}a"\n';
    const edit = minimalEdit(before, after)!;
    expect(edit.newText).toBe('\u{1D708}');
    expect(applyEdits(before, [edit])).toBe(after);
  });

  it('maps offsets back to LSP positions', () => {
    expect(positionAt('ab\ncd\n', 4)).toEqual(pos(1, 1));
    expect(positionAt('ab\ncd\n', 0)).toEqual(pos(0, 0));
    expect(positionAt('ab\ncd\n', 3)).toEqual(pos(1, 0));
  });
});

describe('preferredEdits', () => {
  it('takes the preferred fix of errors and warnings and skips info suggestions', () => {
    const { edits, count } = preferredEdits(FILE.findings);
    expect(count).toBe(1);
    expect(edits).toEqual([{ range: FILE.findings[0].range, newText: '12u' }]);
  });

  it('leaves a clashing fix for the next round', () => {
    const a = FILE.findings[0];
    const clash = { ...a, code: 'other', fixes: [{ title: 'x', preferred: true, edits: [{ range: a.range, newText: '99u' }] }] };
    const { edits, count } = preferredEdits([a, clash]);
    expect(count).toBe(1);
    expect(edits[0].newText).toBe('12u');
  });
});
