/** Dense LU with partial pivoting against exact solutions of known systems. */
import { describe, expect, it } from 'vitest';
import { luFactor, luSolve, luSolveTranspose } from '../../src/core/circuit/lu';

function matVec(a: number[][], x: number[]): number[] { return a.map((row) => row.reduce((s, v, j) => s + v * x[j]!, 0)); }
function transpose(a: number[][]): number[][] { return a[0]!.map((_, j) => a.map((row) => row[j]!)); }

describe('LU', () => {
  // A needs a row exchange at the first step (zero leading pivot).
  const A = [[0, 2, 1, 0], [1, 1, 0, 3], [4, 0, 1, 1], [2, 5, 3, 1]];
  const x = [1, -2, 3, 0.5];
  const n = 4;
  const factor = (): { lu: Float64Array; perm: Int32Array } => {
    const lu = Float64Array.from(A.flat());
    const perm = new Int32Array(n);
    expect(luFactor(lu, n, perm)).toBe(true);
    return { lu, perm };
  };
  it('solves A·x = b (with pivoting)', () => {
    const { lu, perm } = factor();
    const b = Float64Array.from(matVec(A, x));
    luSolve(lu, n, perm, b, new Float64Array(n));
    x.forEach((xi, i) => expect(b[i]).toBeCloseTo(xi, 12));
  });
  it('solves Aᵀ·y = c with the same factors', () => {
    const { lu, perm } = factor();
    const c = Float64Array.from(matVec(transpose(A), x));
    luSolveTranspose(lu, n, perm, c, new Float64Array(n));
    x.forEach((xi, i) => expect(c[i]).toBeCloseTo(xi, 12));
  });
  it('reports a singular matrix', () => {
    const lu = Float64Array.from([1, 2, 2, 4]);
    expect(luFactor(lu, 2, new Int32Array(2))).toBe(false);
  });
  it('keeps a gmin-sized pivot (1e-12 next to 1e-3 entries)', () => {
    const lu = Float64Array.from([1e-3, 0, 0, 1e-12]);
    const perm = new Int32Array(2);
    expect(luFactor(lu, 2, perm)).toBe(true);
    const b = Float64Array.from([1e-6, 1e-13]);
    luSolve(lu, 2, perm, b, new Float64Array(2));
    expect(b[0]).toBeCloseTo(1e-3, 15);
    expect(b[1]).toBeCloseTo(0.1, 12);
  });
});
