/**
 * Random mismatch (references §7): Pelgrom, Duinmaijer & Welbers, IEEE JSSC 24(5), 1989 —
 * σ(ΔVT) = AVT/√(WL), σ(Δβ/β) = Aβ/√(WL) for a pair; Kinget, IEEE JSSC 40(6), 2005 — mirror
 * σ²(ΔI/I) = (gm/ID)²·σ²(ΔVT) + σ²(Δβ/β). Formulas from memory; values computed.
 */
import { describe, expect, it } from 'vitest';
import { measureMirror, solveAt } from '../../src/core/analysis/index';
import { ctxOf, makeSpec, sz, template, type SpecOptions } from './builders';

const AVT = 5e-9;    // 5 mV·µm
const ABETA = 1e-8;  // 1 %·µm
const K = 134e-6;

describe('Pelgrom pair figures through the solver (references §7 computed check)', () => {
  // A 1:1 simple mirror of two 10 µm/1 µm devices is one matched pair: its σ(ΔI/I) is the pair's
  // mismatch as the solver's sensitivities see it. With λ = γ = 0: S_β = ±1 for the two devices,
  // so σ(ΔI/I) = σ(Δβ/β) of the pair; S_VT = ±gm/ID, so σ(ΔI/I)/(gm/ID) = σ(ΔVT) of the pair.
  const flat: Partial<SpecOptions['nmos']> = { lambda: 0, gamma: 0 };
  it('W/L = 10 µm/1 µm: σ(Δβ/β) = 0.3162 % (abeta only)', () => {
    const r = measureMirror(ctxOf(makeSpec([template('simple', { vout: 2 })], { nmos: { ...flat, abeta: ABETA } })));
    expect(r.sigma! * 100).toBeCloseTo(0.3162, 4);
  });
  it('W/L = 10 µm/1 µm: σ(ΔVT) = 1.5811 mV (avt only, over the solver\'s gm/ID)', () => {
    const r = measureMirror(ctxOf(makeSpec([template('simple', { vout: 2 })], { nmos: { ...flat, avt: AVT } })));
    expect((r.sigma! / r.devices[1]!.gmId!) * 1e3).toBeCloseTo(1.5811, 4);
  });
});

describe('simple-mirror sigma equals Kinget\'s pair formula (two devices, each 1/√2 of the pair)', () => {
  const s: SpecOptions = { nmos: { lambda: 0, gamma: 0, avt: AVT, abeta: ABETA } };
  it.each([[5, 0.8515], [10, 1.6125], [20, 3.1780], [25, 3.9655]])('gm/ID = %s V⁻¹ → σ(ΔI/I) = %s %%', (gmid, pct) => {
    // Square law: gm/ID = 2/VOV, so pick the input current that sets VOV = 2/(gm/ID).
    const vov = 2 / gmid;
    const i = ((K * 10) / 2) * vov * vov;
    const r = measureMirror(ctxOf(makeSpec([template('simple', { input: i, vout: 2 })], s)));
    expect(r.devices[1]!.gmId).toBeCloseTo(gmid, 6);
    expect(r.sigma! * 100).toBeCloseTo(pct, 3);
  });
  it('is absent when the process gives neither coefficient', () => {
    const r = measureMirror(ctxOf(makeSpec([template('simple', { vout: 2 })])));
    expect(r.sigma).toBeUndefined();
  });
  it('scales as 1/√(area) at constant W/L (Pelgrom)', () => {
    const a = measureMirror(ctxOf(makeSpec([template('simple', { vout: 2 })], s)));
    const b = measureMirror(ctxOf(makeSpec([template('simple', { vout: 2, size: sz(20e-6, 2e-6) })], s)));
    expect(a.sigma! / b.sigma!).toBeCloseTo(2, 6);
  });
  it('threshold-only: σ = (gm/ID)·σ(ΔVT) when abeta is absent', () => {
    const r = measureMirror(ctxOf(makeSpec([template('simple', { vout: 2 })], { nmos: { lambda: 0, avt: AVT } })));
    const gmid = r.devices[1]!.gmId;
    expect(r.sigma!).toBeCloseTo(gmid! * (AVT / Math.sqrt(10e-12)), 9);
  });
});

describe('sensitivities are the linearized response (perturbed re-solve)', () => {
  it('ΔVT on out: iout scales as ((VOV − ΔVT)/VOV)² (square law, λ = 0)', () => {
    const spec = makeSpec([template('simple', { vout: 2 })], { nmos: { lambda: 0, gamma: 0 } });
    const ctx = ctxOf(spec);
    const nominal = solveAt(ctx, 2);
    const shifted = solveAt(ctx, 2, { dvt: { out: 1e-3 }, dbeta: {} });
    const vov = nominal.devices[1]!.vov;
    expect(shifted.iout / nominal.iout).toBeCloseTo(((vov! - 1e-3) / vov!) ** 2, 9);
    expect(shifted.devices[1]!.vth).toBeCloseTo(0.701, 12);
  });
  it('Δβ/β on ref: iout scales as 1/(1 + Δβ/β)', () => {
    const spec = makeSpec([template('simple', { vout: 2 })], { nmos: { lambda: 0, gamma: 0 } });
    const ctx = ctxOf(spec);
    const a = solveAt(ctx, 2), b = solveAt(ctx, 2, { dvt: {}, dbeta: { ref: 0.02 } });
    expect(b.iout / a.iout).toBeCloseTo(1 / 1.02, 9);
  });
  it.each(['cascode', 'wide-swing', 'wilson', 'wilson-balanced'] as const)(
    '%s NMOS/PMOS: sigma from the adjoint equals sigma from finite-difference re-solves', (kind) => {
      for (const type of ['nmos', 'pmos'] as const) {
        const coeff = { avt: AVT, abeta: ABETA };
        const spec = makeSpec([template(kind, { type, vout: type === 'nmos' ? 2.5 : 0.8, devices: { out: { m: 2 } } })],
          { nmos: coeff, pmos: coeff });
        const ctx = ctxOf(spec);
        const r = measureMirror(ctx);
        const base = solveAt(ctx, r.vout);
        const h = 1e-6;
        let sum = 0;
        for (const d of r.devices) {
          const root = Math.sqrt(2 * d.m * d.w! * d.l!);
          const up = (p: { dvt: Record<string, number>; dbeta: Record<string, number> }) => solveAt(ctx, r.vout, p).iout;
          const sVt = (up({ dvt: { [d.name]: h }, dbeta: {} }) - up({ dvt: { [d.name]: -h }, dbeta: {} })) / (2 * h) / base.iout;
          const sB = (up({ dvt: {}, dbeta: { [d.name]: h } }) - up({ dvt: {}, dbeta: { [d.name]: -h } })) / (2 * h) / base.iout;
          sum += (sVt * AVT / root) ** 2 + (sB * ABETA / root) ** 2;
        }
        expect(r.sigma! / Math.sqrt(sum)).toBeCloseTo(1, 4);
      }
    });
});
