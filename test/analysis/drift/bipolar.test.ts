/**
 * Drift and noise of bipolar mirrors (design §12 on §10): shot noise 2q·IC and 2q·IB per device
 * through the linearized circuit, and the temperature coefficient from the model's IS(T) and
 * βF(T) laws. Check values: docs/references.md §13 (c), computed from the model's own equations
 * (the check device DB of §12 without the Early effect, at 300.15 K).
 */
import { describe, expect, it } from 'vitest';
import { analyzeText } from '../../../src/core/analyze';
import type { MirrorReport } from '../../../src/core/types';

const rel = (a: number, b: number): number => Math.abs(a / b - 1);

function simple(input: string, xtb = 0): MirrorReport {
  const text = [
    'format: 1',
    'process:',
    '  tnom: 27 C',
    `  npn: { is: 1e-16, bf: 100, xtb: ${xtb} }`,
    '  nmos: { kp: 280u, vt0: 0.45 }',
    '  pmos: { kp: 70u, vt0: 0.48 }',
    'supplies: { vdd: 3 }',
    'analysis: { noise: { f: 1k, band: [1, 1M] } }',
    'mirrors:',
    '  - name: q',
    '    kind: simple',
    '    type: npn',
    `    input: ${input}`,
    '    output: { v: 2 }',
    '',
  ].join('\n');
  const r = analyzeText(text, 'q.bias.yaml', { anchors: false, ruleFixes: false, linkFixes: false });
  const m = r.mirrors[0];
  if (!m) throw new Error(r.findings.map((f) => f.message).join('; '));
  return m;
}

describe('bipolar 1:1 mirror, ideal 100 µA input (references §13 (c))', () => {
  const r = simple('100u');
  it('shot noise 2q·IC·2(β + 1)/(β + 2) = 6.221447e-23 A²/Hz, the output device a little over half', () => {
    expect(r.converged).toBe(true);
    expect(rel(r.noise!.density ** 2, 6.221447e-23)).toBeLessThan(1e-5);
    // Shot noise is white: the band integral is the density times the bandwidth, no corner.
    expect(rel(r.noise!.integrated ** 2, 6.221447e-23 * (1e6 - 1))).toBeLessThan(1e-5);
    expect(r.noise!.corner).toBeUndefined();
    // Shares (references §13 (c)): out (β + 4)/(2(β + 2)) = 0.509804 (its collector directly, its
    // base through the diode), ref β/(2(β + 2)) = 0.490196.
    expect(Math.abs(r.noise!.shares.out! - 0.509804)).toBeLessThan(1e-5);
    expect(Math.abs(r.noise!.shares.ref! - 0.490196)).toBeLessThan(1e-5);
  });
  it('tc +97.990 ppm/K at XTB 1.5: 2·XTB/((β + 2)·T), βF(T) alone (IS cancels)', () => {
    expect(Math.abs(simple('100u', 1.5).tc! - 97.990)).toBeLessThan(2e-3);
  });
  it('tc 0 at XTB 0: neither law reaches a 1:1 mirror fed by an ideal current', () => {
    expect(Math.abs(r.tc!)).toBeLessThan(1e-3);
  });
});

describe('bipolar 1:1 mirror fed from 3 V through 22.8 kΩ (references §13 (c))', () => {
  it('IS(T) through VBE: tc +682.245 ppm/K at XTB 0, +779.138 at XTB 1.5', () => {
    const a = simple('{ resistor: 22.8k }'), b = simple('{ resistor: 22.8k }', 1.5);
    expect(rel(a.iout, 98.287430e-6)).toBeLessThan(1e-6);
    expect(Math.abs(a.tc! - 682.245)).toBeLessThan(5e-3);
    expect(Math.abs(b.tc! - 779.138)).toBeLessThan(5e-3);
  });
});
