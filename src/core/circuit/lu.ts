/**
 * Dense LU with partial pivoting on a row-major Float64Array, in place: the solve of circuits
 * of a few dozen nodes (every template), where it is both simplest and fastest.
 */

/** Factor the n×n matrix `a` in place (PA = LU, unit lower L). `perm[i]` is the original row
 *  now at row i. Returns false when a pivot is zero or not finite. */
export function luFactor(a: Float64Array, n: number, perm: Int32Array): boolean {
  for (let i = 0; i < n; i++) perm[i] = i;
  for (let k = 0; k < n; k++) {
    let p = k;
    let best = Math.abs(a[k * n + k]!);
    for (let i = k + 1; i < n; i++) {
      const v = Math.abs(a[i * n + k]!);
      if (v > best) { best = v; p = i; }
    }
    if (!(best > 0) || !Number.isFinite(best)) return false;
    if (p !== k) {
      for (let j = 0; j < n; j++) {
        const t = a[k * n + j]!; a[k * n + j] = a[p * n + j]!; a[p * n + j] = t;
      }
      const t = perm[k]!; perm[k] = perm[p]!; perm[p] = t;
    }
    const pivot = a[k * n + k]!;
    for (let i = k + 1; i < n; i++) {
      const f = a[i * n + k]! / pivot;
      a[i * n + k] = f;
      if (f !== 0) for (let j = k + 1; j < n; j++) a[i * n + j] = a[i * n + j]! - f * a[k * n + j]!;
    }
  }
  return true;
}

/** Solve A·x = b with the factors; b is overwritten by x. `tmp` holds n scratch values. */
export function luSolve(a: Float64Array, n: number, perm: Int32Array, b: Float64Array, tmp: Float64Array): void {
  for (let i = 0; i < n; i++) tmp[i] = b[perm[i]!]!;
  for (let i = 1; i < n; i++) {
    let s = tmp[i]!;
    for (let j = 0; j < i; j++) s -= a[i * n + j]! * tmp[j]!;
    tmp[i] = s;
  }
  for (let i = n - 1; i >= 0; i--) {
    let s = tmp[i]!;
    for (let j = i + 1; j < n; j++) s -= a[i * n + j]! * tmp[j]!;
    tmp[i] = s / a[i * n + i]!;
  }
  for (let i = 0; i < n; i++) b[i] = tmp[i]!;
}

/** Solve Aᵀ·y = c with the factors of A (Aᵀ = Uᵀ·Lᵀ·P); c is overwritten by y. */
export function luSolveTranspose(a: Float64Array, n: number, perm: Int32Array, c: Float64Array, tmp: Float64Array): void {
  for (let i = 0; i < n; i++) {          // Uᵀ·w = c (forward)
    let s = c[i]!;
    for (let j = 0; j < i; j++) s -= a[j * n + i]! * tmp[j]!;
    tmp[i] = s / a[i * n + i]!;
  }
  for (let i = n - 1; i >= 0; i--) {     // Lᵀ·z = w (backward, unit diagonal)
    let s = tmp[i]!;
    for (let j = i + 1; j < n; j++) s -= a[j * n + i]! * tmp[j]!;
    tmp[i] = s;
  }
  for (let i = 0; i < n; i++) c[perm[i]!] = tmp[i]!;  // y = Pᵀ·z
}
