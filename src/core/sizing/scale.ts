/**
 * Scaling a whole mirror: every device by the same factor keeps every ratio and (at constant
 * W/L) every overdrive, so one number answers "how much wider for this margin" or "how much
 * longer for this output resistance".
 *
 * - width only (×k on W): VOV ∝ 1/√k — restores saturation margin, compliance, input headroom;
 * - W and L together (×k on both, constant W/L): λ = lambda·lref/L falls as 1/k, so ro ∝ k and
 *   a cascode's gm·ro² ∝ k², while VOV stays put;
 * - area at constant W/L: Pelgrom σ ∝ 1/√(W·L), so ×s on W and L divides σ by s.
 */
import type { ResolvedSpec } from '../types';
import { smallestScale } from './root';
import { measure, scaled } from './devices';

export type ScaleAxes = { w: boolean; l: boolean };

/** The mirror scaled by k on the chosen axes. */
export function scaleMirror(spec: ResolvedSpec, mirrorIndex: number, k: number, axes: ScaleAxes): ResolvedSpec {
  return scaled(spec, mirrorIndex, { w: axes.w ? k : 1, l: axes.l ? k : 1 });
}

/**
 * Smallest k in (1, kMax] at which `goal(scaled spec) ≥ 0`. `goal` returns a margin-like number
 * (NaN when the scaled circuit cannot be solved). Undefined when k = 1 already meets it or kMax
 * does not.
 */
export function scaleForGoal(spec: ResolvedSpec, mirrorIndex: number, axes: ScaleAxes, goal: (s: ResolvedSpec) => number, kMax = 64): number | undefined {
  return smallestScale((k) => goal(scaleMirror(spec, mirrorIndex, k, axes)), { kMax, growth: 2, tol: 1e-3 });
}

/**
 * Linear factor s on W and L (area ×s²) for a required sigma: the Pelgrom closed form s = σ/σreq
 * (Pelgrom, Duinmaijer & Welbers, IEEE JSSC 24(5), 1989: σ ∝ 1/√(W·L)), then corrected against
 * the engine's sigma, which also moves a little with λ(L) and the operating point.
 */
export function areaScaleForSigma(spec: ResolvedSpec, mirrorIndex: number, outputIndex: number, target: number): number | undefined {
  const first = measure(spec, mirrorIndex, outputIndex)?.sigma;
  if (first === undefined || !(target > 0) || first <= target) return undefined;
  let s = first / target;
  for (let i = 0; i < 4; i++) {
    const now = measure(scaleMirror(spec, mirrorIndex, s, { w: true, l: true }), mirrorIndex, outputIndex)?.sigma;
    if (now === undefined) return undefined;
    if (now <= target * (1 - 1e-4)) return s;
    s *= (now / target) * 1.001;
  }
  return undefined;
}
