/**
 * Closed-form sizing relations: the aspect ratio m·W/L that puts a device carrying ID at a
 * design target (overdrive, gm/ID or inversion coefficient), for both models of design §3.
 *
 * Square-law (saturation): ID = β/2·VOV²·(1 + λ·VDS), β = kp·m·W/L, gm/ID = 2/VOV (the length
 * modulation factor cancels in gm/ID), IC = ID/(2·n·β·U_T²) as the engine reports it.
 * EKV (forward saturation, IR ≈ 0): ID = IS·IC·(1 + λ·VDS), IS = 2·n·β·U_T²,
 * IC = ln²(1 + exp(VOV/(2·n·U_T))) with VOV = n·(VP − VS), gm·n·U_T/ID = (1 − e^(−√IC))/√IC.
 * `clm` is the factor (1 + λ·VDS) at the device's operating point (1 when unknown).
 */
import type { ModelKind } from '../types';

export interface TargetContext {
  model: ModelKind;
  kp: number;   // A/V² at the operating temperature
  n: number;    // slope factor
  ut: number;   // V, thermal voltage
}

export type TargetValue = { kind: 'vov' | 'gmid' | 'ic'; value: number };

/** Aspect ratio m·W/L (dimensionless) for a device carrying `id` (A) at `target`; undefined
 *  when the target cannot be reached by any size (e.g. gm/ID above the weak-inversion limit). */
export function aspectForTarget(ctx: TargetContext, id: number, target: TargetValue, clm = 1): number | undefined {
  if (!(id > 0) || !(target.value > 0)) return undefined;
  if (ctx.model === 'square-law') {
    if (target.kind === 'ic') return id / (2 * ctx.n * ctx.kp * ctx.ut * ctx.ut * target.value);
    const vov = target.kind === 'vov' ? target.value : 2 / target.value;
    return (2 * id) / (ctx.kp * vov * vov * clm);
  }
  const ic = target.kind === 'ic' ? target.value
    : target.kind === 'vov' ? icFromOverdrive(target.value, ctx.n, ctx.ut)
    : icFromGmId(target.value, ctx.n, ctx.ut);
  if (ic === undefined || !(ic > 0)) return undefined;
  return id / (2 * ctx.n * ctx.kp * ctx.ut * ctx.ut * ic * clm);
}

/** EKV: inversion coefficient at overdrive VOV = n·(VP − VS): IC = ln²(1 + exp(VOV/(2·n·U_T))). */
export function icFromOverdrive(vov: number, n: number, ut: number): number {
  const x = vov / (2 * n * ut);
  // log1p(exp(x)) overflows for large x; there it equals x to double precision.
  const l = x > 30 ? x : Math.log1p(Math.exp(x));
  return l * l;
}

/** EKV (ln² form): gm·n·U_T/ID = (1 − e^(−√IC))/√IC, the exact derivative of the model. */
export function gmIdFromIc(ic: number, n: number, ut: number): number {
  const s = Math.sqrt(ic);
  return (s < 1e-8 ? 1 - s / 2 : -Math.expm1(-s) / s) / (n * ut);
}

/** EKV: the inversion coefficient giving `gmid` (1/V), or undefined above the weak-inversion
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

/** Square-law: gm/ID → overdrive. */
export function overdriveFromGmId(gmid: number): number {
  return 2 / gmid;
}
