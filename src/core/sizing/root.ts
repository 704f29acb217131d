/**
 * Bracketed root finding for the sizing solvers. Every evaluation is a full circuit solve, so
 * the methods keep the count low (secant steps, Illinois-safeguarded) and never leave the
 * bracket, which makes them safe on the kinks a region change puts in a curve.
 */

export interface RootResult { x: number; fx: number; evaluations: number }

/** A function that may fail to evaluate (a solve that did not converge): NaN means "unknown". */
export type Scalar = (x: number) => number;

/**
 * Root of f in [a, b] where f(a) and f(b) have opposite signs (Illinois regula falsi, which
 * keeps the bracket and converges superlinearly). Stops when the bracket is narrower than
 * `xTol` relative to |x|, or |f| ≤ fTol. Returns undefined if the bracket is not a bracket or
 * an evaluation fails.
 */
export function bracketedRoot(f: Scalar, a: number, b: number, opts: { xTol?: number; fTol?: number; maxEvaluations?: number } = {}): RootResult | undefined {
  const xTol = opts.xTol ?? 1e-4;
  const fTol = opts.fTol ?? 0;
  const maxEvaluations = opts.maxEvaluations ?? 40;
  let fa = f(a);
  let fb = f(b);
  let evaluations = 2;
  if (!Number.isFinite(fa) || !Number.isFinite(fb)) return undefined;
  if (fa === 0) return { x: a, fx: 0, evaluations };
  if (fb === 0) return { x: b, fx: 0, evaluations };
  if (Math.sign(fa) === Math.sign(fb)) return undefined;
  let side = 0;
  let x = a;
  let fx = fa;
  while (evaluations < maxEvaluations) {
    x = (a * fb - b * fa) / (fb - fa);
    // Keep the step inside the bracket (and away from its ends) even if the secant overshoots.
    const lo = Math.min(a, b);
    const hi = Math.max(a, b);
    if (!(x > lo && x < hi)) x = 0.5 * (a + b);
    fx = f(x);
    evaluations++;
    if (!Number.isFinite(fx)) {
      // An unknown point: fall back to bisection from the end nearest a known value.
      x = 0.5 * (a + b);
      fx = f(x);
      evaluations++;
      if (!Number.isFinite(fx)) return undefined;
    }
    if (Math.abs(fx) <= fTol) return { x, fx, evaluations };
    if (Math.sign(fx) === Math.sign(fb)) {
      b = x; fb = fx;
      if (side === -1) fa /= 2;
      side = -1;
    } else {
      a = x; fa = fx;
      if (side === 1) fb /= 2;
      side = 1;
    }
    if (Math.abs(b - a) <= xTol * Math.max(Math.abs(x), Number.MIN_VALUE)) break;
  }
  return { x, fx, evaluations };
}

/**
 * Smallest scale k in [1, kMax] (geometric search) at which `meets(k) ≥ 0`, refined by bisection
 * to relative `tol`. `meets` is a margin-like function that grows with k (more width → more
 * margin). Returns undefined when even kMax does not meet it, or k = 1 already does.
 */
export function smallestScale(meets: Scalar, opts: { kMax?: number; growth?: number; tol?: number; kMin?: number } = {}): number | undefined {
  const kMax = opts.kMax ?? 64;
  const growth = opts.growth ?? 2;
  const tol = opts.tol ?? 2e-3;
  let lo = opts.kMin ?? 1;
  const f0 = meets(lo);
  if (f0 >= 0) return undefined;
  let hi = lo;
  let fhi = f0;
  while (!(fhi >= 0)) {
    if (hi >= kMax) return undefined;
    lo = hi;
    hi = Math.min(hi * growth, kMax);
    fhi = meets(hi);
  }
  // Bisection on log k: the metrics vary roughly as powers of k.
  while (hi / lo - 1 > tol) {
    const mid = Math.sqrt(lo * hi);
    const fm = meets(mid);
    if (fm >= 0) hi = mid; else lo = mid;
  }
  return hi;
}
