/**
 * Output current noise (design §12) against the computed check values of docs/references.md
 * §13 (set D: k′ = 134 µA/V², W/L = 10, 100 µA, gm = 517.687 µS, T = 300 K, γ = 2/3).
 */
import { describe, expect, it } from 'vitest';
import { measureMirror } from '../../../src/core/analysis/index';
import { BOLTZMANN } from '../../../src/core/defaults';
import type { MirrorReport, MosDeviceReport, ResolvedSpec, TemplateMirror } from '../../../src/core/types';
import { ctxOf, makeSpec, sz, template } from '../builders';

const rel = (a: number, b: number): number => Math.abs(a / b - 1);
const run = (spec: ResolvedSpec, curve = false): MirrorReport => measureMirror(ctxOf(spec), { curve });
const psd = (r: MirrorReport): number => r.noise!.density ** 2;

/** 1:1 simple mirror of set D at 100 µA, λ = 0, at 300 K; noise read at f. */
function mirrorD(f = 1e3, extra: Partial<TemplateMirror> = {}, flicker = false): ResolvedSpec {
  const spec = makeSpec([{ ...template('simple', { input: 100e-6, size: sz(10e-6, 1e-6), vout: 1.5 }), ...extra }],
    { nmos: { lambda: 0, gamma: 0, ...(flicker ? { kf: 1e-25, cox: 3.836815e-3 } : {}) }, tnom: 300 });
  spec.analysis = { noise: { f, band: [1, 1e6] } };
  return spec;
}

describe('simple 1:1 mirror (references §13)', () => {
  it('thermal output noise 8kTγgm = 1.143591e-23 A²/Hz (both devices, half each)', () => {
    const r = run(mirrorD());
    expect(rel(psd(r), 1.143591e-23)).toBeLessThan(1e-5);
    expect(r.noise!.shares.ref).toBeCloseTo(0.5, 6);
    expect(r.noise!.shares.out).toBeCloseTo(0.5, 6);
    // White noise: the band integral is the density times the bandwidth.
    expect(rel(r.noise!.integrated ** 2, 1.143591e-23 * (1e6 - 1))).toBeLessThan(1e-5);
  });
  it('flicker K = 1e-25 V²F, Cox 3.836815 mF/m²: 1.396992e-21 A²/Hz at 1 kHz on top of the thermal floor, corner 122.158 kHz', () => {
    const r = run(mirrorD(1e3, {}, true));
    expect(rel(psd(r) - 1.143591e-23, 1.396992e-21)).toBeLessThan(1e-4);
    expect(rel(r.noise!.corner!, 122.158e3)).toBeLessThan(1e-4);
  });
  it('a 1:4 mirror carries 4kTγ·gm2·(1 + 4) = 1.143591e-22 A²/Hz', () => {
    const spec = mirrorD();
    const m = spec.mirrors[0] as TemplateMirror;
    m.outputs[0]!.devices.out = sz(40e-6, 1e-6);
    expect(rel(psd(run(spec)), 1.143591e-22)).toBeLessThan(1e-5);
  });
  it('a resistor carries 4kT/R: the input resistor’s share matches its own noise through the diode', () => {
    const spec = makeSpec([template('simple', { input: { resistor: 19136.663 }, size: sz(10e-6, 1e-6), vout: 1.5 })],
      { nmos: { lambda: 0, gamma: 0 }, vdd: 3, tnom: 300 });
    const r = run(spec);
    // Independent small-signal: the resistor's current splits between R and 1/gm1, mirrored by gm2/gm1.
    const gm = r.devices[0]!.gm, g = 1 / 19136.663;
    const want = 4 * BOLTZMANN * 300 * g * (gm / (gm + g)) ** 2;
    expect(rel(r.noise!.shares.input! * psd(r), want)).toBeLessThan(0.02);
  });
});

describe('cascode: the cascode device’s own noise is suppressed by about (gm·ro)² (references §13)', () => {
  it('outc reaches the output through 1/(1 + (gm + gmb + gds)·ro_out)', () => {
    const spec = makeSpec([template('cascode', { input: 100e-6, size: sz(10e-6, 1e-6), vout: 2.5 })], { tnom: 300 });
    const r = run(spec);
    const outc = r.devices.find((d) => d.name === 'outc') as MosDeviceReport, out = r.devices.find((d) => d.name === 'out')!;
    const own = 4 * BOLTZMANN * 300 * (2 / 3) * outc.gm;
    const att = 1 / (1 + (outc.gm + outc.gmb + outc.gds) * out.ro) ** 2;
    expect(rel(r.noise!.shares.outc! * psd(r), own * att)).toBeLessThan(0.02);
    expect(att).toBeLessThan(1e-3);
  });
});

describe('RC gate filter r = 1 MΩ, c = 10 pF on the 1:1 mirror (references §13)', () => {
  const filter = { filter: { r: 1e6, c: 10e-12 } };
  it.each([
    [1e3, 4.4341e-21],
    [15.885e3, 2.2287e-21],
    [100e3, 1.1514e-22],
    [1e6, 6.8395e-24],
  ])('S_out at %s Hz is %s A²/Hz', (f, want) => {
    const r = run(mirrorD(f, filter));
    expect(r.converged).toBe(true);
    expect(rel(psd(r), want)).toBeLessThan(1e-3);
  });
  it('leaves the DC point alone and names the filter resistor as the main source below the pole', () => {
    const plain = run(mirrorD()), filtered = run(mirrorD(1e3, filter));
    expect(rel(filtered.iout, plain.iout)).toBeLessThan(1e-8);
    expect(filtered.noise!.shares.filter!).toBeGreaterThan(0.99);
  });
  it('integrates the band by trapezoids: the filtered white floor and the low-pass add up', () => {
    const r = run(mirrorD(1e3, filter), true);
    const sp = r.noise!.spectrum!;
    expect(sp.f[0]).toBe(1);
    expect(sp.total.length).toBe(sp.f.length);
    // Thermal floor of out alone above the pole: 4kTγgm·(1e6) ≤ integrated² ≤ plus the filtered part.
    const floor = 4 * BOLTZMANN * 300 * (2 / 3) * r.devices[1]!.gm * 1e6;
    expect(r.noise!.integrated ** 2).toBeGreaterThan(floor);
  });
});
