/**
 * The table interpolant (design §11): exact at grid points, C¹, its mid-cell error bound, and
 * the EKV universal gm/ID curve recovered from a table.
 */
import { describe, expect, it } from 'vitest';
import { evalSlice, sliceAt, type SlicePoint } from '../../../src/core/models/table/slice';
import { thermalVoltage } from '../../../src/core/models/thermal';
import { modelChannel, span, tableOf } from './make-table';
import { numberAt } from '../../../src/core/models/table/read';
import { TABLE } from '../../../src/core/models/table/model';
import type { ModelDevice } from '../../../src/core/models/device';

const T = 300.15;
/** An EKV NMOS (references §2 "D" values, n = 1.3, no length modulation). */
const EKV_N = { kp: 280e-6, vt0: 0.45, lambda: 0, gamma: 0.45, phi: 0.85, n: 1.3, tcv: 0, bex: -1.5 };
const ch = modelChannel(EKV_N, 'ekv', T);
const L = 1e-6;

function grid(step: number) {
  return { l: [L], vgs: span(0, 1.8, Math.round(1.8 / step) + 1), vds: span(0, 1.8, 37), vsb: span(0, 1, 11) };
}
const at = (s: ReturnType<typeof sliceAt>, vgs: number, vds: number, vsb = 0): SlicePoint => {
  const p = { id: 0, gm: 0, gds: 0, dvsb: 0 };
  evalSlice(s, vgs, vds, vsb, p);
  return p;
};

describe('exact at grid points', () => {
  it('returns the table\'s own id at every grid point of a line (to rounding)', () => {
    const g = grid(0.05);
    const s = sliceAt(tableOf(ch, g), L, T);
    for (const vgs of g.vgs) for (const vds of [0.05, 0.9, 1.8]) {
      expect(Math.abs(at(s, vgs, vds).id / ch(L, vgs, vds, 0, 27) - 1)).toBeLessThan(1e-12);
    }
  });
  it('vds = 0 carries no current (design §14)', () => {
    const s = sliceAt(tableOf(ch, grid(0.05)), L, T);
    expect(at(s, 1.2, 0).id).toBe(0);
  });
});

/**
 * Error bound at mid-cell points (stated): cubic Hermite in ln id along vgs with monotone
 * slopes has an O(h³) error where the curve is smooth (Fritsch & Carlson 1980: the slopes are
 * O(h²)-accurate away from extrema). On this EKV device, with a vgs step of 25 mV, id is within
 * 0.05 % and gm within 0.5 % at every mid-cell point from weak to strong inversion; halving the
 * step divides the worst id error by at least 4. Linear interpolation of id itself is several
 * percent off in weak inversion there (the reason ln id is interpolated).
 */
describe('mid-cell interpolation error', () => {
  const worst = (step: number): { id: number; gm: number; linear: number } => {
    const g = grid(step);
    const s = sliceAt(tableOf(ch, g, `mid-${step}.csv`), L, T);
    let id = 0, gm = 0, linear = 0;
    for (let k = 0; k + 1 < g.vgs.length; k++) {
      const a = g.vgs[k]!, b = g.vgs[k + 1]!, mid = 0.5 * (a + b);
      const got = at(s, mid, 0.9);
      const want = ch(L, mid, 0.9, 0, 27);
      const h = 1e-6;
      const wantGm = (ch(L, mid + h, 0.9, 0, 27) - ch(L, mid - h, 0.9, 0, 27)) / (2 * h);
      id = Math.max(id, Math.abs(got.id / want - 1));
      gm = Math.max(gm, Math.abs(got.gm / wantGm - 1));
      const lin = 0.5 * (ch(L, a, 0.9, 0, 27) + ch(L, b, 0.9, 0, 27));
      linear = Math.max(linear, Math.abs(lin / want - 1));
    }
    return { id, gm, linear };
  };
  it('25 mV step: id within 0.05 %, gm within 0.5 %; linear id interpolation is percents off', () => {
    const w = worst(0.025);
    expect(w.id).toBeLessThan(5e-4);
    expect(w.gm).toBeLessThan(5e-3);
    expect(w.linear).toBeGreaterThan(0.02);
  });
  it('halving the step divides the worst id error by at least 4 (third order where smooth)', () => {
    expect(worst(0.05).id / worst(0.025).id).toBeGreaterThan(4);
  });
});

describe('continuous first derivatives (Newton needs them)', () => {
  it('gm, gds and ∂id/∂vsb match central differences across cell edges and beyond the grid', () => {
    const s = sliceAt(tableOf(ch, grid(0.05)), L, T);
    const h = 1e-5;
    for (const [vgs, vds, vsb] of [[0.5, 0.9, 0.2], [0.75, 0.05, 0], [1.2, 0.35, 0.55], [1.9, 1.9, 1.2], [-0.1, 0.9, 0.1]] as const) {
      const p = at(s, vgs, vds, vsb);
      const d = (f: (x: number) => number): number => (f(h) - f(-h)) / (2 * h);
      // FD truncation O(h²) at a cell edge (the second derivative jumps there) and rounding O(ε·id/h)
      const tol = (x: number): number => 1e-4 * Math.abs(x) + 1e-9 * p.id;
      expect(Math.abs(p.gm - d((e) => at(s, vgs + e, vds, vsb).id))).toBeLessThan(tol(p.gm));
      expect(Math.abs(p.gds - d((e) => at(s, vgs, vds + e, vsb).id))).toBeLessThan(tol(p.gds));
      expect(Math.abs(p.dvsb - d((e) => at(s, vgs, vds, vsb + e).id))).toBeLessThan(tol(p.dvsb));
    }
  });
});

/**
 * The EKV universal curve gm·n·U_T/ID = (1 − e^(−√IC))/√IC (Enz, Krummenacher & Vittoz 1995;
 * the gm/ID methodology of Silveira, Flandre & Jespers 1996), IC = ID/IS, IS = 2·n·(kp·W/L)·U_T²,
 * recovered from a table of the EKV equations at mid-cell gate voltages, weak to strong.
 */
describe('EKV universal gm/ID curve from a table', () => {
  it('within 0.5 % from IC 0.01 to 100', () => {
    const s = sliceAt(tableOf(ch, grid(0.025)), L, T);
    const ut = thermalVoltage(T), n = EKV_N.n;
    const is = 2 * n * (EKV_N.kp / L) * ut * ut;   // per metre of width
    let seen = 0;
    for (let vgs = 0.2125; vgs < 1.6; vgs += 0.025) {
      const p = at(s, vgs, 1.5);
      const ic = p.id / is;
      if (ic < 0.01 || ic > 100) continue;
      const sq = Math.sqrt(ic);
      const universal = (1 - Math.exp(-sq)) / sq;
      expect(Math.abs((p.gm * n * ut / p.id) / universal - 1), `IC ${ic}`).toBeLessThan(5e-3);
      seen++;
    }
    expect(seen).toBeGreaterThan(20);
  });
});

describe('the gate drive for a current inverts the interpolant', () => {
  const s = sliceAt(tableOf(ch, grid(0.05)), L, T);
  const dev = (beta: number): ModelDevice => ({ model: TABLE, sign: 1, beta, vt0: 0.02, gamma: 0, phi: 0.7, lambda: 0, n: 1.3, ut: thermalVoltage(T), table: s });
  it.each([1e-9, 1e-7, 1e-5, 1e-3])('id %s A: the channel at the returned VGS carries it to 1e-9 (weak to strong inversion, body effect)', (id) => {
    for (const vsb of [0, 0.37]) {
      const d = dev(4e-6);
      const vgs = TABLE.gateDrive(d, id, vsb);
      const p = at(s, vgs - d.vt0, s.vds.x[s.vds.x.length - 1]!, vsb);
      expect(Math.abs((d.beta * p.id) / id - 1)).toBeLessThan(1e-9);
    }
  });
  it('a current beyond the grid clamps to 0.5 V past its end, as the search bracket says', () => {
    const d = dev(4e-6);
    expect(TABLE.gateDrive(d, 1e3, 0)).toBeCloseTo(1.8 + 0.5 + d.vt0, 9);
  });
});

describe('table numbers read as JavaScript reads them', () => {
  // The reference is ECMAScript's own Number conversion: every form a simulator writes,
  // the fast path's edges (15 digits, 10^±22) and what it hands on (hex, Infinity, junk).
  const fixed = ['0', '-0', '1', '+2.5', '.5', '5.', '1e-6', '1E-06', '2.000e-6', '0.000012', '-3.25e+2', ' 7 ', '\t8\r',
    '123456789012345', '1234567890123456', '0.1234567890123456789', '1e22', '1e23', '3e-22', '4e-23', '1e308', '1e-320',
    '0x10', 'Infinity', '', ' ', '.', 'e5', '1e', '1.2.3', '1,5', 'abc', '--1', '1e+'];
  it.each(fixed)('%j', (t) => {
    expect(Object.is(numberAt(t, 0, t.length), t.trim() === '' ? NaN : Number(t))).toBe(true);
  });
  it('ten thousand values written with toPrecision and toExponential read back to the same double', () => {
    let x = 0.123456789;
    for (let k = 0; k < 10_000; k++) {
      x = (x * 9301 + 49297) % 233280 / 233280;   // a fixed linear congruential sequence
      const v = (x - 0.5) * 10 ** ((k % 40) - 20);
      for (const t of [v.toPrecision(1 + (k % 17)), v.toExponential(k % 15), String(v)]) {
        expect(numberAt(t, 0, t.length), t).toBe(Number(t));
      }
    }
  });
});
