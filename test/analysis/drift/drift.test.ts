/**
 * Supply sensitivity and temperature coefficient (design §12, §14) against the computed check
 * values of docs/references.md §13, and against independent re-solves of the whole circuit.
 */
import { describe, expect, it } from 'vitest';
import { measureMirror } from '../../../src/core/analysis/index';
import type { MirrorReport, ResolvedSpec } from '../../../src/core/types';
import { ctxOf, makeSpec, netlist, sz, template } from '../builders';

const rel = (a: number, b: number): number => Math.abs(a / b - 1);
const run = (spec: ResolvedSpec): MirrorReport => measureMirror(ctxOf(spec));

/** design.md's example process (references §13 (b)): kp 280 µA/V², vt0 0.45 V, λ 0.08 at 1 µm. */
function exampleSpec(): ResolvedSpec {
  return makeSpec([template('simple', { input: { resistor: 120e3 }, size: sz(2e-6, 1e-6), vout: 0.9 })],
    { nmos: { kp: 280e-6, vt0: 0.45, lambda: 0.08, lref: 1e-6, gamma: 0, tcv: -1e-3, bex: -1.5 }, vdd: 1.8, tnom: 300.15 });
}

/** Set D with λ = 0 (references §13 (a)): 100 µA at W/L = 10 from 3 V through 19.136663 kΩ. */
function setD(tcv: number, bex: number, tc1?: number): ResolvedSpec {
  const spec = makeSpec([template('simple', { input: { resistor: 19136.663 }, size: sz(10e-6, 1e-6), vout: 1.5 })],
    { nmos: { lambda: 0, gamma: 0, tcv, bex }, vdd: 3, tnom: 300.15 });
  const m = spec.mirrors[0]!;
  if (tc1 !== undefined && m.kind !== 'netlist' && m.input.kind === 'resistor') m.input.tc1 = tc1;
  return spec;
}

/** iout re-solved with vdd moved by ±h: the independent figure the linearized one must match. */
function resolvedSupply(spec: ResolvedSpec, h = 1e-4): number {
  const at = (vdd: number): number => run({ ...spec, supplies: { ...spec.supplies, vdd } }).iout;
  const vdd = spec.supplies.vdd;
  return (vdd / run(spec).iout) * (at(vdd + h) - at(vdd - h)) / (2 * h);
}

/** ppm/K from iout re-solved at T ± h. */
function resolvedTc(spec: ResolvedSpec, h = 0.01): number {
  const at = (t: number): number => run({ ...spec, process: { ...spec.process, temperature: t } }).iout;
  const t = spec.process.temperature;
  return ((at(t + h) - at(t - h)) / (2 * h) / run(spec).iout) * 1e6;
}

describe('resistor-referenced simple mirror (references §13 (b), computed)', () => {
  const r = run(exampleSpec());
  it('carries 9.932795 µA from 9.734074 µA', () => {
    expect(rel(r.iin!, 9.734074e-6)).toBeLessThan(1e-6);
    expect(rel(r.iout, 9.932795e-6)).toBeLessThan(1e-6);
  });
  it('has supply sensitivity 1.420527', () => {
    expect(rel(r.supplySensitivity!, 1.420527)).toBeLessThan(1e-5);
  });
  it('has tc +468.748 ppm/K', () => {
    expect(rel(r.tc!, 468.748)).toBeLessThan(1e-5);
  });
});

describe('set D, λ = 0 (references §13 (a), computed)', () => {
  it('S = 1.423938 and tc = +16.446 ppm/K at tcv −1 mV/K, bex −1.5', () => {
    const r = run(setD(-1e-3, -1.5));
    expect(rel(r.iout, 100e-6)).toBeLessThan(1e-6);
    expect(rel(r.supplySensitivity!, 1.423938)).toBeLessThan(1e-5);
    expect(Math.abs(r.tc! - 16.446)).toBeLessThan(5e-3);
  });
  it.each([
    [-2e-3, -1.5, undefined, 491.092],
    [0, -1.5, undefined, -458.2],
    [-1e-3, 0, undefined, 474.646],
    [-1e-3, -1.5, 1000e-6, -891.868],
  ])('tcv %s, bex %s, tc1 %s: tc %s ppm/K', (tcv, bex, tc1, want) => {
    expect(Math.abs(run(setD(tcv, bex, tc1)).tc! - want)).toBeLessThan(5e-3);
  });
});

describe('linearized figures against independent re-solves (agree to 2 %, design §12)', () => {
  const cases: [string, ResolvedSpec][] = [
    ['resistor-fed simple', exampleSpec()],
    ['resistor-fed cascode', makeSpec([template('cascode', { input: { resistor: 20e3 }, vout: 2 })], { nmos: { tcv: -1e-3 }, tnom: 300.15 })],
    ['resistor-fed pmos wilson', makeSpec([template('wilson', { type: 'pmos', input: { resistor: 15e3 }, vout: 1 })], { pmos: { tcv: -1.5e-3 }, tnom: 300.15 })],
    ['current-fed wide-swing', makeSpec([template('wide-swing', { input: 50e-6, vout: 1.5 })], { nmos: { tcv: -1e-3 }, tnom: 300.15 })],
    ['netlist with a resistor to vdd', makeSpec([netlist({
      name: 'n', type: 'nmos',
      devices: [
        { name: 'm1', type: 'nmos', d: 'x', g: 'x', s: 'vss', b: 'vss', w: 10e-6, l: 1e-6, m: 1 },
        { name: 'm2', type: 'nmos', d: 'out', g: 'x', s: 'vss', b: 'vss', w: 20e-6, l: 1e-6, m: 1 },
      ],
      currents: [{ name: 'i0', from: 'vdd', to: 'x', i: 10e-6 }],
      resistors: [{ name: 'r1', a: 'vdd', b: 'x', r: 30e3, tc1: 2e-3 }],
      output: { node: 'out', v: 1.2 }, input: { source: 'i0' },
    })], { nmos: { tcv: -1e-3 }, tnom: 300.15 })],
  ];
  it.each(cases)('%s', (_, spec) => {
    const r = run(spec);
    expect(r.converged).toBe(true);
    const s = resolvedSupply(spec);
    expect(Math.abs(r.supplySensitivity! - s)).toBeLessThan(0.02 * Math.abs(s) + 1e-6);
    const tc = resolvedTc(spec);
    expect(Math.abs(r.tc! - tc)).toBeLessThan(0.02 * Math.abs(tc) + 0.05);
  });
});

describe('tcBox over process.trange', () => {
  it('is the spread of the re-solved drift curve, close to |tc| for a nearly linear drift', () => {
    const spec = exampleSpec();
    spec.process.trange = [273.15 - 40, 273.15 + 125];
    const r = measureMirror(ctxOf(spec), { curve: true });
    expect(run(spec).tcBox).toBe(r.tcBox);   // the box figure without the curve in the report
    expect(r.drift).toHaveLength(11);
    expect(r.drift!.every((p) => p.converged)).toBe(true);
    const ends = r.drift![10]!.iout - r.drift![0]!.iout;
    // Monotone drift: the box figure is the end-to-end change (design §12).
    expect(rel(r.tcBox!, (ends / r.iout / 165) * 1e6)).toBeLessThan(1e-9);
    expect(rel(r.tcBox!, r.tc!)).toBeLessThan(0.1);
  });
});

describe('beta multiplier (references §13, Baker: TC = −2·TCR − bex/T)', () => {
  /** The constant-gm cell as a netlist: M1 diode at x, M2 (K = 4) with RS in its source and its
   *  bulk on its source, a 1:1 PMOS mirror closing the loop, M5 copying the current out. λ = 0.
   *  The 1 nA source into x only starts the loop (it is 1e-4 of the cell's current). */
  function beta(tcr: number): ResolvedSpec {
    return makeSpec([netlist({
      name: 'bmr', type: 'pmos',
      devices: [
        { name: 'm1', type: 'nmos', d: 'x', g: 'x', s: 'vss', b: 'vss', w: 10e-6, l: 1e-6, m: 1 },
        { name: 'm2', type: 'nmos', d: 'y', g: 'x', s: 's', b: 's', w: 40e-6, l: 1e-6, m: 1 },
        { name: 'm3', type: 'pmos', d: 'x', g: 'y', s: 'vdd', b: 'vdd', w: 20e-6, l: 1e-6, m: 1 },
        { name: 'm4', type: 'pmos', d: 'y', g: 'y', s: 'vdd', b: 'vdd', w: 20e-6, l: 1e-6, m: 1 },
        { name: 'm5', type: 'pmos', d: 'out', g: 'y', s: 'vdd', b: 'vdd', w: 20e-6, l: 1e-6, m: 1 },
      ],
      currents: [{ name: 'start', from: 'vdd', to: 'x', i: 1e-9 }],
      resistors: [{ name: 'rs', a: 's', b: 'vss', r: 5e3, tc1: tcr }],
      output: { node: 'out', v: 1 }, input: { source: 'start' },
    })], { nmos: { lambda: 0, tcv: -1e-3, bex: -1.5 }, pmos: { lambda: 0, tcv: -1e-3, bex: -1.5 }, vdd: 3, tnom: 300.15 });
  }
  it('TCR 2000 ppm/K, bex −1.5 at 300.15 K: +997.50 ppm/K', () => {
    const r = run(beta(2000e-6));
    expect(r.converged).toBe(true);
    expect(r.iout).toBeGreaterThan(1e-6);
    expect(Math.abs(r.tc! - 997.5)).toBeLessThan(0.02 * 997.5);
  });
  it('TCR 0: +5000 ppm/K (−bex/T)', () => {
    const r = run(beta(0));
    expect(Math.abs(r.tc! - 4997.5)).toBeLessThan(0.02 * 4997.5);
  });
});
