/**
 * The sizing solvers against closed forms of the model they solve (design §3 square law with
 * length modulation, docs/references.md §2: ID = β/2·VOV²·(1+λ·VDS), "M" — Razavi ch. 2 / Sedra &
 * Smith ch. 5 from memory; ro convention (1/λ + VDS)/ID, references §10 item 2; Pelgrom σ ∝
 * 1/√(W·L), Pelgrom, Duinmaijer & Welbers, IEEE JSSC 24(5) 1989). No body effect in these
 * checks: every device has its source on the rail.
 */
import { describe, expect, it } from 'vitest';
import type { ResolvedSpec } from '../../src/core/types';
import { parseSpec } from '../../src/core/spec/index';
import { measure, resized, sameRef, solve } from '../../src/core/sizing/devices';
import { widthForRatio } from '../../src/core/sizing/ratio';
import { areaScaleForSigma, scaleForGoal, scaleMirror } from '../../src/core/sizing/scale';
import { pickedVbias, withVbias } from '../../src/core/sizing/vbias';
import { header } from './helpers';

const KP = 280e-6;
const VT0 = 0.45;
const LAMBDA = 0.08; // at lref = 1 µm, λ(L) = λ·lref/L

function specOf(lines: string[]): ResolvedSpec {
  const p = parseSpec(`${header()}\n${lines.join('\n')}\n`, 's.bias.yaml');
  expect(p.findings.filter((f) => f.severity === 'error')).toEqual([]);
  return p.spec!;
}

/** VGS of a diode-connected square-law device carrying `id` (with its own CLM: VDS = VGS). */
function diodeVgs(id: number, beta: number, lambda: number): number {
  let v = VT0 + Math.sqrt(2 * id / beta);
  for (let i = 0; i < 50; i++) {
    const f = beta / 2 * (v - VT0) ** 2 * (1 + lambda * v) - id;
    const df = beta * (v - VT0) * (1 + lambda * v) + beta / 2 * (v - VT0) ** 2 * lambda;
    v -= f / df;
  }
  return v;
}

const simple = (vout: number, extra: string[] = []) => specOf([
  '  - name: s', '    kind: simple', '    type: nmos', '    input: 10u', '    size: { w: 2u, l: 1u }', `    output: { v: ${vout} }`, ...extra,
]);

describe('widthForRatio (ratio including length modulation)', () => {
  it('simple mirror: W_out = R·W_ref·(1+λ·VGS)/(1+λ·Vout), the square-law ratio solved for W', () => {
    const spec = simple(1.4);
    const out = { mirror: 0, role: 'out', output: 0 };
    const w = widthForRatio(spec, 0, 0, out, 4)!;
    const vgs = diodeVgs(10e-6, KP * 2, LAMBDA);
    const expected = 4 * 2e-6 * (1 + LAMBDA * vgs) / (1 + LAMBDA * 1.4);
    expect(w / expected - 1).toBeCloseTo(0, 4); // gmin (1e-12 S) is the only difference
    // And the engine agrees the ratio is met.
    const op = solve(resized(spec, 0, (r, s) => (sameRef(r, out) ? { ...s, w } : undefined)), 0, 0)!;
    expect(op.iout / op.iin).toBeCloseTo(4, 4);
  });
});

describe('scaleForGoal', () => {
  it('widen for margin: out margin = Vout − VOV with VOV from the diode, k solved in closed form', () => {
    const spec = simple(0.2);
    const target = 0.1;
    const k = scaleForGoal(spec, 0, { w: true, l: false }, (s) => {
      const d = solve(s, 0, 0)?.devices.find((x) => x.name === 'out');
      return d ? d.margin - target : NaN;
    })!;
    // Closed form: VOV* = 0.2 − 0.1; the diode needs β·k with β·k/2·VOV*²·(1+λ·(VT0+VOV*)) = 10 µA.
    const vov = 0.2 - target;
    const kExpected = 10e-6 / (KP * 2 / 2 * vov ** 2 * (1 + LAMBDA * (VT0 + vov)));
    expect(k / kExpected - 1).toBeLessThan(2e-3);       // smallest k, to the search tolerance
    expect(k / kExpected - 1).toBeGreaterThanOrEqual(-1e-6);
  });

  it('lengthen for Rout: rout = (1 + λ′·VDS)/(λ′·ID) with λ′ = λ/k (constant W/L)', () => {
    const spec = simple(0.65, ['    require: { rout: 3M }']);
    const need = 3e6;
    const k = scaleForGoal(spec, 0, { w: true, l: true }, (s) => (measure(s, 0, 0)?.rout ?? NaN) / need - 1)!;
    const r = measure(scaleMirror(spec, 0, k, { w: true, l: true }), 0, 0)!;
    const lam = LAMBDA / k;
    const closed = (1 + lam * 0.65) / (lam * r.iout);
    expect(r.rout / closed - 1).toBeCloseTo(0, 3);
    expect(r.rout).toBeGreaterThanOrEqual(need);
    expect(r.rout / need - 1).toBeLessThan(3e-3);
    // VOV is unchanged at constant W/L (square law: VOV depends on W/L only, up to CLM).
    const before = measure(spec, 0, 0)!;
    expect(r.devices[0].vov).toBeCloseTo(before.devices[0].vov!, 2);
  });
});

describe('areaScaleForSigma (Pelgrom)', () => {
  it('σ ∝ 1/√(W·L): doubling W and L halves sigma (constant λ, so the operating point stays put)', () => {
    const text = ['format: 1', 'process:', '  nmos: { kp: 280u, vt0: 0.45, lambda: 0.08, avt: 4e-9, abeta: 1e-8 }', '  pmos: { kp: 70u, vt0: 0.48 }',
      'supplies: { vdd: 1.8 }', 'mirrors:', '  - name: s', '    kind: simple', '    type: nmos', '    input: 10u', '    size: { w: 2u, l: 1u }', '    output: { v: 0.65 }', ''].join('\n');
    const spec = parseSpec(text, 's.bias.yaml').spec!;
    const s1 = measure(spec, 0, 0)!.sigma!;
    const s2 = measure(scaleMirror(spec, 0, 2, { w: true, l: true }), 0, 0)!.sigma!;
    expect(s1 / s2).toBeCloseTo(2, 6);
    // With λ(L) = λ·lref/L the longer device also has less length modulation: about 1 % more.
    const t1 = measure(simple(0.65), 0, 0)!.sigma!;
    const t2 = measure(scaleMirror(simple(0.65), 0, 2, { w: true, l: true }), 0, 0)!.sigma!;
    expect(t1 / t2).toBeGreaterThan(2);
    expect(t1 / t2).toBeLessThan(2.04);
  });
  it('the computed factor meets the target, within 2 % of the closed form σ/σreq', () => {
    const spec = simple(0.65);
    const sigma = measure(spec, 0, 0)!.sigma!;
    const target = sigma / 3;
    const s = areaScaleForSigma(spec, 0, 0, target)!;
    expect(Math.abs(s / 3 - 1)).toBeLessThan(0.02);
    const after = measure(scaleMirror(spec, 0, s, { w: true, l: true }), 0, 0)!.sigma!;
    expect(after).toBeLessThanOrEqual(target);
    expect(after / target).toBeGreaterThan(0.98); // not oversized
  });
});

describe('pickedVbias', () => {
  it('puts ref at VDS = VDSsat + limits.margin (design §2)', () => {
    const spec = specOf(['  - name: ws', '    kind: wide-swing', '    type: nmos', '    input: 10u', '    size: { w: 2u, l: 1u }', '    vbias: 0.8', '    output: { v: 1.0 }']);
    const v = pickedVbias(spec, 0, 0)!;
    const ref = solve(withVbias(spec, 0, v), 0, 0)!.devices.find((d) => d.name === 'ref')!;
    expect(ref.margin).toBeCloseTo(spec.limits.margin, 3);
    // The written 0.8 V leaves ref in triode.
    expect(solve(spec, 0, 0)!.devices.find((d) => d.name === 'ref')!.region).toBe('triode');
  });
});
