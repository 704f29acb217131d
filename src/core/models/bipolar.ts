/**
 * The bipolar transistor (design §10): the transport form with the Early factor on the collector
 * current only,
 *   IC = IS·(e^(VBE/UT) − e^(VBC/UT))·(1 + VCE/VAF) − IS/βR·(e^(VBC/UT) − 1)
 *   IB = IS/βF·(e^(VBE/UT) − 1) + IS/βR·(e^(VBC/UT) − 1)
 * with IS scaled by area·m. The base current carries no Early factor: with it, a base current
 * that grows with VCE feeds the output back through the mirror and the cascode's and the Wilson's
 * β·ro/2 limit disappears (Rout comes out ~80× too high). First order: no high injection, no
 * quasi-saturation, no base resistance. Temperature: IS(T) = IS·(T/Tnom)^xti·exp((eg/UT(T))·
 * (T/Tnom − 1)), βF(T) = βF·(T/Tnom)^xtb (the Gummel–Poon scaling, Antognetti and Massobrio,
 * Semiconductor Device Modeling with SPICE, 2nd ed., ch. 2, from memory).
 *
 * Voltages are in the device frame (an NPN's own; a PNP's negated: VEB, VCB), as for MOSFETs.
 */
import type { BipolarParams, BipolarType } from '../types';
import { thermalVoltage } from './thermal';

/** One bipolar device prepared for evaluation, with a Monte Carlo sample's deviations. */
export interface BipolarDevice {
  /** +1 NPN, −1 PNP. */
  sign: 1 | -1;
  /** A, IS(T)·area·m·(1 + ΔIS/IS). */
  is: number;
  /** βF(T)·(1 + Δβ/β). */
  bf: number;
  br: number;
  /** 1/V, 1/VAF (0 without an Early effect). */
  invVaf: number;
  /** V, k·T/q. */
  ut: number;
  /** V, the margin's reference. */
  vcesat: number;
  /** Exponent above which e^x continues as its tangent line: keeps a wild Newton step finite
   *  (the device would carry 100 A there). */
  xmax: number;
}

export interface BipolarEval {
  ic: number; ib: number;
  /** Partial derivatives with respect to VBE and VBC (device frame). */
  dicVbe: number; dicVbc: number; dibVbe: number; dibVbc: number;
  /** IS·(e^(VBE/UT) − 1)/βF: the forward base current, ∂IB/∂ln βF = −ibf. */
  ibf: number;
}

export function newBipolarEval(): BipolarEval {
  return { ic: 0, ib: 0, dicVbe: 0, dicVbc: 0, dibVbe: 0, dibVbc: 0, ibf: 0 };
}

/** The Early factor's floor: far in reverse (VCE < −VAF) the factor would change sign. */
const EARLY_FLOOR = 0.05;

/** IS at temperature T (K) for one unit-area device. */
export function isAt(p: BipolarParams, temperatureK: number, tnomK: number): number {
  const r = temperatureK / tnomK;
  return p.is * Math.pow(r, p.xti) * Math.exp((p.eg / thermalVoltage(temperatureK)) * (r - 1));
}

/** βF at temperature T (K). */
export function bfAt(p: BipolarParams, temperatureK: number, tnomK: number): number {
  return p.bf * Math.pow(temperatureK / tnomK, p.xtb);
}

export interface BipolarSizeLike { area: number; m: number }

/** Why a bipolar device cannot be evaluated, if so. */
export function bipolarProblem(p: BipolarParams, size: BipolarSizeLike): string | undefined {
  if (!(size.area > 0) || !Number.isFinite(size.area)) return `area = ${size.area} is not a positive multiple`;
  if (!(size.m > 0) || !Number.isFinite(size.m)) return `m = ${size.m} is not a positive count`;
  if (!(p.is > 0) || !Number.isFinite(p.is)) return `is = ${p.is} A is not positive`;
  if (!(p.bf > 0) || !(p.br > 0)) return 'bf and br must be positive';
  return undefined;
}

export function prepareBipolar(
  p: BipolarParams, size: BipolarSizeLike, type: BipolarType, temperatureK: number, tnomK: number,
  dis = 0, dbf = 0,
): BipolarDevice {
  const valid = size.area > 0 && size.m > 0 && Number.isFinite(size.area * size.m);
  const is = valid ? isAt(p, temperatureK, tnomK) * size.area * size.m * (1 + dis) : 0;
  const good = Number.isFinite(is) && is > 0;
  return {
    sign: type === 'pnp' ? -1 : 1,
    is: good ? is : 1e-30,
    bf: bfAt(p, temperatureK, tnomK) * (1 + dbf),
    br: p.br,
    invVaf: p.vaf !== undefined && p.vaf > 0 ? 1 / p.vaf : 0,
    ut: thermalVoltage(temperatureK),
    vcesat: p.vcesat,
    xmax: Math.log(100 / (good ? is : 1e-30)),
  };
}

/** e^x, continued as its tangent above xmax; returns the value, writes the slope to slope[0]. */
function limexp(x: number, xmax: number, slope: Float64Array): number {
  if (x <= xmax) { const e = Math.exp(x); slope[0] = e; return e; }
  const e = Math.exp(xmax);
  slope[0] = e;
  return e * (1 + x - xmax);
}

const s1 = new Float64Array(1), s2 = new Float64Array(1);

/** Currents and derivatives at (VBE, VBC) in the device frame; allocates nothing. */
export function evalBipolar(dev: BipolarDevice, vbe: number, vbc: number, out: BipolarEval): void {
  const { is, bf, br, invVaf, ut } = dev;
  const e1 = limexp(vbe / ut, dev.xmax, s1), d1 = s1[0]! / ut;
  const e2 = limexp(vbc / ut, dev.xmax, s2), d2 = s2[0]! / ut;
  let k = 1 + (vbe - vbc) * invVaf;
  let dk = invVaf;                     // ∂k/∂VBE = −∂k/∂VBC
  if (k < EARLY_FLOOR) { k = EARLY_FLOOR; dk = 0; }
  const t = is * (e1 - e2);
  out.ic = t * k - (is / br) * (e2 - 1);
  out.dicVbe = is * d1 * k + t * dk;
  out.dicVbc = -is * d2 * k - t * dk - (is / br) * d2;
  out.ibf = (is / bf) * (e1 - 1);
  out.ib = out.ibf + (is / br) * (e2 - 1);
  out.dibVbe = (is / bf) * d1;
  out.dibVbc = (is / br) * d2;
}

/**
 * The bipolar "off" rule, one for the region report (`cutoff`) and the zero-current state test
 * (analysis/zero-state.ts): a device is off while its collector current is at most 1000·IS,
 * i.e. VBE ≤ UT·ln(1001) ≈ 6.9·UT (179 mV at 300 K). A junction has no threshold, so "off" must
 * name a current. Why this one: 1000·IS is 0.1 pA for a unit device of IS 1e-16 A, below a real
 * junction's leakage and six decades or more under any bias current qpoint checks, so a loop
 * resting there is the zero-current state a start-up circuit must leave; and tied to IS it
 * scales with area, m and temperature as the device does (common practice).
 */
export const CUTOFF_IS = 1e3;

/** V (device frame), the highest VBE at which the device is off (CUTOFF_IS, Early factor 1). */
export function vbeCutoff(dev: BipolarDevice): number {
  return vbeFor(dev, CUTOFF_IS * dev.is);
}

/** VBE (device frame) at which a forward-active device carries `ic` at VCE = vce. */
export function vbeFor(dev: BipolarDevice, ic: number, vce = 0): number {
  const k = Math.max(1 + vce * dev.invVaf, EARLY_FLOOR);
  return dev.ut * Math.log(Math.max(ic, 1e-30) / (dev.is * k) + 1);
}
