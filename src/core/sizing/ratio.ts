/**
 * Sizing the ratio-setting device for a target current ratio, length modulation included: the
 * full circuit is re-solved at the nominal output voltage for each trial width, so VDS mismatch,
 * body effect and λ(L) are all in the answer (a hand formula would only give the geometric ratio).
 */
import type { ResolvedSpec } from '../types';
import { bracketedRoot } from './root';
import { resized, sameRef, sizeOf, solve, type DeviceRef } from './devices';

/** Measured iout/iin at the nominal output voltage, NaN when the solve fails. */
export function ratioAt(spec: ResolvedSpec, mirrorIndex: number, outputIndex: number): number {
  const op = solve(spec, mirrorIndex, outputIndex);
  return op && op.iin > 0 ? op.iout / op.iin : NaN;
}

/**
 * Width of `device` (m) that makes iout/iin equal `target` within relative `tol`. The ratio
 * grows with the width of the ratio device (out, or the Wilson's diode), close to linearly, so
 * the first secant step from the proportional estimate is usually within 0.1 %.
 */
export function widthForRatio(spec: ResolvedSpec, mirrorIndex: number, outputIndex: number, device: DeviceRef, target: number, tol = 1e-5): number | undefined {
  const size = sizeOf(spec, device);
  if (!size || !(target > 0)) return undefined;
  const f = (w: number) => ratioAt(resized(spec, mirrorIndex, (r, s) => (sameRef(r, device) ? { ...s, w } : undefined)), mirrorIndex, outputIndex) / target - 1;
  const f0 = f(size.w);
  if (!Number.isFinite(f0)) return undefined;
  if (Math.abs(f0) <= tol) return size.w;
  // Proportional first guess, then widen the bracket geometrically until it straddles the root.
  let a = size.w;
  let fa = f0;
  let b = size.w / (1 + f0);
  let fb = f(b);
  for (let i = 0; i < 12 && Number.isFinite(fb) && Math.sign(fb) === Math.sign(fa); i++) {
    a = b; fa = fb;
    b = fa > 0 ? b / 1.5 : b * 1.5;
    fb = f(b);
  }
  if (!Number.isFinite(fb) || Math.sign(fb) === Math.sign(fa)) return undefined;
  const root = bracketedRoot(f, Math.min(a, b), Math.max(a, b), { xTol: 1e-7, fTol: tol });
  return root ? root.x : undefined;
}

/** The parallel count m nearest the target ratio (an integer; only when it differs from today's). */
export function countForRatio(spec: ResolvedSpec, mirrorIndex: number, outputIndex: number, device: DeviceRef, target: number): number | undefined {
  const size = sizeOf(spec, device);
  if (!size) return undefined;
  const now = ratioAt(spec, mirrorIndex, outputIndex);
  if (!Number.isFinite(now) || now <= 0) return undefined;
  const m = Math.max(1, Math.round(size.m * target / now));
  return m === size.m ? undefined : m;
}
