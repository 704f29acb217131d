/**
 * Elaboration: every default filled (src/core/defaults.ts, design §2/§3), banks, netlists,
 * corners, auto sizes, and the shipped example reads clean.
 * Kelvin: T/K = t/°C + 273.15 exactly (SI Brochure 9th ed. §2.3.1); design §3 default tnom 300.15 K.
 */
import { TEMPLATE_KINDS } from '../../src/core/kinds/names';
import { describe, expect, test } from 'vitest';
import { readFileSync } from 'node:fs';
import { parseSpec } from '../../src/core/spec/index';
import { exampleTables } from '../example-tables';
import { DEFAULTS, PROVISIONAL_SIZE } from '../../src/core/defaults';
import type { NetlistMirror, TemplateMirror } from '../../src/core/types';
import { BASE, codes, expectErrorsBlock, marked, withText } from './helpers';

function spec(text: string) {
  const p = parseSpec(text, 't.bias.yaml');
  if (!p.spec) throw new Error(JSON.stringify(p.findings, null, 1));
  return { spec: p.spec, findings: p.findings };
}

function template(text: string, i = 0): TemplateMirror {
  const m = spec(text).spec.mirrors[i];
  if (m.kind === 'netlist') throw new Error('netlist');
  return m;
}

describe('defaults', () => {
  test('process, supplies, limits and device parameters', () => {
    const { spec: s } = spec(BASE);
    expect(s.format).toBe(1);
    expect(s.process.model).toBe('square-law');
    expect(s.process.tnom).toBe(300.15);           // 27 °C, design §3
    expect(s.process.temperature).toBe(300.15);    // default tnom
    expect(s.supplies).toEqual({ vdd: 1.8, vss: 0 });
    expect(s.limits).toEqual({ margin: 0.1, error: 0.01, sourceHeadroom: 0.2, tolerance: 0.05 });
    expect(s.process.nmos).toEqual({ kp: 280e-6, vt0: 0.45, ...DEFAULTS.device });
    expect(s.process.pmos.vt0).toBe(0.48);
    expect(s.corners).toEqual([]);
    expect(s.params).toEqual({});
  });

  test('a simple mirror: unit size for every role, m 1, bulk rail, one output named like the mirror', () => {
    const m = template(BASE);
    expect(m).toMatchObject({ kind: 'simple', name: 'm1', type: 'nmos', input: { kind: 'current', i: 1e-5 }, path: ['mirrors', 0] });
    expect(m.devices).toEqual({ ref: { w: 2e-6, l: 1e-6, m: 1, bulk: 'rail' } });
    expect(m.outputs).toEqual([{ name: 'm1', devices: { out: { w: 2e-6, l: 1e-6, m: 1, bulk: 'rail' } }, output: { v: 0.9 }, require: {}, path: ['mirrors', 0] }]);
  });

  test('temperatures in °C and K; tnom given, temperature defaults to it', () => {
    const s = spec(withText('process:\n', 'process:\n  tnom: 25 C\n')).spec;
    expect(s.process.tnom).toBe(298.15);
    expect(s.process.temperature).toBe(298.15);
    const s2 = spec(withText('process:\n', 'process:\n  temperature: 400 K\n  model: ekv\n  grid: 10n\n')).spec;
    expect(s2.process).toMatchObject({ tnom: 300.15, temperature: 400, model: 'ekv', grid: 1e-8 });
  });

  test('pmos negative vt0 is taken as its magnitude, with a warning', () => {
    const { spec: s, findings } = spec(withText('vt0: 0.48', 'vt0: -0.48'));
    expect(s.process.pmos.vt0).toBe(0.48);
    expect(codes(findings)).toEqual(['negative-pmos-vt0']);
  });

  test('per-role overrides, resistor input, params and expressions', () => {
    const text = withText('format: 1\n', 'format: 1\nparams: { wu: 2u, lu: "wu/2" }\n',
      withText('    size: { w: 2u, l: 1u }', '    size: { w: wu, l: lu }\n    devices: { out: { w: 2*wu, m: 3, bulk: source } }',
        withText('input: 10u', 'input: { resistor: 120k }')));
    const m = template(text);
    expect(m.input).toEqual({ kind: 'resistor', r: 120e3 });
    expect(m.devices.ref).toEqual({ w: 2e-6, l: 1e-6, m: 1, bulk: 'rail' });
    expect(m.outputs[0].devices.out).toEqual({ w: 4e-6, l: 1e-6, m: 3, bulk: 'source' });
    expect(spec(text).spec.params).toEqual({ wu: 2e-6, lu: 1e-6 });
  });

  test('require and output range', () => {
    const m = template(withText('output: { v: 0.9 }', 'output: { v: 900m, range: [0.5, 1.6] }\n    require: { ratio: 4, rout: 20M, compliance: 0.6, sigma: 0.3% }'));
    expect(m.outputs[0].output).toEqual({ v: 0.9, range: [0.5, 1.6] });
    expect(m.outputs[0].require).toEqual({ ratio: 4, rout: 2e7, compliance: 0.6, sigma: 0.003 });
  });

  test('wide-swing keeps vbias; absent it stays undefined for the engine to pick', () => {
    const ws = withText('kind: simple', 'kind: wide-swing');
    expect(template(ws).vbias).toBeUndefined();
    expect(template(withText('    output:', '    vbias: 0.9\n    output:', ws)).vbias).toBe(0.9);
    expect(Object.keys(template(ws).devices).sort()).toEqual(['ref', 'refc']);
    expect(Object.keys(template(ws).outputs[0].devices).sort()).toEqual(['out', 'outc']);
  });

  test('wilson roles: in and diode form the reference, out is the output; balanced adds bal', () => {
    const w = template(withText('kind: simple', 'kind: wilson'));
    expect(Object.keys(w.devices).sort()).toEqual(['diode', 'in']);
    const b = template(withText('kind: simple', 'kind: wilson-balanced'));
    expect(Object.keys(b.devices).sort()).toEqual(['bal', 'diode', 'in']);
    expect(Object.keys(b.outputs[0].devices)).toEqual(['out']);
  });
});

describe('auto sizes with a design target', () => {
  test('size: auto → provisional l = lref or 1 µm, w = 10·l (at least wmin), flags set', () => {
    const m = template(withText('    size: { w: 2u, l: 1u }', '    size: auto\n    design: { vov: 0.2 }'));
    expect(m.design).toEqual({ kind: 'vov', value: 0.2 });
    expect(m.devices.ref).toEqual({ w: PROVISIONAL_SIZE.wOverL * 1e-6, l: 1e-6, m: 1, bulk: 'rail', auto: { w: true, l: true } });
  });

  test('w: auto with a given l, lref and wmin from the process', () => {
    const text = withText('  nmos: { kp: 280u, vt0: 0.45 }', '  nmos: { kp: 280u, vt0: 0.45, lref: 0.5u, wmin: 8u }',
      withText('    size: { w: 2u, l: 1u }', '    size: { w: auto, l: 0.5u }\n    design: { gmid: 12 }'));
    const m = template(text);
    expect(m.design).toEqual({ kind: 'gmid', value: 12 });
    expect(m.devices.ref).toEqual({ w: 8e-6, l: 0.5e-6, m: 1, bulk: 'rail', auto: { w: true } });
  });

  test('l: auto on one role only', () => {
    const m = template(withText('    size: { w: 2u, l: 1u }', '    size: { w: 2u, l: 1u }\n    devices: { out: { l: auto } }\n    design: { ic: 5 }'));
    expect(m.devices.ref.auto).toBeUndefined();
    expect(m.outputs[0].devices.out).toEqual({ w: 2e-6, l: 1e-6, m: 1, bulk: 'rail', auto: { l: true } });
    expect(m.design).toEqual({ kind: 'ic', value: 5 });
  });
});

describe('bias banks', () => {
  const bank = withText('kind: simple', 'kind: cascode', withText('    output: { v: 0.9 }\n', [
    '    devices: { outc: { l: 2u } }',
    '    output: { v: 0.9, range: [0.8, 1.5] }',
    '    require: { rout: 10M }',
    '    outputs:',
    '      - name: lna',
    '        devices: { out: { m: 4 }, outc: { m: 4 } }',
    '        require: { ratio: 4 }',
    '      - name: mix',
    '        output: { v: 1.1 }',
    '',
  ].join('\n')));

  test('each output inherits size, then mirror-level devices, then its own', () => {
    const m = template(bank);
    expect(m.devices).toEqual({ ref: { w: 2e-6, l: 1e-6, m: 1, bulk: 'rail' }, refc: { w: 2e-6, l: 1e-6, m: 1, bulk: 'rail' } });
    expect(m.outputs.map((o) => o.name)).toEqual(['lna', 'mix']);
    expect(m.outputs[0].devices).toEqual({ out: { w: 2e-6, l: 1e-6, m: 4, bulk: 'rail' }, outc: { w: 2e-6, l: 2e-6, m: 4, bulk: 'rail' } });
    expect(m.outputs[1].devices.outc).toEqual({ w: 2e-6, l: 2e-6, m: 1, bulk: 'rail' });
    expect(m.outputs[0].output).toEqual({ v: 0.9, range: [0.8, 1.5] });
    expect(m.outputs[1].output).toEqual({ v: 1.1, range: [0.8, 1.5] });
    expect(m.outputs[0].require).toEqual({ rout: 1e7, ratio: 4 });
    expect(m.outputs[1].require).toEqual({ rout: 1e7 });
    expect(m.outputs[0].path).toEqual(['mirrors', 0, 'outputs', 0]);
  });

  test('duplicate output names and reference roles inside an output are findings', () => {
    const dup = parseSpec(withText('name: mix', 'name: lna', bank));
    expect(codes(dup.findings)).toEqual(['duplicate-name']);
    expect(dup.findings[0].range.start.line).toBe(18);
    const shared = parseSpec(withText('devices: { out: { m: 4 }, outc: { m: 4 } }', 'devices: { ref: { m: 4 } }', bank));
    expect(codes(shared.findings)).toEqual(['unknown-role']);
    expect(shared.findings[0].message).toContain('shared reference');
  });
});

describe('netlist mirrors', () => {
  const net = withText([
    '  - name: m1', '    kind: simple', '    type: nmos', '    input: 10u', '    size: { w: 2u, l: 1u }', '    output: { v: 0.9 }', ''].join('\n'), [
    '  - name: n1',
    '    kind: netlist',
    '    devices:',
    '      M1: { type: nmos, d: nin, g: nin, s: 0, w: 2u, l: 1u }',
    '      M2: { type: nmos, d: out, g: nin, s: GND, b: vss, w: 4u, l: 1u, m: 2 }',
    '    currents: { IREF: { from: VDD, to: nin, i: 10u } }',
    '    resistors: { RL: { a: vdd, b: out, r: 50k } }',
    '    output: { node: out, v: 0.8 }',
    '    input: { source: IREF }',
    '    pair: { ref: M1, out: M2 }',
    '    require: { ratio: 4 }',
    ''].join('\n'));

  test('devices, sources, rails normalised, type from the devices', () => {
    const m = spec(net).spec.mirrors[0] as NetlistMirror;
    expect(m.kind).toBe('netlist');
    expect(m.type).toBe('nmos');
    expect(m.devices).toEqual([
      { name: 'M1', type: 'nmos', d: 'nin', g: 'nin', s: 'vss', b: 'vss', w: 2e-6, l: 1e-6, m: 1 },
      { name: 'M2', type: 'nmos', d: 'out', g: 'nin', s: 'vss', b: 'vss', w: 4e-6, l: 1e-6, m: 2 },
    ]);
    expect(m.currents).toEqual([{ name: 'IREF', from: 'vdd', to: 'nin', i: 1e-5 }]);
    expect(m.resistors).toEqual([{ name: 'RL', a: 'vdd', b: 'out', r: 5e4 }]);
    expect(m.voltages).toEqual([]);
    expect(m.output).toEqual({ node: 'out', v: 0.8 });
    expect(m.input).toEqual({ source: 'IREF' });
    expect(m.pair).toEqual({ ref: 'M1', out: 'M2' });
    expect(m.require).toEqual({ ratio: 4 });
  });

  test.each<[string, string, string, number]>([
    // lines: 6 name, 8 devices, 9 M1, 10 M2, 11 currents, 12 resistors, 13 output, 14 input, 15 pair
    ['input: { source: IREF }', 'input: { source: IREFF }', 'unknown-name', 14],
    ['pair: { ref: M1, out: M2 }', 'pair: { ref: M1, out: M3 }', 'unknown-name', 15],
    ['output: { node: out, v: 0.8 }', 'output: { node: vdd, v: 0.8 }', 'bad-value', 13],
    ['output: { node: out, v: 0.8 }', 'output: { node: nowhere, v: 0.8 }', 'bad-value', 13],
    ['RL: {', 'M1: {', 'duplicate-name', 12],
    ['i: 10u', 'i: -10u', 'non-positive', 11],
    ['s: 0, w: 2u', 's: 0, w: 2uA', 'bad-unit', 9],
    ['d: nin, g: nin, s: 0', 'd: "n-in", g: nin, s: 0', 'bad-name', 9],
  ])('%s → %s is %s on line %i', (from, to, code, line) => {
    const p = parseSpec(withText(from, to, net));
    const f = p.findings.find((x) => x.code === code);
    expect(f, JSON.stringify(p.findings)).toBeDefined();
    expect(f!.range.start.line).toBe(line);
    // The netlist is the only mirror: the spec is partial with nothing left to solve.
    expectErrorsBlock(p);
    expect(p.spec?.mirrors ?? []).toEqual([]);
  });

  test('a pair of one device twice is bad-value at its `out` (issue 14)', () => {
    const { text, range } = marked(withText('pair: { ref: M1, out: M2 }', 'pair: { ref: M1, out: ⟦M1⟧ }', net));
    const p = parseSpec(text);
    expect(p.findings.map((f) => [f.code, f.range])).toEqual([['bad-value', range]]);
    expect(p.findings[0].message).toBe('`out` is `M1`, the device already named as `ref`; a pair is two devices: the reference and the output it copies to');
    expectErrorsBlock(p);
  });

  test('a gate-only node floats: an error that sets the mirror aside (no figures, no fixes)', () => {
    const p = parseSpec(withText('d: out, g: nin', 'd: out, g: nbias', net));
    const f = p.findings.find((x) => x.code === 'floating-node');
    expect(f?.severity).toBe('error');
    expect(f?.message).toMatch(/node `nbias` connects to only one terminal, so nothing sets its voltage/);
    expectErrorsBlock(p);
    expect(p.spec?.mirrors ?? []).toEqual([]);
  });
});

describe('corners', () => {
  const text = BASE + [
    'corners:',
    '  ss: { nmos: { vt0: +50m, kp: -10% }, pmos: { vt0: +50m, kp: -10% }, temperature: 125 C, vdd: 1.62 }',
    '  ff: { nmos: { lambda: 10% }, temperature: -40 C, vss: -0.1 }',
    ''].join('\n');

  test('signed values add, percentages scale, temperature and supplies replace', () => {
    const s = spec(text).spec;
    expect(s.corners).toEqual([
      { name: 'ss', nmos: { kp: { scale: -0.1 }, vt0: { add: 0.05 } }, pmos: { kp: { scale: -0.1 }, vt0: { add: 0.05 } }, temperature: 398.15, vdd: 1.62, path: ['corners', 'ss'] },
      { name: 'ff', nmos: { lambda: { scale: 0.1 } }, pmos: {}, temperature: 233.15, vss: -0.1, path: ['corners', 'ff'] },
    ]);
  });

  test('a corner that makes kp non-positive, or changes a parameter the process lacks, is a finding', () => {
    const bad = parseSpec(withText('nmos: { vt0: +50m, kp: -10% }', 'nmos: { vt0: +50m, kp: -100% }', text));
    expect(codes(bad.findings)).toEqual(['non-positive']);
    expect(bad.findings[0].range.start).toEqual({ line: 13, character: 31 });
    const absent = parseSpec(withText('{ lambda: 10% }', '{ avt: 10% }', text));
    expect(codes(absent.findings)).toEqual(['bad-value']);
    const unit = parseSpec(withText('vt0: +50m, kp: -10% }, pmos', 'vt0: +50mA, kp: -10% }, pmos', text));
    expect(codes(unit.findings)).toEqual(['bad-unit']);
  });
});

describe('the shipped example', () => {
  test('examples/sensor-afe.bias.yaml reads with no findings and every kind', () => {
    const text = readFileSync(new URL('../../examples/sensor-afe.bias.yaml', import.meta.url), 'utf8');
    const p = parseSpec(text, 'sensor-afe.bias.yaml', { tables: exampleTables() });
    expect(p.findings).toEqual([]);
    const kinds = p.spec!.mirrors.map((m) => m.kind);
    expect(new Set(kinds)).toEqual(new Set([...TEMPLATE_KINDS, 'netlist']));
    const bank = p.spec!.mirrors.find((m) => m.name === 'tail') as TemplateMirror;
    expect(bank.outputs).toHaveLength(3);
    expect(p.spec!.process.nmos.avt).toBeCloseTo(4e-9, 20);
    expect(p.spec!.process.nmos.abeta).toBeCloseTo(1e-8, 20);
    expect(p.spec!.corners.map((c) => c.name)).toEqual(['ss', 'ff']);
  });
});
