import { describe, expect, it } from 'vitest';
import { applyDesignTargets } from '../../src/core/design/auto-size';
import { runCorners } from '../../src/core/variation/corners';
import { runMonteCarlo } from '../../src/core/variation/montecarlo';
import { makeSpec, mirror, sz } from './builders';

/** A cascode whose 1 A input no device of this size can carry (VGS would be hundreds of volts). */
const impossible = () => makeSpec([mirror('cascode', { vout: 2.2, input: 1, size: sz(1e-6, 10e-6) })],
  { corners: [{ name: 'lowvdd', path: ['corners', 'lowvdd'], nmos: {}, pmos: {}, vdd: 0.5 }] });

describe('bad input never throws and stays bounded', () => {
  it('Monte Carlo with zero, negative or fractional sample counts and odd seeds', () => {
    const spec = makeSpec([mirror('simple', { vout: 1.2 })]);
    const ctx = { spec, mirror: spec.mirrors[0]!, outputIndex: 0 };
    expect(runMonteCarlo(ctx, 0, 1).yield).toBe(0);
    expect(runMonteCarlo(ctx, -5, 1).samples).toBe(0);
    expect(runMonteCarlo(ctx, 10.7, 1).samples).toBe(10);
    for (const seed of [Number.NaN, Infinity, -3, 2 ** 60, 0.5]) {
      const r = runMonteCarlo(ctx, 50, seed);
      expect(r.samples).toBe(50);
      expect(Number.isFinite(r.mean)).toBe(true);
    }
  });

  it('Monte Carlo without Pelgrom coefficients has no spread', () => {
    const spec = makeSpec([mirror('simple', { vout: 1.2 })], { nmos: { avt: undefined, abeta: undefined } });
    const r = runMonteCarlo({ spec, mirror: spec.mirrors[0]!, outputIndex: 0 }, 100, 1);
    expect(r.sigma).toBe(0);
    expect(r.min).toBe(r.max);
  });

  it('a mirror with no working point: sizing, corners and Monte Carlo report it', () => {
    const spec = impossible();
    const corners = runCorners(spec, 0, 0);
    expect(corners[0]!.converged).toBe(false);
    const mc = runMonteCarlo({ spec, mirror: spec.mirrors[0]!, outputIndex: 0 }, 1000, 1);
    expect(mc.yield).toBe(0);
    expect(mc.failed).toBe(1000);
    // Every solve is bounded by the engine's iteration and time limits (test/circuit/robustness.test.ts);
    // a hang would fail through the test timeout.
  });

  it('an Rout no length can reach ends the search at 1 mm with a note', () => {
    const spec = makeSpec([mirror('cascode', { vout: 2.2, size: sz(10e-6, 1e-6, 1, 'rail', { w: true, l: true }), design: { kind: 'vov', value: 0.2 }, require: { rout: 1e18 } })],
      { nmos: { lref: 1e-6 } });
    const { sized } = applyDesignTargets(spec);
    expect(sized.length).toBe(4);
    for (const s of sized) { expect(s.l).toBe(1e-3); expect(s.note).toMatch(/not reached even at L = 1 mm/); }
  });

  it('a non-positive design target or input current leaves the size as written, with a note', () => {
    for (const [input, value] of [[0, 0.2], [20e-6, -1], [20e-6, 0]] as const) {
      const spec = makeSpec([mirror('simple', { vout: 1.2, input, size: sz(10e-6, 1e-6, 1, 'rail', { w: true }), design: { kind: 'vov', value } })]);
      const { sized } = applyDesignTargets(spec);
      for (const s of sized) { expect(s.w).toBe(10e-6); expect(s.note).toMatch(/cannot be reached/); }
    }
  });
});
