/**
 * The linear solves of Newton and the small-signal analysis, on the free block of the Jacobian:
 * dense LU for the small circuits of the templates (fastest there, and every figure stays
 * bit-identical to what it has always been), sparse LU with a fill-reducing order beyond
 * SOLVER.denseMaxNodes unknowns.
 */
import type { JacobianPattern } from './jacobian';
import { luFactor, luSolve, luSolveTranspose } from './lu';
import { SparseLu } from './sparseLu';

export interface LinearSolver {
  /** Factor the free block of the Jacobian values; false when singular. */
  factor(values: Float64Array): boolean;
  /** A·x = b in place (the first n entries of b). */
  solve(b: Float64Array): void;
  /** Aᵀ·y = c in place. */
  solveTranspose(c: Float64Array): void;
  /** Aᵀ·y = c in place for c zero but at the free nodes `nz`, in time proportional to the
   *  entries a nonzero reaches; returns the nodes where y may be nonzero (ascending), or
   *  undefined where it cannot (then nothing is done: use solveTranspose). Agrees with
   *  solveTranspose bit for bit but for the sign of a zero. */
  solveTransposeSparse(c: Float64Array, nz: readonly number[]): number[] | undefined;
}

export class DenseSolver implements LinearSolver {
  private readonly lu: Float64Array;
  private readonly perm: Int32Array;
  private readonly tmp: Float64Array;
  /** `buf` holds n² + n values for the factors and a scratch vector, `perm` n pivots (the
   *  workspace's). */
  constructor(private readonly pattern: JacobianPattern, buf: Float64Array, perm: Int32Array) {
    const n = pattern.n;
    this.lu = buf.subarray(0, n * n);
    this.tmp = buf.subarray(n * n, n * n + n);
    this.perm = perm;
  }
  factor(values: Float64Array): boolean {
    const { n, colPtr, rowIdx, freeEnd } = this.pattern;
    const lu = this.lu;
    lu.fill(0);
    for (let j = 0; j < n; j++) for (let p = colPtr[j]!; p < freeEnd[j]!; p++) lu[rowIdx[p]! * n + j] = values[p]!;
    return luFactor(lu, n, this.perm);
  }
  solve(b: Float64Array): void { luSolve(this.lu, this.pattern.n, this.perm, b, this.tmp); }
  solveTranspose(c: Float64Array): void { luSolveTranspose(this.lu, this.pattern.n, this.perm, c, this.tmp); }
  solveTransposeSparse(): undefined { return undefined; }
}

export class SparseSolver implements LinearSolver {
  private made?: SparseLu;
  constructor(private readonly pattern: JacobianPattern, private readonly order: Int32Array) {}
  /** The factorization's buffers, made on first use: a workspace that is only assembled (a
   *  network's joint circuit at T ± dT, network/drift.ts) never needs them. */
  private get lu(): SparseLu {
    const p = this.pattern;
    return (this.made ??= new SparseLu(p.n, p.colPtr, p.rowIdx, p.freeEnd, this.order));
  }
  factor(values: Float64Array): boolean { return this.lu.factor(values); }
  solve(b: Float64Array): void { this.lu.solve(b); }
  solveTranspose(c: Float64Array): void { this.lu.solveTranspose(c); }
  solveTransposeSparse(c: Float64Array, nz: readonly number[]): number[] | undefined { return this.lu.solveTransposeSparse(c, nz); }
}
