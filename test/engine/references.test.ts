/**
 * Self-biased references (design §9.2) through the solver from a spec: the beta multiplier's
 * current, gm and loop gain against the square-law closed forms, the body effect on its
 * degenerated device, the VGS-over-resistor cell, and the start-up check on reference kinds and
 * netlists (docs/references.md §11).
 */
import { describe, expect, it } from 'vitest';
import { analyzeText } from '../../src/core/analyze';
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
