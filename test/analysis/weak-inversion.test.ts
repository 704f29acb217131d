/**
 * Figures at nanoamperes carry no trace of the solver's gmin: an EKV simple mirror at 2 nA and
 * an EKV PMOS cascode at 5 nA against an independent solve of the same device equations,
 * written out here (bisection on each node in turn, Rout by a central difference). The EKV
 * equations are the simplified long-channel form of C. C. Enz, F. Krummenacher and E. A.
 * Vittoz, "An analytical MOS transistor model valid in all regions of operation and dedicated
 * to low-voltage and low-current applications", Analog Integrated Circuits and Signal
 * Processing 8 (1995), as docs/design.md §3 states them (forward and reverse currents,
 * constant slope factor n, length modulation on the difference).
 * Limits: Iout within 1e-4 and Rout within 0.5 % (issue: with gmin 1e-12 S these were 6.6e-4
 * and 2.5 % off); the assertions below are tighter.
 */
import { describe, expect, it } from 'vitest';
import { measureMirror } from '../../src/core/analysis/index';
import { BOLTZMANN, ELEMENTARY_CHARGE } from '../../src/core/defaults';
import type { DeviceParams } from '../../src/core/types';
import { ctxOf, makeSpec, RAZAVI_N, RAZAVI_P, sz, template } from './builders';

const T = 300;                                  // makeSpec: tnom = temperature = 300 K
const UT = (BOLTZMANN * T) / ELEMENTARY_CHARGE;
const W = 10e-6, L = 1e-6;

/** Drain current in the device frame (design §3, EKV), at T = tnom and without lref. */
function ekv(p: DeviceParams, vgs: number, vds: number, vbs: number): number {
  const beta = (p.kp * W) / L;
  const is = 2 * p.n * beta * UT * UT;
  const vp = (vgs - vbs - p.vt0) / p.n;
  const f = (x: number): number => { const l = Math.log1p(Math.exp(x)); return l * l; };
  return is * (f((vp + vbs) / (2 * UT)) - f((vp - vds + vbs) / (2 * UT))) * (1 + p.lambda * vds);
}

/** The x in [lo, hi] where g changes sign (g increasing). */
function bisect(g: (x: number) => number, lo: number, hi: number): number {
  for (let k = 0; k < 200 && hi - lo > 1e-15; k++) {
    const mid = 0.5 * (lo + hi);
    if (g(mid) > 0) hi = mid; else lo = mid;
  }
  return 0.5 * (lo + hi);
}

describe('weak inversion: figures against an independent solve of the EKV equations', () => {
  it('NMOS simple mirror at 2 nA: Iout and Rout (above 10 GΩ)', () => {
    const p: DeviceParams = { ...RAZAVI_N, lambda: 0.02 };
    const iin = 2e-9, vout = 1.5;
    const r = measureMirror(ctxOf(makeSpec([template('simple', { input: iin, vout, size: sz(W, L) })], { model: 'ekv', nmos: p })));
    expect(r.converged).toBe(true);
    const va = bisect((v) => ekv(p, v, v, 0) - iin, 0, 3.3);
    const iout = (vo: number): number => ekv(p, va, vo, 0);
    const h = 1e-3;
    const rout = (2 * h) / (iout(vout + h) - iout(vout - h));
    expect(rout).toBeGreaterThan(1e10);
    expect(Math.abs(r.iout / iout(vout) - 1)).toBeLessThan(1e-6);
    expect(Math.abs(r.rout / rout - 1)).toBeLessThan(1e-3);
  });

  it('PMOS cascode at 5 nA (bulks at vdd, so refc and outc carry body effect): Iout and Rout', () => {
    const p: DeviceParams = { ...RAZAVI_P, lambda: 0.05 };
    const iin = 5e-9, vdd = 3.3, vout = 1.0;
    const r = measureMirror(ctxOf(makeSpec([template('cascode', { type: 'pmos', input: iin, vout, size: sz(W, L) })], { model: 'ekv', pmos: p, vdd })));
    expect(r.converged).toBe(true);
    // u = vdd − v; in the PMOS device frame VSG = u_g − u_s, VSD = u_d − u_s, VBS = −u_s.
    const ua = bisect((u) => ekv(p, u, u, 0) - iin, 0, vdd);
    const ub = bisect((u) => ekv(p, u - ua, u - ua, -ua) - iin, ua, vdd);
    const iout = (uo: number): number => {
      // The node between out and outc: out's current rises with it, outc's falls.
      const uc = bisect((u) => ekv(p, ua, u, 0) - ekv(p, ub - u, uo - u, -u), 0, uo);
      return ekv(p, ua, uc, 0);
    };
    const uo = vdd - vout, h = 1e-2;
    const rout = (2 * h) / (iout(uo + h) - iout(uo - h));
    expect(rout).toBeGreaterThan(1e10);
    expect(Math.abs(r.iout / iout(uo) - 1)).toBeLessThan(1e-6);
    expect(Math.abs(r.rout / rout - 1)).toBeLessThan(1e-3);
  });
});
