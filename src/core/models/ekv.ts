/**
 * Simplified EKV, constant slope factor n, voltages referred to the bulk (design §3):
 * IF,R = IS·ln²(1 + exp((VP − VSB,DB)/(2·U_T))), IS = 2·n·β·U_T², VP = (VGB − VT0)/n,
 * ID = (IF − IR)·(1 + λ·VDS), IC = IF/IS, VDSsat = 2·U_T·sqrt(IC + 0.25) + 3·U_T.
 * Continuous from weak to strong inversion.
 */
import type { ChannelEval } from './core';
import type { ModelDevice } from './device';
import type { DeviceModel } from './model';

/** ln(1 + eˣ) without overflow. */
function softplus(x: number): number {
  return x > 0 ? x + Math.log1p(Math.exp(-x)) : Math.log1p(Math.exp(x));
}

/** 1/(1 + e⁻ˣ) without overflow. */
function logistic(x: number): number {
  if (x >= 0) return 1 / (1 + Math.exp(-x));
  const e = Math.exp(x);
  return e / (1 + e);
}

/** IS = 2·n·β·U_T² (A), the specific current. */
function specificCurrent(dev: ModelDevice): number {
  return 2 * dev.n * dev.beta * dev.ut * dev.ut;
}

/** VDSsat = 2·U_T·sqrt(IC + 0.25) + 3·U_T. */
function vdsatAt(ic: number, ut: number): number {
  return 2 * ut * Math.sqrt(ic + 0.25) + 3 * ut;
}

/** Inversion coefficient at overdrive VOV = n·(VP − VS): IC = ln²(1 + exp(VOV/(2·n·U_T))). */
export function icFromOverdrive(vov: number, n: number, ut: number): number {
  const x = vov / (2 * n * ut);
  // log1p(exp(x)) overflows for large x; there it equals x to double precision.
  const l = x > 30 ? x : Math.log1p(Math.exp(x));
  return l * l;
}

/** gm·n·U_T/ID = (1 − e^(−√IC))/√IC in saturation, the exact derivative of the ln² form. */
export function gmIdFromIc(ic: number, n: number, ut: number): number {
  const s = Math.sqrt(ic);
  return (s < 1e-8 ? 1 - s / 2 : -Math.expm1(-s) / s) / (n * ut);
}

/** The inversion coefficient giving `gmid` (1/V), or undefined above the weak-inversion
 *  limit 1/(n·U_T). The normalized gm/ID falls monotonically with √IC, so bisection is safe. */
export function icFromGmId(gmid: number, n: number, ut: number): number | undefined {
  const g = gmid * n * ut;
  if (!(g > 0) || g >= 1) return undefined;
  const f = (s: number): number => -Math.expm1(-s) / s - g;
  let lo = 1e-9, hi = 1;
  while (f(hi) > 0) hi *= 2;            // f(hi) ≤ 0 brackets the root; f → 0⁻ offset by g > 0
  for (let i = 0; i < 200 && hi - lo > 1e-15 * hi; i++) {
    const mid = 0.5 * (lo + hi);
    if (f(mid) > 0) lo = mid; else hi = mid;
  }
  const s = 0.5 * (lo + hi);
  return s * s;
}

export const EKV: DeviceModel = {
  title: 'EKV model',
  coversWeakInversion: true,

  channel(dev, vgs, vds, vbs, out: ChannelEval): void {
    const { beta, lambda, n, ut } = dev;
    const vp = (vgs - vbs - dev.vt0) / n;          // VP = (VGB − VT0)/n
    const is = 2 * n * beta * ut * ut;
    const xf = (vp + vbs) / (2 * ut);               // (VP − VSB)/(2·U_T)
    const xr = (vp - vds + vbs) / (2 * ut);         // (VP − VDB)/(2·U_T)
    const lf = softplus(xf);
    const lr = softplus(xr);
    const iF = is * lf * lf;
    const iR = is * lr * lr;
    // d(ln²(1 + eˣ))/dx = 2·ln(1 + eˣ)·logistic(x)
    const dF = is * 2 * lf * logistic(xf);
    const dR = is * 2 * lr * logistic(xr);
    const clm = 1 + lambda * vds;
    out.id = (iF - iR) * clm;
    out.gm = (clm * (dF - dR)) / (2 * n * ut);
    out.gmb = (clm * (dF - dR) * (n - 1)) / (2 * n * ut);
    out.gds = (clm * dR) / (2 * ut) + lambda * (iF - iR);
    out.ic = is > 0 ? iF / is : 0;
    out.vdsat = vdsatAt(out.ic, ut);
    out.vth = dev.vt0 - (n - 1) * vbs;              // VGS at which VP = VSB
    out.region = vds >= out.vdsat ? 2 : 1;
  },

  /** Inverts IF = ID (IR ≈ 0): VP = VSB + 2·U_T·ln(e^sqrt(ID/IS) − 1), VGS = n·VP + VT0 − VSB. */
  gateDrive(dev, id, vsb): number {
    const is = specificCurrent(dev);
    if (!(is > 0) || !(id > 0)) return dev.vt0 + (dev.n - 1) * vsb;
    const q = Math.sqrt(id / is);
    // ln(e^q − 1): expm1 keeps small q accurate; for large q it is q itself.
    const x = q > 30 ? q : Math.log(Math.expm1(q));
    const vp = vsb + 2 * dev.ut * x;
    return dev.n * vp + dev.vt0 - vsb;
  },

  /** VDSsat at IC = ID/IS. */
  saturationVoltage(dev, id): number {
    const is = specificCurrent(dev);
    return vdsatAt(is > 0 ? id / is : 0, dev.ut);
  },

  /** In strong inversion VDSsat ≈ VP − VS = (VG − VT0)/n − VS: it follows the gate at 1/n. */
  saturationShift(dev, dvgs): number {
    return dvgs / dev.n;
  },

  /** ID = IS·IC·(1 + λ·VDS) in forward saturation, IC from the target by the ln² form. */
  aspectForTarget(ctx, id, target, clm): number | undefined {
    if (!(id > 0) || !(target.value > 0)) return undefined;
    const ic = target.kind === 'ic' ? target.value
      : target.kind === 'vov' ? icFromOverdrive(target.value, ctx.n, ctx.ut)
      : icFromGmId(target.value, ctx.n, ctx.ut);
    if (ic === undefined || !(ic > 0)) return undefined;
    return id / (2 * ctx.n * ctx.kp * ctx.ut * ctx.ut * ic * clm);
  },

  /** gm/ID cannot exceed its weak-inversion limit 1/(n·U_T). */
  targetLimit(ctx, target): string | undefined {
    if (target.kind !== 'gmid' || target.value * ctx.n * ctx.ut < 1) return undefined;
    return `gm/ID ${target.value} /V is above the weak-inversion limit 1/(n·U_T) = ${(1 / (ctx.n * ctx.ut)).toFixed(1)} /V, so no width reaches it`;
  },
};
