/**
 * Self-biased references (design §9.2) through the solver from a spec: the beta multiplier's
 * current, gm and loop gain against the square-law closed forms, the body effect on its
 * degenerated device, the VGS-over-resistor cell, and the start-up check on reference kinds and
 * netlists (docs/references.md §11).
 */
import { describe, expect, it } from 'vitest';
import { analyzeText } from '../../src/core/analyze';
import { applyEdits } from '../../src/core/text/edits';
import type { FileReport, MirrorReport } from '../../src/core/types';

const rel = (a: number, b: number): number => Math.abs(a / b - 1);

/** NMOS set D (k′ 134 µA/V², VT0 0.7 V, 2φF 0.9 V) and the PMOS set (38 µA/V², |VT0| 0.8 V,
 *  γ 0.4, 2φF 0.8 V): Razavi, Design of Analog CMOS Integrated Circuits, 1st ed., Table 2.1 (from
 *  memory, references §2); temperature 300 K = tnom. */
function spec(mirror: string, o: { gn?: number; ln?: number; lp?: number; vdd?: number } = {}): string {
  return `format: 1
process:
  tnom: 300 K
  nmos: { kp: 134u, vt0: 0.7, lambda: ${o.ln ?? 0}, gamma: ${o.gn ?? 0}, phi: 0.9 }
  pmos: { kp: 38u, vt0: 0.8, lambda: ${o.lp ?? 0}, gamma: 0.4, phi: 0.8 }
supplies: { vdd: ${o.vdd ?? 3} }
mirrors:
${mirror}`;
}

/** The beta multiplier of references §11: ref W/L 10, wide K·10, top/topd W/L 20, RS; a tap `out`
 *  equal to ref at Vout 1.5 V. */
const beta = (o: { k?: number; r?: string; startup?: string } = {}): string => `  - name: bm
    kind: beta-multiplier
    type: nmos
    size: { w: 10u, l: 1u }
    k: ${o.k ?? 4}
    resistor: ${o.r ?? '5k'}
    devices: { top: { w: 20u }, topd: { w: 20u } }${o.startup ? `\n    startup: ${o.startup}` : ''}
    output: { v: 1.5 }
`;

function only(text: string): { file: FileReport; m: MirrorReport } {
  const file = analyzeText(text, 'ref.bias.yaml');
  const m = file.mirrors[0];
  if (!m) throw new Error(`no report: ${JSON.stringify(file.findings)}`);
  return { file, m };
}
const codes = (f: FileReport): string[] => f.findings.map((x) => x.code);

describe('beta multiplier, square law, λ = 0, no body effect (references §11)', () => {
  // I = 2/(µCox·(W/L)·R²)·(1 − 1/√K)², gm1 = 2(1 − 1/√K)/R, LG = √K/(2√K − 1): Razavi, Design of
  // Analog CMOS Integrated Circuits, 1st ed., §11.2 (current); gm and LG derived (references §11).
  it.each([
    [4, '5k', 14.925373e-6, 200e-6, 0.666667],
    [4, '10k', 3.731343e-6, 100e-6, 0.666667],
    [2, '5k', 5.121578e-6, 117.157e-6, 0.773459],
    [9, '5k', 26.533997e-6, 266.667e-6, 0.6],
  ])('K = %s, R = %s: I = %s A, gm of ref = %s S, loop gain %s', (k, r, i, gm, lg) => {
    const { m } = only(spec(beta({ k, r })));
    expect(m.converged).toBe(true);
    expect(rel(m.reference!.current, i)).toBeLessThan(1e-5);
    expect(rel(m.iin!, i)).toBeLessThan(1e-5);
    expect(rel(m.devices.find((d) => d.name === 'ref')!.gm, gm)).toBeLessThan(1e-5);
    expect(m.reference!.loopGain!).toBeCloseTo(lg, 5);
    // The tap copies ref 1:1 (λ = 0): its current is the reference current.
    expect(rel(m.iout, i)).toBeLessThan(1e-5);
  });
  it('node voltages of the full netlist check: X 0.849254, Y 2.001815, S 0.074627 V', () => {
    const { m } = only(spec(beta()));
    expect(m.nodes.x).toBeCloseTo(0.849254, 5);
    expect(m.nodes.y).toBeCloseTo(2.001815, 5);
    expect(m.nodes.s).toBeCloseTo(0.074627, 5);
  });
});

describe('beta multiplier with body effect and length modulation (references §11, full netlist check)', () => {
  it('γn 0.45 on wide (bulk at vss) takes the current from 14.93 µA to 9.801119 µA (−34 %)', () => {
    const { m } = only(spec(beta(), { gn: 0.45 }));
    expect(rel(m.reference!.current, 9.801119e-6)).toBeLessThan(1e-5);
    expect(m.nodes.x).toBeCloseTo(0.820948, 5);
    expect(m.nodes.y).toBeCloseTo(2.0394, 4);
  });
  it('λn 0.1, λp 0.2, γn 0.45: 13.808808 µA; at VDD 3.3 V 15.025120 µA', () => {
    expect(rel(only(spec(beta(), { gn: 0.45, ln: 0.1, lp: 0.2 })).m.reference!.current, 13.808808e-6)).toBeLessThan(1e-5);
    expect(rel(only(spec(beta(), { gn: 0.45, ln: 0.1, lp: 0.2, vdd: 3.3 })).m.reference!.current, 15.02512e-6)).toBeLessThan(1e-5);
  });
});

describe('VGS over a resistor (references §11)', () => {
  const vgs = (startup = ''): string => `  - name: vr
    kind: vgs-resistor
    type: nmos
    size: { w: 10u, l: 1u }
    resistor: 50k
    devices: { top: { w: 20u }, topd: { w: 20u } }${startup}
    output: { v: 1.5 }
`;
  // Square law: I·R = VT0 + √(2I/β) with β = 134 µA/V²·10, R = 50 kΩ gives I = 17.204934 µA,
  // VOV 0.160247 V; the loop gain, the follower-and-mirror path over ref's own, is 1/(gm_ref·R) =
  // VOV/(2·I·R) = 0.0931400 (derived, references §11).
  it('I·R = VGS of ref at I: 17.204934 µA, a at 0.860247 V; loop gain 1/(gm_ref·R) = 0.09314', () => {
    const { m } = only(spec(vgs()));
    expect(m.converged).toBe(true);
    expect(rel(m.reference!.current, 17.204934e-6)).toBeLessThan(1e-6);
    expect(m.nodes.a).toBeCloseTo(0.860247, 5);
    expect(m.reference!.loopGain!).toBeCloseTo(0.09314, 5);
    expect(rel(m.iout, 17.204934e-6)).toBeLessThan(1e-6);
  });
  it('without a start-up element: the zero-current state is found, no-startup', () => {
    const { file, m } = only(spec(vgs()));
    expect(m.reference!.startup.zeroState).toBe(true);
    expect(codes(file)).toContain('no-startup');
  });
  it('with one (diode from y into b) at VDD 2.4 V: it conducts at zero current and is off at the operating point', () => {
    const { file, m } = only(spec(vgs('\n    startup: { w: 1u, l: 4u }'), { vdd: 2.4 }));
    expect(m.reference!.startup).toMatchObject({ zeroState: true, element: true, conducts: true });
    expect(m.reference!.startup.current!).toBeLessThan(m.reference!.startup.limit!);
    expect(codes(file).filter((c) => c.startsWith('startup') || c === 'no-startup')).toEqual([]);
  });
});

describe('the start-up check of a beta multiplier (references §11, zero-current state)', () => {
  it('without a start-up element: the zero-current state is consistent, no-startup at the kind', () => {
    const { file, m } = only(spec(beta()));
    expect(m.reference!.startup).toEqual({ zeroState: true, element: false });
    const f = file.findings.find((x) => x.code === 'no-startup')!;
    expect(f.severity).toBe('error');
    expect(f.path).toEqual(['mirrors', 0, 'kind']);
    expect(f.range.start).toEqual({ line: 8, character: 10 });
    // The fix adds one; the zero-current state is then started.
    const fixed = applyEdits(spec(beta()), f.fixes![0]!.edits);
    expect(fixed).toContain('startup:');
    const after = only(fixed);
    expect(after.m.reference!.startup.conducts).toBe(true);
    expect(codes(after.file)).not.toContain('no-startup');
  });
  it('of a mirror with a device flavour: the added start-up device respects the flavour\'s drawn minimum width', () => {
    // The device the fix adds is built from the mirror's flavour (circuit/templates.ts), so its
    // width is at least that flavour's wmin (4 µm here), not a quarter of the unit width (2.5 µm).
    const text = spec(beta()).replace('process:\n', 'process:\n  devices: { thick: { type: nmos, kp: 134u, vt0: 0.7, phi: 0.9, wmin: 4u } }\n')
      .replace('    type: nmos\n', '    type: nmos\n    device: thick\n');
    const f = analyzeText(text, 'ref.bias.yaml').findings.find((x) => x.code === 'no-startup')!;
    expect(f.fixes![0]!.title).toBe('Add a start-up device (W 4 µm, L 4 µm)');
    const after = only(applyEdits(text, f.fixes![0]!.edits));
    expect(after.m.reference!.startup.conducts).toBe(true);
    expect(codes(after.file)).not.toContain('no-startup');
  });
  it('with one at VDD 2.4 V: conducts in the zero-current state, off at the operating point, no finding', () => {
    const { file, m } = only(spec(beta({ startup: '{ w: 1u, l: 4u }' }), { vdd: 2.4 }));
    expect(m.reference!.startup).toMatchObject({ zeroState: true, element: true, conducts: true });
    expect(m.reference!.startup.current!).toBeLessThan(m.reference!.startup.limit!);
    // Off: the current stays the textbook 14.925373 µA (square law, λ = 0, no body effect).
    expect(rel(m.reference!.current, 14.925373e-6)).toBeLessThan(1e-5);
    expect(codes(file)).not.toContain('no-startup');
    expect(codes(file)).not.toContain('startup-leak');
  });
  it('at VDD 3 V the same device stays on (VDD − VSG − VGS > VT): startup-leak, fixed by a longer device', () => {
    const text = spec(beta({ startup: '{ w: 1u, l: 4u }' }));
    const { file, m } = only(text);
    const s = m.reference!.startup;
    expect(s.current!).toBeGreaterThan(s.limit!);
    const f = file.findings.find((x) => x.code === 'startup-leak')!;
    expect(f.severity).toBe('warning');
    expect(f.path).toEqual(['mirrors', 0, 'startup', 'l']);
    const fix = f.fixes![0]!;
    const fixed = applyEdits(text, fix.edits);
    expect(codes(analyzeText(fixed, 'ref.bias.yaml'))).not.toContain('startup-leak');
  });
});

describe('the start-up check of a netlist beta multiplier (design §14; references §11)', () => {
  /** The full netlist check of references §11 (no `input`: self-biased). */
  const net = (startup = ''): string => `  - name: bmn
    kind: netlist
    type: nmos
    devices:
      m1: { type: nmos, d: x, g: x, s: 0, w: 10u, l: 1u }
      m2: { type: nmos, d: y, g: x, s: s, w: 40u, l: 1u }
      m3: { type: pmos, d: x, g: y, s: vdd, w: 20u, l: 1u }
      m4: { type: pmos, d: y, g: y, s: vdd, w: 20u, l: 1u }
      mo: { type: nmos, d: out, g: x, s: 0, w: 10u, l: 1u }
    resistors:
      rs: { a: s, b: 0, r: 5k }${startup}
    output: { node: out, v: 1.5 }
`;
  it('without a start-up device: the zero-current state is found, no-startup; iin, ratio and error are absent', () => {
    const { file, m } = only(spec(net(), { gn: 0.45, ln: 0.1, lp: 0.2 }));
    expect(m.converged).toBe(true);
    expect(m.reference!.startup).toEqual({ zeroState: true, element: false });
    expect(codes(file)).toContain('no-startup');
    expect(m.iin).toBeUndefined();
    expect(m.ratio).toBeUndefined();
    expect(m.error).toBeUndefined();
    // The operating point is the full netlist check's: S = 0.069044 V, I(rs) = 13.808808 µA.
    expect(m.nodes.s).toBeCloseTo(0.069044, 5);
  });
  it('with a start-up device (diode from y into x) at VDD 2.4 V: accepted', () => {
    const { file, m } = only(spec(net('\n    startup:\n      ms: { type: nmos, d: y, g: y, s: x, w: 1u, l: 4u }'), { vdd: 2.4 }));
    expect(m.reference!.startup).toMatchObject({ zeroState: true, element: true, conducts: true });
    expect(m.reference!.startup.current!).toBeLessThan(m.reference!.startup.limit!);
    expect(codes(file).filter((c) => c.startsWith('startup') || c === 'no-startup')).toEqual([]);
  });
  it('a start-up device that cannot conduct at zero current (gate on the rail it sits on): startup-inactive', () => {
    const { file } = only(spec(net('\n    startup:\n      ms: { type: nmos, d: y, g: 0, s: x, w: 1u, l: 4u }'), { vdd: 2.4 }));
    expect(codes(file)).toContain('startup-inactive');
  });
  it('a netlist fed by an input current has no zero-current state to test', () => {
    const text = spec(`  - name: simple
    kind: netlist
    devices:
      m1: { type: nmos, d: a, g: a, s: 0, w: 10u, l: 1u }
      m2: { type: nmos, d: out, g: a, s: 0, w: 10u, l: 1u }
    currents:
      iin: { from: vdd, to: a, i: 10u }
    input: { source: iin }
    output: { node: out, v: 1.5 }
`);
    const { file, m } = only(text);
    expect(m.reference).toBeUndefined();
    expect(codes(file)).not.toContain('no-startup');
  });
});
