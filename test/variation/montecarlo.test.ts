import { describe, expect, it } from 'vitest';
import { measureMirror } from '../../src/core/analysis/index';
import { histogram, runMonteCarlo } from '../../src/core/variation/montecarlo';
import { everyKind, makeSpec, mirror, netlistMirror, sz } from './builders';

const N = 20_000;

describe('Monte Carlo against the linearized Pelgrom sigma', () => {
  for (const type of ['nmos', 'pmos', 'netlist'] as const) {
    const spec = makeSpec(type === 'netlist' ? [netlistMirror()] : everyKind(type));
    spec.mirrors.forEach((m) => {
      it(`${type} ${m.kind}: sigma within 5 %, mean within 0.5 % at N = ${N}`, () => {
        // Design §4: sigma = sqrt(Σ S_VT²σ_VT² + S_β²σ_β²), σ per device = A/√(2·m·W·L)
        // (Pelgrom, Duinmaijer & Welbers, IEEE JSSC 1989; per-device ÷√2 per references §7).
        // For mismatch this small the current is linear in the deviations, so the sampled
        // spread must reproduce it: the standard error of a sampled σ is σ/√(2N) = 0.5 %.
        const ctx = { spec, mirror: m, outputIndex: 0 };
        const nom = measureMirror(ctx);
        const mc = runMonteCarlo(ctx, N, 11);
        expect(nom.sigma).toBeGreaterThan(1e-3);
        expect(mc.failed).toBeUndefined();
        expect(Math.abs(mc.sigma / nom.sigma! - 1)).toBeLessThan(0.05);
        expect(Math.abs(mc.mean / nom.iout - 1)).toBeLessThan(0.005);
        expect(mc.min).toBeLessThan(mc.mean);
        expect(mc.max).toBeGreaterThan(mc.mean);
        const h = mc.histogram!;
        expect(h.counts.reduce((a, b) => a + b, 0)).toBe(N);
        expect(h.edges.length).toBe(h.counts.length + 1);
        expect(h.edges[0]).toBe(mc.min);
        expect(h.edges[h.edges.length - 1]).toBe(mc.max);
      });
    });
  }
});

describe('bias banks', () => {
  it('each output of a bank is sampled on its own and matches its linearized sigma', () => {
    // Outputs with m = 1 and m = 4: Pelgrom σ ∝ 1/√(m·W·L) for the output's own devices, so the
    // two outputs' spreads differ, and each must still match its own linearization.
    const bank = mirror('cascode', {
      name: 'bank', vout: 0, size: sz(10e-6, 1e-6),
      outputs: [{ name: 'a', v: 2.0 }, { name: 'b', v: 2.4, devices: { out: { m: 4 }, outc: { m: 4 } } }],
    });
    const spec = makeSpec([bank]);
    const sig: number[] = [];
    for (const j of [0, 1]) {
      const ctx = { spec, mirror: spec.mirrors[0]!, outputIndex: j };
      const lin = measureMirror(ctx).sigma!;
      const mc = runMonteCarlo(ctx, N, 21 + j);
      expect(Math.abs(mc.sigma / lin - 1)).toBeLessThan(0.05);
      sig.push(lin);
    }
    expect(sig[1]!).toBeLessThan(sig[0]!);
  });
});

describe('reproducibility', () => {
  const spec = makeSpec(everyKind('nmos'));
  const ctx = { spec, mirror: spec.mirrors[1]!, outputIndex: 0 };
  it('the same seed gives identical numbers', () => {
    expect(runMonteCarlo(ctx, 500, 7)).toEqual(runMonteCarlo(ctx, 500, 7));
  });
  it('a different seed gives different numbers', () => {
    const a = runMonteCarlo(ctx, 500, 7), b = runMonteCarlo(ctx, 500, 8);
    expect(a.mean).not.toBe(b.mean);
    expect(a.sigma).not.toBe(b.sigma);
    expect(a.histogram!.counts).not.toEqual(b.histogram!.counts);
  });
});

describe('yield', () => {
  /** Standard normal CDF (Abramowitz & Stegun 7.1.26 erf, |ε| < 1.5e-7). */
  function phi(x: number): number {
    const z = Math.abs(x) / Math.SQRT2;
    const t = 1 / (1 + 0.3275911 * z);
    const y = 1 - (((((1.061405429 * t - 1.453152027) * t) + 1.421413741) * t - 0.284496736) * t + 0.254829592) * t * Math.exp(-z * z);
    return x >= 0 ? 0.5 * (1 + y) : 0.5 * (1 - y);
  }

  it('equals the normal probability of the ratio landing within limits.tolerance', () => {
    // A cascode with tiny devices (large sigma) and negligible systematic error: the fraction
    // within ±1 % is P(|Z| ≤ (0.01 − e)/σ…) for a normal ratio error of spread σ (the ratio's
    // σ equals iout's here: the input current is ideal).
    const base = makeSpec([mirror('cascode', { vout: 2.2, size: sz(8e-6, 2e-6), input: 10e-6, require: { ratio: 1 } })]);
    const spec = { ...base, limits: { ...base.limits, tolerance: 0.01 } };
    const ctx = { spec, mirror: spec.mirrors[0]!, outputIndex: 0 };
    const nom = measureMirror(ctx);
    const e = nom.ratio! - 1;
    const s = nom.sigma!;
    const expected = phi((0.01 - e) / s) - phi((-0.01 - e) / s);
    const mc = runMonteCarlo(ctx, N, 3);
    // Binomial standard error √(p(1−p)/N) ≈ 0.0035; allow 4 of them plus the 5 % sigma agreement.
    expect(expected).toBeGreaterThan(0.3);
    expect(expected).toBeLessThan(0.9);
    expect(Math.abs(mc.yield - expected)).toBeLessThan(0.03);
  });

  it('drops to 0 when the compliance requirement cannot be met by any sample', () => {
    // Cascode compliance is VT + 2·VOV ≈ 1.0 V here (Johns & Martin, from memory): no sample
    // keeps every device saturated with the output at 0.4 V. Large devices (σ ≈ 0.1 %) keep the
    // ratio check out of the way.
    const big = sz(200e-6, 20e-6);
    const spec = makeSpec([mirror('cascode', { vout: 2.2, size: big, require: { compliance: 0.4 } })]);
    const mc = runMonteCarlo({ spec, mirror: spec.mirrors[0]!, outputIndex: 0 }, 200, 1);
    expect(mc.yield).toBe(0);
    const ok = makeSpec([mirror('cascode', { vout: 2.2, size: big, require: { compliance: 1.6 } })]);
    expect(runMonteCarlo({ spec: ok, mirror: ok.mirrors[0]!, outputIndex: 0 }, 200, 1).yield).toBe(1);
  });
});

describe('histogram', () => {
  it('bins uniformly and keeps the maximum in the last bin', () => {
    const h = histogram([0, 1, 2, 3, 4, 5, 6, 7, 8, 9, 10], 0, 10, 5);
    expect(h.edges).toEqual([0, 2, 4, 6, 8, 10]);
    expect(h.counts).toEqual([2, 2, 2, 2, 3]);
  });
  it('gives a single population of equal values one increasing set of edges', () => {
    const h = histogram([5e-6, 5e-6], 5e-6, 5e-6, 4);
    expect(h.counts.reduce((a, b) => a + b, 0)).toBe(2);
    for (let k = 1; k < h.edges.length; k++) expect(h.edges[k]!).toBeGreaterThan(h.edges[k - 1]!);
  });
});
