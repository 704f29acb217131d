/**
 * One MOSFET prepared for evaluation: process parameters adjusted to temperature and length,
 * size folded into β, plus the random deviations of a Monte Carlo sample. Voltages handed to
 * the evaluators are in the device's own polarity (VSG, VSD, VSB for PMOS).
 */
import type { DeviceParams, ModelKind, Polarity } from '../types';
import { kpAt, lambdaAt, thermalVoltage, thresholdAt } from './thermal';
import type { DeviceModel, SizingContext } from './model';
import { MODELS, modelKindOf } from './registry';
import { sliceAt, type TableSlice } from './table/slice';

export interface ModelDevice {
  /** The process model's equations, looked up by name once here so an evaluation in the
   *  Newton loop is a property load, not a table lookup. */
  model: DeviceModel;
  /** +1 NMOS, −1 PMOS: terminal voltages are multiplied by it to reach the device frame. */
  sign: 1 | -1;
  /** A/V², kp(T)·m·W/L·(1 + Δβ/β). */
  beta: number;
  /** V, VT0(T) + ΔVT (device frame, positive for an enhancement device). */
  vt0: number;
  gamma: number;
  phi: number;
  /** 1/V, after λ(L). */
  lambda: number;
  /** EKV slope factor; also used for the square-law inversion coefficient. */
  n: number;
  /** V, thermal voltage k·T/q. */
  ut: number;
  /** A table device's table at its length and the operating temperature; its `beta` is then
   *  kp·m·W·(1 + Δβ/β) (m, scaling A/m; kp is 1 unless a corner scales it) and `vt0` the
   *  gate shift vt0 + ΔVT (vt0 is 0 unless a corner moves it). */
  table?: TableSlice;
}

/** A copy of `d`, field by field as prepareDevice makes it. */
export function copyDevice(d: ModelDevice): ModelDevice {
  const x: ModelDevice = { model: d.model, sign: d.sign, beta: d.beta, vt0: d.vt0, gamma: d.gamma, phi: d.phi, lambda: d.lambda, n: d.n, ut: d.ut };
  if (d.table) x.table = d.table;
  return x;
}

export interface DeviceSizeLike { w: number; l: number; m: number }

export interface ProcessConditions { model: ModelKind; temperature: number; tnom: number }

/** Why a device cannot be evaluated (non-positive or non-finite size or parameter), if so. */
export function deviceProblem(p: DeviceParams, size: DeviceSizeLike): string | undefined {
  if (!(size.w > 0) || !Number.isFinite(size.w)) return `W = ${size.w} m is not a positive length`;
  if (!(size.l > 0) || !Number.isFinite(size.l)) return `L = ${size.l} m is not a positive length`;
  if (!(size.m > 0) || !Number.isFinite(size.m)) return `m = ${size.m} is not a positive count`;
  if (p.table) return undefined;
  if (!(p.kp > 0) || !Number.isFinite(p.kp)) return `kp = ${p.kp} A/V² is not positive`;
  for (const key of ['vt0', 'lambda', 'gamma', 'phi', 'n', 'tcv', 'bex'] as const) {
    if (!Number.isFinite(p[key])) return `${key} = ${p[key]} is not a finite number`;
  }
  if (p.phi <= 0) return `phi = ${p.phi} V must be positive`;
  if (p.n <= 0) return `n = ${p.n} must be positive`;
  return undefined;
}

/** Adjusted parameters of one device. An invalid size yields β = 0 (no channel) rather than
 *  NaN, so a report can still be built; callers check deviceProblem first. */
export function prepareDevice(
  p: DeviceParams, size: DeviceSizeLike, type: Polarity, proc: ProcessConditions,
  dvt = 0, dbeta = 0,
): ModelDevice {
  if (p.table) return prepareTableDevice(p, p.table, size, type, proc, dvt, dbeta);
  const valid = size.w > 0 && size.l > 0 && size.m > 0 && Number.isFinite(size.w * size.l * size.m);
  const beta = valid ? (kpAt(p, proc.temperature, proc.tnom) * size.m * size.w) / size.l * (1 + dbeta) : 0;
  return {
    model: MODELS[modelKindOf(p, proc.model)],
    sign: type === 'pmos' ? -1 : 1,
    beta: Number.isFinite(beta) && beta > 0 ? beta : 0,
    vt0: thresholdAt(p, proc.temperature, proc.tnom) + dvt,
    gamma: p.gamma,
    phi: p.phi > 0 ? p.phi : 0,
    lambda: valid ? lambdaAt(p, size.l) : p.lambda,
    n: p.n > 0 ? p.n : 1,
    ut: thermalVoltage(proc.temperature),
  };
}

function prepareTableDevice(
  p: DeviceParams, table: NonNullable<DeviceParams['table']>, size: DeviceSizeLike, type: Polarity,
  proc: ProcessConditions, dvt: number, dbeta: number,
): ModelDevice {
  const valid = size.w > 0 && size.l > 0 && size.m > 0 && Number.isFinite(size.w * size.l * size.m);
  const scale = valid ? p.kp * size.m * size.w * (1 + dbeta) : 0;
  return {
    model: MODELS.table,
    sign: type === 'pmos' ? -1 : 1,
    beta: Number.isFinite(scale) && scale > 0 ? scale : 0,
    vt0: p.vt0 + dvt,
    gamma: 0, phi: p.phi > 0 ? p.phi : 0.7, lambda: 0,
    n: p.n > 0 ? p.n : 1,
    ut: thermalVoltage(proc.temperature),
    table: sliceAt(table, valid ? size.l : table.l[0]!, proc.temperature),
  };
}

/** What design-target sizing needs of a device of length l (m): kp, n, U_T, and for a table
 *  device its table at that length. */
export function sizingContextOf(p: DeviceParams, proc: ProcessConditions, l: number): SizingContext {
  const ctx: SizingContext = { kp: kpAt(p, proc.temperature, proc.tnom), n: p.n, ut: thermalVoltage(proc.temperature) };
  if (p.table) ctx.slice = sliceAt(p.table, l, proc.temperature);
  return ctx;
}
