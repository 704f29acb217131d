/**
 * Sparse LU and its fill-reducing order against known solutions: random sparse systems whose
 * solution is chosen first, a system that needs a row exchange, refactorization on changed
 * values (kept pivots, and a pivot that has become too small), the transposed solve, and the
 * symbolic cost of the orders of a star and of a dense block (common practice: a star eliminated
 * leaves first has no fill; a dense block of k nodes costs about k³/3).
 */
import { describe, expect, it } from 'vitest';
import { minimumDegree } from '../../src/core/circuit/ordering';
import { SparseLu } from '../../src/core/circuit/sparseLu';

/** A pattern in compressed columns from a dense row-major matrix (zeros left out). */
function compress(a: number[][]): { colPtr: Int32Array; rowIdx: Int32Array; colEnd: Int32Array; values: Float64Array } {
  const n = a.length;
  const colPtr = new Int32Array(n + 1), rows: number[] = [], vals: number[] = [];
  for (let j = 0; j < n; j++) {
    for (let i = 0; i < n; i++) if (a[i]![j] !== 0) { rows.push(i); vals.push(a[i]![j]!); }
    colPtr[j + 1] = rows.length;
  }
  return { colPtr, rowIdx: Int32Array.from(rows), colEnd: colPtr.slice(1), values: Float64Array.from(vals) };
}

function matVec(a: number[][], x: number[]): Float64Array { return Float64Array.from(a.map((row) => row.reduce((s, v, j) => s + v * x[j]!, 0))); }
function transpose(a: number[][]): number[][] { return a[0]!.map((_, j) => a.map((row) => row[j]!)); }

/** A reproducible sparse matrix of n nodes shaped like a nodal Jacobian: a tree of conductances
 *  plus a few transconductances off the diagonal (unsymmetric entries). */
function circuitLike(n: number, seed: number): number[][] {
  let s = seed;
  const rnd = (): number => { s = (s * 1103515245 + 12345) % 2147483648; return s / 2147483648; };
  const a = Array.from({ length: n }, () => new Array<number>(n).fill(0));
  for (let i = 1; i < n; i++) {
    const p = Math.floor(rnd() * i), g = 1e-5 * (1 + 9 * rnd());
    a[i]![i]! += g; a[p]![p]! += g; a[i]![p]! -= g; a[p]![i]! -= g;
  }
  for (let k = 0; k < n; k++) {
    const i = Math.floor(rnd() * n), j = Math.floor(rnd() * n);
    if (i !== j) a[i]![j]! += 1e-4 * rnd();
  }
  for (let i = 0; i < n; i++) a[i]![i]! += 1e-12;
  return a;
}

function factorOf(a: number[][]): { lu: SparseLu; values: Float64Array } {
  const n = a.length;
  const c = compress(a);
  const o = minimumDegree(n, c.colPtr, c.rowIdx, c.colEnd, 1e9)!;
  const lu = new SparseLu(n, c.colPtr, c.rowIdx, c.colEnd, o.order);
  return { lu, values: c.values };
}

describe('sparse LU', () => {
  it('solves A·x = b and Aᵀ·y = c on circuit-like systems of 5 to 300 nodes', () => {
    for (const [n, seed] of [[5, 1], [40, 2], [300, 3]] as const) {
      const a = circuitLike(n, seed);
      const x = Array.from({ length: n }, (_, i) => Math.sin(i + 1));
      const { lu, values } = factorOf(a);
      expect(lu.factor(values)).toBe(true);
      const b = matVec(a, x);
      lu.solve(b);
      x.forEach((xi, i) => expect(Math.abs(b[i]! - xi)).toBeLessThan(1e-8));
      const c = matVec(transpose(a), x);
      lu.solveTranspose(c);
      x.forEach((xi, i) => expect(Math.abs(c[i]! - xi)).toBeLessThan(1e-8));
    }
  });
  it('exchanges rows where a diagonal entry is zero', () => {
    const a = [[0, 2, 1, 0], [1, 1, 0, 3], [4, 0, 1, 1], [2, 5, 3, 1]];
    const x = [1, -2, 3, 0.5];
    const { lu, values } = factorOf(a);
    expect(lu.factor(values)).toBe(true);
    const b = matVec(a, x);
    lu.solve(b);
    x.forEach((xi, i) => expect(b[i]).toBeCloseTo(xi, 12));
  });
  it('refactors changed values on the kept pivots, and pivots afresh when a kept pivot fails', () => {
    const a = [[4, 1, 0], [1, 3, 1], [0, 1, 2]];
    const x = [1, 2, 3];
    const { lu, values } = factorOf(a);
    expect(lu.factor(values)).toBe(true);
    // Same pattern, new values: a Newton iteration's refactorization.
    const a2 = [[5, 2, 0], [1, 4, 1], [0, 3, 2]];
    expect(lu.factor(compress(a2).values)).toBe(true);
    const b2 = matVec(a2, x);
    lu.solve(b2);
    x.forEach((xi, i) => expect(b2[i]).toBeCloseTo(xi, 12));
    // A diagonal that vanished: the kept pivot sequence no longer works.
    const a3 = [[1e-30, 2, 0], [1, 4, 1], [0, 3, 2]];
    expect(lu.factor(compress(a3).values)).toBe(true);
    const b3 = matVec(a3, x);
    lu.solve(b3);
    x.forEach((xi, i) => expect(b3[i]).toBeCloseTo(xi, 10));
  });
  it('a transposed solve of a sparse right-hand side equals the dense one bit for bit, and names its support', () => {
    // The identity is exact by construction (the same operations in the same order on every
    // entry the right-hand side reaches), so the check is exact equality, not a tolerance.
    for (const [n, seed] of [[40, 4], [300, 5]] as const) {
      const a = circuitLike(n, seed);
      const { lu, values } = factorOf(a);
      expect(lu.factor(values)).toBe(true);
      for (const nz of [[0], [n - 1], [3, 7], [Math.floor(n / 2), 1, n - 2]]) {
        const dense = new Float64Array(n);
        nz.forEach((i, k) => { dense[i] = 1 + k; });
        const sparse = dense.slice();
        lu.solveTranspose(dense);
        const support = lu.solveTransposeSparse(sparse, nz)!;
        expect(Array.from(sparse)).toEqual(Array.from(dense));
        expect(support).toEqual([...support].sort((x, y) => x - y));
        dense.forEach((v, i) => { if (v !== 0) expect(support).toContain(i); });
      }
    }
  });
  it('reports a singular matrix', () => {
    const { lu, values } = factorOf([[1, 2], [2, 4]]);
    expect(lu.factor(values)).toBe(false);
  });
});

describe('minimum-degree order', () => {
  it('a star (a hub and 1 000 branches) is eliminated branches first, without fill', () => {
    const n = 1001;
    const a = Array.from({ length: n }, () => new Array<number>(n).fill(0));
    for (let i = 1; i < n; i++) { a[0]![i] = -1; a[i]![0] = -1; a[i]![i] = 2; }
    a[0]![0] = n;
    const c = compress(a);
    const o = minimumDegree(n, c.colPtr, c.rowIdx, c.colEnd, 1e9)!;
    expect(o.fill).toBe(n - 1);           // each branch's one entry, nothing added
    // The hub goes when one branch is left (then both have degree 1; ties take the lower index).
    expect(Array.from(o.order).indexOf(0)).toBe(n - 2);
  });
  it('a dense block of 30 nodes costs Σ k² + k multiply-adds, and a work limit refuses it', () => {
    const n = 30;
    const a = Array.from({ length: n }, () => new Array<number>(n).fill(1));
    const c = compress(a);
    const o = minimumDegree(n, c.colPtr, c.rowIdx, c.colEnd, 1e9)!;
    expect(o.fill).toBe((n * (n - 1)) / 2);
    expect(o.flops).toBe(8990);           // Σ_{d=0}^{29} d² + d = 8555 + 435
    expect(minimumDegree(n, c.colPtr, c.rowIdx, c.colEnd, 1000)).toBeUndefined();
  });
});
