/**
 * Cubic Hermite interpolation on a grid axis, with continuous first derivatives (Newton needs
 * them) and exact values at the grid points.
 *
 * Two slope rules:
 * - along `vgs` (interpolated in ln id): monotone slopes (Fritsch & Carlson, "Monotone piecewise
 *   cubic interpolation", SIAM J. Numer. Anal. 17, 1980), precomputed per grid line, so the
 *   interpolant never rings between points of a curve that rises by decades;
 * - along `vds` and `vsb`: the three-point (non-uniform central difference) slope, linear in the
 *   node values. The interpolant is then a fixed linear combination of at most four node values
 *   (`Weights`), so derivatives with respect to the other axes pass straight through it.
 * Beyond the ends the interpolant continues along its end tangent (C¹ across the boundary): the
 * table model reports such a point as `table-range` rather than trusting it.
 */

/** An axis with its three-point slope coefficients: s_k = cm_k·v(k−1) + c0_k·v(k) + cp_k·v(k+1). */
export interface Axis {
  x: Float64Array;
  cm: Float64Array; c0: Float64Array; cp: Float64Array;
}

export function axisOf(xs: readonly number[]): Axis {
  const n = xs.length;
  const x = Float64Array.from(xs);
  const cm = new Float64Array(n), c0 = new Float64Array(n), cp = new Float64Array(n);
  if (n >= 2) {
    const h0 = x[1]! - x[0]!, hn = x[n - 1]! - x[n - 2]!;
    c0[0] = -1 / h0; cp[0] = 1 / h0;
    cm[n - 1] = -1 / hn; c0[n - 1] = 1 / hn;
    for (let k = 1; k < n - 1; k++) {
      const a = x[k]! - x[k - 1]!, b = x[k + 1]! - x[k]!;
      cm[k] = -b / (a * (a + b));
      c0[k] = (b - a) / (a * b);
      cp[k] = a / (b * (a + b));
    }
  }
  return { x, cm, c0, cp };
}

/** Value and derivative at x as combinations of node values: Σ w[m]·v(first + m), Σ dw[m]·v(…). */
export interface Weights { first: number; count: number; w: Float64Array; dw: Float64Array }

export function newWeights(): Weights {
  return { first: 0, count: 0, w: new Float64Array(4), dw: new Float64Array(4) };
}

/** Interval k with x(k) ≤ x < x(k+1), clamped to [0, n − 2]. */
export function intervalOf(x: Float64Array, v: number): number {
  let lo = 0, hi = x.length - 2;
  if (hi <= 0) return 0;
  if (v >= x[hi]!) return hi;
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1;
    if (x[mid]! <= v) lo = mid; else hi = mid;
  }
  return lo;
}

/** Fills `out` with the weights of the three-point-slope Hermite interpolant at v. */
export function weightsAt(a: Axis, v: number, out: Weights): void {
  const { x, cm, c0, cp } = a;
  const n = x.length;
  const w = out.w, dw = out.dw;
  w.fill(0); dw.fill(0);
  if (n === 1) { out.first = 0; out.count = 1; w[0] = 1; return; }
  if (v <= x[0]!) {                       // tangent below the first node
    const d = v - x[0]!;
    out.first = 0; out.count = 2;
    w[0] = 1 + d * c0[0]!; w[1] = d * cp[0]!;
    dw[0] = c0[0]!; dw[1] = cp[0]!;
    return;
  }
  if (v >= x[n - 1]!) {                   // tangent above the last node
    const d = v - x[n - 1]!;
    out.first = n - 2; out.count = 2;
    w[0] = d * cm[n - 1]!; w[1] = 1 + d * c0[n - 1]!;
    dw[0] = cm[n - 1]!; dw[1] = c0[n - 1]!;
    return;
  }
  const k = intervalOf(x, v);
  const h = x[k + 1]! - x[k]!;
  const t = (v - x[k]!) / h;
  const t2 = t * t, t3 = t2 * t;
  const h00 = 2 * t3 - 3 * t2 + 1, h10 = (t3 - 2 * t2 + t) * h, h01 = -2 * t3 + 3 * t2, h11 = (t3 - t2) * h;
  // d/dv of the basis (the h factor of h10, h11 cancels the 1/h of dt/dv)
  const d00 = (6 * t2 - 6 * t) / h, d10 = 3 * t2 - 4 * t + 1, d01 = (-6 * t2 + 6 * t) / h, d11 = 3 * t2 - 2 * t;
  // nodes k−1 … k+2 (the outer two only through the slopes)
  out.first = k - 1; out.count = 4;
  w[0] = h10 * cm[k]!;                              dw[0] = d10 * cm[k]!;
  w[1] = h00 + h10 * c0[k]! + h11 * cm[k + 1]!;     dw[1] = d00 + d10 * c0[k]! + d11 * cm[k + 1]!;
  w[2] = h01 + h10 * cp[k]! + h11 * c0[k + 1]!;     dw[2] = d01 + d10 * cp[k]! + d11 * c0[k + 1]!;
  w[3] = h11 * cp[k + 1]!;                          dw[3] = d11 * cp[k + 1]!;
}

/** Monotone (Fritsch–Carlson) node slopes of the values y at nodes x, written into `out`
 *  from `at` (`stride` apart), for one grid line. */
export function monotoneSlopes(x: Float64Array, y: Float64Array, at: number, stride: number, out: Float64Array): void {
  const n = x.length;
  const yv = (k: number): number => y[at + k * stride]!;
  if (n < 2) { out[at] = 0; return; }
  const delta = (k: number): number => (yv(k + 1) - yv(k)) / (x[k + 1]! - x[k]!);
  if (n === 2) { const d = delta(0); out[at] = d; out[at + stride] = d; return; }
  for (let k = 1; k < n - 1; k++) {
    const d0 = delta(k - 1), d1 = delta(k);
    if (d0 * d1 <= 0) { out[at + k * stride] = 0; continue; }
    const h0 = x[k]! - x[k - 1]!, h1 = x[k + 1]! - x[k]!;
    const w1 = 2 * h1 + h0, w2 = h1 + 2 * h0;
    out[at + k * stride] = (w1 + w2) / (w1 / d0 + w2 / d1);
  }
  // Ends: the three-point formula, kept to the sign of the end interval and at most 3× its secant.
  const end = (k0: number, k1: number, k2: number): number => {
    const h0 = Math.abs(x[k1]! - x[k0]!), h1 = Math.abs(x[k2]! - x[k1]!);
    const d0 = delta(Math.min(k0, k1)), d1 = delta(Math.min(k1, k2));
    let s = ((2 * h0 + h1) * d0 - h0 * d1) / (h0 + h1);
    if (s * d0 <= 0) s = 0;
    else if (d0 * d1 <= 0 && Math.abs(s) > 3 * Math.abs(d0)) s = 3 * d0;
    return s;
  };
  out[at] = end(0, 1, 2);
  out[at + (n - 1) * stride] = end(n - 1, n - 2, n - 3);
}
