/**
 * Device models against published formulas and the computed check values of
 * docs/references.md (sections named beside each check).
 */
import { describe, expect, it } from 'vitest';
import { evalDevice, gateDriveFor, inversionOf, prepareDevice, thermalVoltage } from '../../src/core/models/index';
import { newChannelEval } from '../../src/core/models/core';
import { MODEL_NAMES } from '../../src/core/models/registry';
import { forModel } from './table/make-table';
import { evalTerminal } from '../../src/core/models/terminal';
import { RAZAVI_N, RAZAVI_P } from '../analysis/builders';

const D_SIZE = { w: 10e-6, l: 1e-6, m: 1 };          // W/L = 10 (references §2 "D")
const rel = (a: number, b: number): number => Math.abs(a / b - 1);

describe('thermal voltage (references §1: exact SI k and e, BIPM 2019 / IUPAC Gold Book)', () => {
  it('U_T at 300 K is 25.852000 mV', () => {
    expect(thermalVoltage(300)).toBeCloseTo(25.852000e-3, 9);
  });
  it('U_T at 300.15 K is 25.864926 mV', () => {
    expect(thermalVoltage(300.15)).toBeCloseTo(25.864926e-3, 9);
  });
  it('k/q is 86.173332621 µV/K', () => {
    expect(thermalVoltage(1)).toBeCloseTo(86.173332621e-6, 14);
  });
});

describe('square law, level 1 (references §2, Razavi set D from memory)', () => {
  const VOV = 0.386334;  // sqrt(2·100 µA / (134 µA/V²·10)), references §2
  it('saturation: ID = β/2·VOV²·(1 + λVDS), gm = 2ID/VOV, ro = 1/(λ·β/2·VOV²) = 100 kΩ', () => {
    const e = evalDevice(RAZAVI_N, D_SIZE, 0.7 + VOV, 1.5, 0, 300, 'square-law', 300);
    expect(e.region).toBe('saturation');
    expect(rel(e.id, 100e-6 * 1.15)).toBeLessThan(2e-6);
    expect(rel(e.gm, (2 * e.id) / VOV)).toBeLessThan(1e-9);
    // Without the (1 + λVDS) factor gm is 517.687 µS (references §2).
    expect(rel(e.gm / 1.15, 517.687e-6)).toBeLessThan(2e-6);
    expect(1 / e.gds).toBeCloseTo(100e3, -1);
  });
  it('triode: 76.737 µA without (1 + λVDS), 78.272 µA with it (pinned: triode carries it)', () => {
    const e = evalDevice(RAZAVI_N, D_SIZE, 0.7 + VOV, 0.2, 0, 300, 'square-law', 300);
    expect(e.region).toBe('triode');
    expect(rel(e.id, 78.272e-6)).toBeLessThan(1e-5);
    expect(rel(e.id / 1.02, 76.737e-6)).toBeLessThan(1e-5);
  });
  it('cutoff below threshold', () => {
    const e = evalDevice(RAZAVI_N, D_SIZE, 0.69, 1, 0, 300, 'square-law', 300);
    expect(e.region).toBe('cutoff');
    expect(e.id).toBe(0);
  });
  it.each([
    [0.5, 0.805540, 0.190160],
    [1.0, 0.893375, 0.163232],
    [2.0, 1.039415, 0.132125],
  ])('body effect at VSB = %s V: VT = %s V, gmb/gm = %s', (vsb, vt, eta) => {
    const e = evalDevice(RAZAVI_N, D_SIZE, 2.0, 2.0, -vsb, 300, 'square-law', 300);
    expect(e.vth).toBeCloseTo(vt, 6);
    expect(e.gmb / e.gm).toBeCloseTo(eta, 6);
  });
  it('PMOS set: |VOV| = 0.362738 V at 50 µA, gm = 275.681 µS, |VT|(VSB = 1 V) = 0.978885 V', () => {
    const size = { w: 20e-6, l: 1e-6, m: 1 };
    const p0 = { ...RAZAVI_P, lambda: 0 };
    const e = evalDevice(p0, size, 0.8 + 0.362738, 1, 0, 300, 'square-law', 300);
    expect(e.id).toBeCloseTo(50e-6, 10);
    expect(e.gm).toBeCloseTo(275.681e-6, 9);
    expect(evalDevice(RAZAVI_P, size, 2, 2, -1, 300, 'square-law', 300).vth).toBeCloseTo(0.978885, 6);
    // ro = 1/(λ·ID) = 100 kΩ with λ = 0.2 at 50 µA (references §2).
    const withLambda = evalDevice(RAZAVI_P, size, 0.8 + 0.362738, 1, 0, 300, 'square-law', 300);
    expect(1 / withLambda.gds).toBeCloseTo(100e3, -1);
  });
  it('PMOS is the NMOS mirror image: negated terminal voltages, negated current, same conductances', () => {
    const size = { w: 20e-6, l: 1e-6, m: 1 };
    const proc = { model: 'square-law' as const, temperature: 300, tnom: 300 };
    const n = prepareDevice(RAZAVI_P, size, 'nmos', proc);
    const p = prepareDevice(RAZAVI_P, size, 'pmos', proc);
    const a = newChannelEval(), b = newChannelEval();
    for (const [vgs, vds, vbs] of [[1.2, 1.0, -0.3], [1.2, 0.1, 0], [1.0, -0.4, -0.2]] as const) {
      evalTerminal(n, vgs, vds, vbs, a);
      evalTerminal(p, -vgs, -vds, -vbs, b);
      expect(b.id).toBeCloseTo(-a.id, 15);
      expect(b.gm).toBeCloseTo(a.gm, 15);
      expect(b.gds).toBeCloseTo(a.gds, 15);
      expect(b.gmb).toBeCloseTo(a.gmb, 15);
    }
  });
  it('source/drain symmetry: VDS < 0 swaps the terminals (design §3)', () => {
    // I(VGS, VDS, VBS) = −I(VGD, −VDS, VBD): VGS 1.2, VDS −0.3, VBS −0.5 ↔ VGD 1.5, VSD 0.3, VBD −0.2.
    const fwd = evalDevice(RAZAVI_N, D_SIZE, 1.5, 0.3, -0.2, 300, 'square-law', 300);
    const rev = evalDevice(RAZAVI_N, D_SIZE, 1.2, -0.3, -0.5, 300, 'square-law', 300);
    expect(rev.swapped).toBe(true);
    expect(rev.id).toBeCloseTo(-fwd.id, 15);
  });
  it('inversion coefficient of a square-law device: IS = 2nβU_T² = 2.3284 µA, IC(100 µA) = 42.95 (references §6)', () => {
    const sat = evalDevice({ ...RAZAVI_N, lambda: 0 }, D_SIZE, 0.7 + VOV, 1, 0, 300, 'square-law', 300);
    expect(sat.id / sat.ic).toBeCloseTo(2.3284e-6, 9);
    expect(sat.ic).toBeCloseTo(42.95, 1);
    expect(sat.inversion).toBe('strong');
  });
  it('length modulation scales with 1/L when lref is given (design §3)', () => {
    const p = { ...RAZAVI_N, lambda: 0.1, lref: 1e-6 };
    const long = evalDevice(p, { w: 40e-6, l: 4e-6, m: 1 }, 0.7 + VOV, 1.5, 0, 300, 'square-law', 300);
    // λ = 0.1·1 µm/4 µm = 0.025: ID = 100 µA·(1 + 0.025·1.5).
    expect(rel(long.id, 100e-6 * (1 + 0.025 * 1.5))).toBeLessThan(2e-6);
  });
  it('m parallel devices carry m times the current', () => {
    const one = evalDevice(RAZAVI_N, D_SIZE, 1.2, 1.5, 0, 300, 'square-law', 300);
    const four = evalDevice(RAZAVI_N, { ...D_SIZE, m: 4 }, 1.2, 1.5, 0, 300, 'square-law', 300);
    expect(four.id / one.id).toBeCloseTo(4, 12);
  });
});

describe('temperature (references §8: µ ∝ T^−m, Tsividis & McAndrew from memory; values computed)', () => {
  const p = { ...RAZAVI_N, lambda: 0, bex: -1.5 };
  it.each([[233.15, 1.45958], [358.15, 0.76663], [400, 0.64952]])('kp(%s K)/kp(300 K) = %s with m = 1.5', (t, ratio) => {
    const hot = evalDevice(p, D_SIZE, 1.2, 1.5, 0, t, 'square-law', 300);
    const ref = evalDevice(p, D_SIZE, 1.2, 1.5, 0, 300, 'square-law', 300);
    expect(hot.id / ref.id).toBeCloseTo(ratio, 5);
  });
  it.each([[233.15, 0.16040], [358.15, 1.91744], [400, 2.59808]])(
    'ID(%s K)/ID(300 K) = %s at fixed VGS, VOV(300 K) = 0.2 V, dVT/dT = −2 mV/K', (t, ratio) => {
      const q = { ...p, tcv: -2e-3 };
      const hot = evalDevice(q, D_SIZE, 0.9, 1.5, 0, t, 'square-law', 300);
      const ref = evalDevice(q, D_SIZE, 0.9, 1.5, 0, 300, 'square-law', 300);
      expect(hot.id / ref.id).toBeCloseTo(ratio, 5);
    });
});

describe('EKV (references §6: Enz, Krummenacher & Vittoz 1995 from memory; ln² form values computed)', () => {
  const p = { ...RAZAVI_N, lambda: 0, gamma: 0 };
  const ut = thermalVoltage(300);
  // (VP − VS)/U_T for each IC, from the references table; VS = VB = 0 so VGS = n·VP + VT0.
  it.each([
    [0.01, -4.50434, 0.951626, 28.316, 103.920],
    [0.1, -1.97803, 0.857314, 25.510, 108.144],
    [1, 1.08265, 0.632121, 18.809, 135.363],
    [10, 6.23805, 0.302842, 9.0111, 243.090],
    [100, 19.99991, 0.099995, 2.9754, 595.242],
  ])('IC = %s: gm·n·U_T/ID = (1 − e^−√IC)/√IC, gm/ID, VDSsat = 2U_T√(IC + 0.25) + 3U_T', (ic, x, norm, gmid, vdsatMv) => {
    const vgs = p.n * x * ut + p.vt0;
    const e = evalDevice(p, D_SIZE, vgs, 3, 0, 300, 'ekv', 300);
    expect(rel(e.ic, ic)).toBeLessThan(2e-5);
    expect((e.gm * p.n * ut) / e.id).toBeCloseTo(norm, 5);
    expect(e.gm / e.id).toBeCloseTo(gmid, gmid > 10 ? 2 : 3);
    expect(e.vdsat * 1e3).toBeCloseTo(vdsatMv, 2);
    expect(e.inversion).toBe(inversionOf(ic));
  });
  it('weak-inversion limit gm/ID = 1/(n·U_T) = 29.755 V⁻¹ for n = 1.3 at 300 K', () => {
    const e = evalDevice(p, D_SIZE, p.vt0 - 0.8, 3, 0, 300, 'ekv', 300);
    expect(e.ic).toBeLessThan(1e-8);
    expect(e.gm / e.id).toBeCloseTo(29.755, 2);
    expect(e.inversion).toBe('weak');
  });
  it('strong inversion carries 1/n of the square-law current for the same kp (design §3)', () => {
    const vov = 1.0;
    const e = evalDevice(p, D_SIZE, p.vt0 + vov, 3, 0, 300, 'ekv', 300);
    const beta = p.kp * 10;
    // ID ≈ β/(2n)·VOV² up to the ln² form's weak-inversion tail (≈ U_T/VOV corrections).
    expect(rel(e.id, (beta / (2 * p.n)) * vov * vov)).toBeLessThan(0.05);
  });
  it('forward and reverse currents cancel at VDS = 0', () => {
    const a = evalDevice(p, D_SIZE, 1.2, 0, 0, 300, 'ekv', 300);
    expect(Math.abs(a.id)).toBeLessThan(1e-18);
  });
});

describe('gateDriveFor inverts the saturation models', () => {
  const proc = { temperature: 300, tnom: 300 };
  it.each(MODEL_NAMES)('%s: ID(gateDriveFor(I)) = I', (model) => {
    const params = forModel(model, { ...RAZAVI_N, lambda: 0 });
    const dev = prepareDevice(params, D_SIZE, 'nmos', { ...proc, model });
    for (const i of [1e-9, 1e-6, 1e-4, 1e-2]) {
      for (const vsb of [0, 0.5]) {
        const vgs = gateDriveFor(dev, i, vsb);
        const e = evalDevice(params, D_SIZE, vgs, 10, -vsb, 300, model, 300);
        expect(rel(e.id, i)).toBeLessThan(1e-9);
      }
    }
  });
});
