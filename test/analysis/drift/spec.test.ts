/** The drift and noise keys of the spec (design §12): read with their defaults, bad values as
 *  findings at the value. */
import { describe, expect, it } from 'vitest';
import { parseSpec } from '../../../src/core/spec/index';
import { applyCorner } from '../../../src/core/variation/corners';
import type { TemplateMirror } from '../../../src/core/types';
import { header, textOf } from '../../rules/helpers';

const MIRROR = ['  - name: rb', '    kind: simple', '    type: nmos', '    input: { resistor: 120k, tc1: 1m, tolerance: 20% }',
  '    size: { w: 2u, l: 1u }', '    filter: { r: 1M, c: 10p }', '    output: { v: 0.9 }', '    require: { noise: 2p, tc: 200, supplySensitivity: 0.5 }'];
const withProcess = (extra: string, tail = ''): string => `${header(1.8, extra)}\n${MIRROR.join('\n')}\n${tail}`;

describe('reading', () => {
  it('trange, analysis.noise, gn/kf/cox, the filter, resistor tc1 and tolerance, the new requirements', () => {
    const text = withProcess('\n  trange: [-40 C, 125 C]', 'analysis: { noise: { f: 10k, band: [10, 1M] } }\n')
      .replace(/( {2}nmos: \{[^}]*)\}/, '$1, gn: 1, kf: 1e-25, cox: 8.5 mF/m² }');
    const p = parseSpec(text, 'a.bias.yaml');
    expect(p.findings.filter((f) => f.severity === 'error')).toEqual([]);
    const s = p.spec!;
    expect(s.process.trange![0]).toBeCloseTo(233.15, 9);
    expect(s.process.trange![1]).toBeCloseTo(398.15, 9);
    expect(s.process.nmos).toMatchObject({ gn: 1, kf: 1e-25, cox: 8.5e-3 });
    expect(s.process.pmos.gn).toBeCloseTo(2 / 3, 12);   // default (design §12)
    expect(s.analysis).toEqual({ noise: { f: 1e4, band: [10, 1e6] } });
    const m = s.mirrors[0] as TemplateMirror;
    expect(m.input).toEqual({ kind: 'resistor', r: 120e3, tc1: 1e-3, tolerance: 0.2 });
    expect(m.filter).toEqual({ r: 1e6, c: 1e-11 });
    expect(m.outputs[0]!.require).toEqual({ noise: 2e-12, tc: 200, supplySensitivity: 0.5 });
  });

  it('defaults: 1 kHz over 1 Hz…1 MHz', () => {
    expect(parseSpec(withProcess(''), 'a.bias.yaml').spec!.analysis).toEqual({ noise: { f: 1e3, band: [1, 1e6] } });
  });

  it('a corner scales resistors or puts them at their tolerance edge', () => {
    const text = withProcess('', 'corners:\n  hot: { resistors: +10% }\n  lo: { resistors: min }\n');
    const s = parseSpec(text, 'a.bias.yaml').spec!;
    expect(s.corners.map((c) => c.resistors)).toEqual([{ scale: 0.1 }, { edge: 'min' }]);
    expect(applyCorner(s, s.corners[1]!).process.resistors).toEqual({ edge: 'min' });
  });
});

describe('bad values are findings at the value', () => {
  const cases: [string, string, string, string][] = [
    ['a reversed trange', withProcess('\n  trange: [125 C, -40 C]'), 'bad-value', '[125 C, -40 C]'],
    ['a trange of one value', withProcess('\n  trange: [25 C]'), 'wrong-type', '[25 C]'],
    ['a reversed band', withProcess('', 'analysis: { noise: { band: [1M, 10] } }\n'), 'bad-value', '[1M, 10]'],
    ['a filter capacitance in ohms', withProcess('').replace('c: 10p', 'c: 10kΩ'), 'bad-unit', '10kΩ'],
    ['a corner scaling resistors by a word', withProcess('', 'corners:\n  x: { resistors: big }\n'), 'bad-value', 'big'],
  ];
  it.each(cases)('%s', (_, text, code, token) => {
    const f = parseSpec(text, 'a.bias.yaml').findings.find((x) => x.code === code);
    expect(f, code).toBeDefined();
    expect(textOf(text, f!.range)).toBe(token);
  });

  it('a filter on a netlist mirror is misplaced', () => {
    const text = `${header()}\n  - name: n\n    kind: netlist\n    type: nmos\n    devices:\n      M1: { type: nmos, d: a, g: a, s: vss, w: 2u, l: 1u }\n      M2: { type: nmos, d: o, g: a, s: vss, w: 2u, l: 1u }\n    currents:\n      I: { from: vdd, to: a, i: 10u }\n    input: { source: I }\n    output: { node: o, v: 0.9 }\n    filter: { r: 1M, c: 10p }\n`;
    const f = parseSpec(text, 'a.bias.yaml').findings.find((x) => x.code === 'unknown-key');
    expect(f?.message).toMatch(/`filter` applies to template kinds/);
    expect(textOf(text, f!.range)).toBe('filter');
  });
});
