/**
 * Minimal edits (design §6: a fix replaces the value token only, or inserts one key, and keeps
 * comments and formatting). Every edited text is re-parsed and must give the intended value.
 */
import { describe, expect, test } from 'vitest';
import { parseSpec } from '../../src/core/spec/index';
import { insertKeyEdits, replaceValueEdit } from '../../src/core/spec/edit';
import { applyEdits } from '../../src/core/text/edits';
import type { TemplateMirror } from '../../src/core/types';
import { BASE, withText } from './helpers';

function replaced(text: string, path: (string | number)[], newText: string, file = 'e.bias.yaml'): string {
  const p = parseSpec(text, file);
  const e = replaceValueEdit(p, path, newText);
  expect(e).toBeDefined();
  return applyEdits(text, [e!]);
}

function inserted(text: string, parent: (string | number)[], key: string, value: string, file = 'e.bias.yaml'): string {
  const p = parseSpec(text, file);
  const edits = insertKeyEdits(p, parent, key, value);
  expect(edits.length).toBeGreaterThan(0);
  return applyEdits(text, edits);
}

function mirror(text: string, file = 'e.bias.yaml'): TemplateMirror {
  const p = parseSpec(text, file);
  expect(p.findings).toEqual([]);
  return p.spec!.mirrors[0] as TemplateMirror;
}

const COMMENTED = withText('    size: { w: 2u, l: 1u }', '    size: { w: 2u, l: 1u }   # unit device\n    devices:\n      out: { m: 2 }   # two in parallel');

describe('replaceValueEdit', () => {
  test('a plain value in a flow mapping: only the token changes, the comment stays', () => {
    const out = replaced(COMMENTED, ['mirrors', 0, 'size', 'w'], '3.4u');
    expect(out).toBe(COMMENTED.replace('{ w: 2u, l: 1u }   # unit device', '{ w: 3.4u, l: 1u }   # unit device'));
    expect(mirror(out).devices.ref.w).toBe(3.4e-6);
  });

  test('a block value keeps its trailing comment', () => {
    const text = withText('    input: 10u', '    input: 10u  # from the bandgap');
    const out = replaced(text, ['mirrors', 0, 'input'], '12u');
    expect(out).toContain('    input: 12u  # from the bandgap');
    expect(mirror(out).input).toEqual({ kind: 'current', i: 12e-6 });
  });

  test('quoting is kept: double, single', () => {
    const dq = withText('w: 2u', 'w: "2u"');
    expect(replaced(dq, ['mirrors', 0, 'size', 'w'], '5u')).toContain('w: "5u"');
    const sq = withText('w: 2u', "w: '2u'");
    expect(replaced(sq, ['mirrors', 0, 'size', 'w'], '5u')).toContain("w: '5u'");
    // An already-quoted new text is not quoted twice.
    expect(replaced(dq, ['mirrors', 0, 'size', 'w'], '"5u"')).toContain('w: "5u"');
  });

  test('in JSON a value with a prefix is written as a JSON string', () => {
    const json = JSON.stringify({ format: 1, process: { nmos: { kp: 2.8e-4, vt0: 0.45 } }, supplies: { vdd: 1.8 },
      mirrors: [{ name: 'j', kind: 'simple', type: 'nmos', input: 1e-5, size: { w: 2e-6, l: 1e-6 }, output: { v: 0.9 } }] }, null, 2);
    const out = replaced(json, ['mirrors', 0, 'size', 'w'], '3u', 'j.bias.json');
    expect(JSON.parse(out).mirrors[0].size.w).toBe('3u');
    expect(mirror(out, 'j.bias.json').devices.ref.w).toBe(3e-6);
    const num = replaced(json, ['mirrors', 0, 'size', 'w'], '3e-6', 'j.bias.json');
    expect(JSON.parse(num).mirrors[0].size.w).toBe(3e-6);
  });

  test('an alias is replaced by the literal, the anchor is left alone', () => {
    const text = BASE.replace('size: { w: 2u, l: 1u }', 'size: &u { w: 2u, l: 1u }')
      + '  - name: m2\n    kind: simple\n    type: nmos\n    input: 10u\n    size: *u\n    output: { v: 0.9 }\n';
    const out = replaced(text, ['mirrors', 1, 'size'], '{ w: 4u, l: 1u }');
    expect(out).toContain('size: &u { w: 2u, l: 1u }');
    expect(out).toContain('    size: { w: 4u, l: 1u }\n');
  });

  test('a path that is not there gives no edit', () => {
    expect(replaceValueEdit(parseSpec(BASE), ['mirrors', 3, 'size'], '1')).toBeUndefined();
    expect(replaceValueEdit(parseSpec(BASE), ['nothing'], '1')).toBeUndefined();
  });
});

describe('insertKeyEdits', () => {
  test('into a flow mapping', () => {
    const out = inserted(COMMENTED, ['mirrors', 0, 'devices', 'out'], 'w', '6u');
    expect(out).toContain('      out: { m: 2, w: 6u }   # two in parallel');
    expect(mirror(out).outputs[0].devices.out).toMatchObject({ w: 6e-6, m: 2 });
  });

  test('into a block mapping, after the last entry and its comment', () => {
    const text = withText('process:\n', 'process:\n  model: square-law   # level 1\n');
    const out = inserted(text, ['process'], 'grid', '10n');
    expect(out).toContain('process:\n  model: square-law   # level 1\n  nmos: { kp: 280u, vt0: 0.45 }\n  pmos: { kp: 70u, vt0: 0.48 }\n  grid: 10n\n');
    expect(parseSpec(out).spec!.process.grid).toBe(1e-8);
  });

  test('creates missing parents in block style at the mirror\'s indentation', () => {
    const out = inserted(BASE, ['mirrors', 0, 'devices', 'out'], 'w', '6u');
    expect(out).toContain('    output: { v: 0.9 }\n    devices:\n      out:\n        w: 6u\n');
    expect(mirror(out).outputs[0].devices.out.w).toBe(6e-6);
    expect(mirror(out).devices.ref.w).toBe(2e-6);
  });

  test('creates a missing child in a flow parent', () => {
    const out = inserted(COMMENTED.replace('devices:\n      out: { m: 2 }   # two in parallel', 'devices: { out: { m: 2 } }'), ['mirrors', 0, 'devices', 'ref'], 'l', '2u');
    expect(out).toContain('devices: { out: { m: 2 }, ref: { l: 2u } }');
    expect(mirror(out).devices.ref.l).toBe(2e-6);
  });

  test('an empty parent (`devices:`) becomes a flow mapping', () => {
    const text = withText('    output: { v: 0.9 }', '    output: { v: 0.9 }\n    devices:');
    const out = inserted(text, ['mirrors', 0, 'devices', 'out'], 'm', '3');
    expect(out).toContain('    devices: { out: { m: 3 } }');
    expect(mirror(out).outputs[0].devices.out.m).toBe(3);
  });

  test('an existing key gets its value replaced', () => {
    const out = inserted(BASE, ['mirrors', 0, 'size'], 'w', '5u');
    expect(out).toContain('size: { w: 5u, l: 1u }');
  });

  test('a trailing comma in a flow mapping is respected', () => {
    const text = withText('size: { w: 2u, l: 1u }', 'size: { w: 2u, l: 1u, }');
    const out = inserted(text, ['mirrors', 0, 'size'], 'm', '2');
    expect(out).toContain('size: { w: 2u, l: 1u, m: 2, }');
    expect(mirror(out).devices.ref.m).toBe(2);
  });

  test('multi-line JSON: a new line at the keys\' column, key and value quoted', () => {
    const json = JSON.stringify({ format: 1, process: { nmos: { kp: '280u', vt0: 0.45 } }, supplies: { vdd: 1.8 },
      mirrors: [{ name: 'j', kind: 'simple', type: 'nmos', input: '10u', size: { w: '2u', l: '1u' }, output: { v: 0.9 } }] }, null, 2);
    const out = inserted(json, ['mirrors', 0, 'devices', 'out'], 'w', '6u', 'j.bias.json');
    expect(JSON.parse(out).mirrors[0].devices).toEqual({ out: { w: '6u' } });
    expect(out).toContain('      },\n      "devices": { "out": { "w": "6u" } }\n    }');
    const grid = inserted(json, ['process'], 'grid', '10n', 'j.bias.json');
    expect(JSON.parse(grid).process.grid).toBe('10n');
  });

  test('CRLF files keep CRLF', () => {
    const crlf = BASE.replace(/\n/g, '\r\n');
    const out = inserted(crlf, ['process'], 'grid', '10n');
    expect(out).toContain('  pmos: { kp: 70u, vt0: 0.48 }\r\n  grid: 10n\r\n');
    expect(out.replace(/\r\n/g, '').includes('\n')).toBe(false);
  });

  test('a list item that does not exist cannot be created', () => {
    expect(insertKeyEdits(parseSpec(BASE), ['mirrors', 5, 'devices'], 'x', '1')).toEqual([]);
  });
});

describe('applyEdits', () => {
  test('several edits apply against the original positions', () => {
    const p = parseSpec(BASE);
    const a = replaceValueEdit(p, ['mirrors', 0, 'size', 'w'], '4u')!;
    const b = replaceValueEdit(p, ['mirrors', 0, 'size', 'l'], '2u')!;
    const c = replaceValueEdit(p, ['supplies', 'vdd'], '3.3')!;
    const out = applyEdits(BASE, [a, b, c]);
    expect(out).toContain('size: { w: 4u, l: 2u }');
    expect(out).toContain('supplies: { vdd: 3.3 }');
  });

  test('inserts at one position keep their order; overlapping edits throw', () => {
    const at = { line: 0, character: 0 };
    expect(applyEdits('x', [{ range: { start: at, end: at }, newText: 'a' }, { range: { start: at, end: at }, newText: 'b' }])).toBe('abx');
    const r = { start: { line: 0, character: 0 }, end: { line: 0, character: 2 } };
    const s = { start: { line: 0, character: 1 }, end: { line: 0, character: 3 } };
    expect(() => applyEdits('abcd', [{ range: r, newText: '' }, { range: s, newText: '' }])).toThrow('overlapping');
  });
});
