/**
 * Sparse LU of the Jacobian's free block: left-looking Gilbert–Peierls factorization with
 * threshold partial pivoting that prefers the diagonal (J. R. Gilbert and T. Peierls, "Sparse
 * partial pivoting in time proportional to arithmetic operations", SIAM J. Sci. Stat. Comput.
 * 9(5), 1988; T. A. Davis, "Direct Methods for Sparse Linear Systems", SIAM 2006, ch. 6), in
 * the column order of a fill-reducing ordering chosen once per circuit.
 *
 * Newton refactors the same pattern every iteration: after the first factorization the pivot
 * sequence and the patterns of L and U are kept, and a refactorization redoes only the
 * arithmetic (as KLU does, T. A. Davis and E. Palamadai Natarajan, ACM TOMS 37(3), 2010). When a
 * kept pivot has become too small against its column, the factorization pivots afresh.
 */

/** A pivot is kept while |pivot| ≥ PIVOT_TOL·(largest entry below it); the diagonal is
 *  preferred on the same terms (Davis 2006 suggests 0.001 for such matrices). */
const PIVOT_TOL = 1e-3;

export class SparseLu {
  private readonly n: number;
  private readonly colPtr: Int32Array;
  private readonly rowIdx: Int32Array;
  private readonly colEnd: Int32Array;
  /** Column order: column q[k] is factored k-th. */
  private readonly q: Int32Array;
  /** Row i is pivot row pinv[i]. */
  private readonly pinv: Int32Array;
  private Lp: Int32Array; private Li: Int32Array; private Lx: Float64Array;
  private Up: Int32Array; private Ui: Int32Array; private Ux: Float64Array;
  private readonly x: Float64Array;
  private readonly w: Float64Array;
  /** DFS stack (0 … n−1) and its positions (n … 2n−1); reach output grows down from n. */
  private readonly xi: Int32Array;
  private readonly mark: Int32Array;
  private stamp = 0;
  /** Whether L and U hold a pattern and pivot sequence a refactorization may reuse. */
  private havePattern = false;
  /** What a transpose solve with a sparse right-hand side reads (`reachIndex`): built once per
   *  pivot sequence; `finite` is checked once per factorization. */
  private reach?: ReachIndex;
  private finite: boolean | undefined;

  /** The free block is column j's entries colPtr[j] … colEnd[j]−1 (rows < n). */
  constructor(n: number, colPtr: Int32Array, rowIdx: Int32Array, colEnd: Int32Array, order: Int32Array) {
    this.n = n;
    this.colPtr = colPtr; this.rowIdx = rowIdx; this.colEnd = colEnd;
    this.q = order;
    this.pinv = new Int32Array(n);
    let nnz = 0;
    for (let j = 0; j < n; j++) nnz += colEnd[j]! - colPtr[j]!;
    const cap = 2 * nnz + n;
    this.Lp = new Int32Array(n + 1); this.Li = new Int32Array(cap); this.Lx = new Float64Array(cap);
    this.Up = new Int32Array(n + 1); this.Ui = new Int32Array(cap); this.Ux = new Float64Array(cap);
    this.x = new Float64Array(n);
    this.w = new Float64Array(n);
    this.xi = new Int32Array(2 * n);
    this.mark = new Int32Array(n);
  }

  /** Factor the free block whose entries are values[p] for the pattern's positions p. Returns
   *  false when the matrix is singular (or not finite). */
  factor(values: Float64Array): boolean {
    this.finite = undefined;
    if (this.havePattern && this.refactor(values)) return true;
    this.havePattern = this.pivoting(values);
    return this.havePattern;
  }

  /** Entries of L and U (the diagonal of U included): the cost of a solve. */
  get size(): number { return this.Lp[this.n]! + this.Up[this.n]!; }

  private grow(needL: number, needU: number): void {
    if (needL > this.Li.length) {
      const cap = 2 * needL;
      const li = new Int32Array(cap); li.set(this.Li); this.Li = li;
      const lx = new Float64Array(cap); lx.set(this.Lx); this.Lx = lx;
    }
    if (needU > this.Ui.length) {
      const cap = 2 * needU;
      const ui = new Int32Array(cap); ui.set(this.Ui); this.Ui = ui;
      const ux = new Float64Array(cap); ux.set(this.Ux); this.Ux = ux;
    }
  }

  /** Depth-first search from row j over the graph of L: rows reached are pushed (in
   *  topological order) below `top`; returns the new top. */
  private dfs(j0: number, top: number): number {
    const { n, xi, mark, pinv, stamp } = this;
    const Lp = this.Lp, Li = this.Li;
    let head = 0;
    xi[0] = j0;
    while (head >= 0) {
      const j = xi[head]!;
      const jnew = pinv[j]!;
      if (mark[j] !== stamp) { mark[j] = stamp; xi[n + head] = jnew < 0 ? 0 : Lp[jnew]!; }
      let done = true;
      const p2 = jnew < 0 ? 0 : Lp[jnew + 1]!;
      for (let p = xi[n + head]!; p < p2; p++) {
        const i = Li[p]!;
        if (mark[i] === stamp) continue;
        xi[n + head] = p;
        xi[++head] = i;
        done = false;
        break;
      }
      if (done) { head--; xi[--top] = j; }
    }
    return top;
  }

  /** Factorization with threshold partial pivoting (Davis 2006, cs_lu). */
  private pivoting(values: Float64Array): boolean {
    const { n, colPtr, rowIdx, colEnd, q, pinv, x, xi } = this;
    this.reach = undefined;
    pinv.fill(-1);
    x.fill(0);
    let lnz = 0, unz = 0;
    for (let k = 0; k < n; k++) {
      this.Lp[k] = lnz; this.Up[k] = unz;
      this.grow(lnz + n, unz + n);
      const Lp = this.Lp, Li = this.Li, Lx = this.Lx, Ui = this.Ui, Ux = this.Ux;
      const col = q[k]!;
      // x = L \ A(:, col) on the rows A(:, col) reaches through L.
      this.stamp++;
      let top = n;
      for (let p = colPtr[col]!; p < colEnd[col]!; p++) {
        if (this.mark[rowIdx[p]!] !== this.stamp) top = this.dfs(rowIdx[p]!, top);
      }
      for (let p = top; p < n; p++) x[xi[p]!] = 0;
      for (let p = colPtr[col]!; p < colEnd[col]!; p++) x[rowIdx[p]!] = values[p]!;
      for (let px = top; px < n; px++) {
        const j = xi[px]!;
        const J = pinv[j]!;
        if (J < 0) continue;
        const xj = x[j]!;
        for (let p = Lp[J]! + 1; p < Lp[J + 1]!; p++) x[Li[p]!] = x[Li[p]!]! - Lx[p]! * xj;
      }
      let ipiv = -1, big = -1;
      for (let p = top; p < n; p++) {
        const i = xi[p]!;
        if (pinv[i]! < 0) {
          const t = Math.abs(x[i]!);
          if (t > big) { big = t; ipiv = i; }
        } else {
          Ui[unz] = pinv[i]!; Ux[unz++] = x[i]!;
        }
      }
      if (ipiv < 0 || !(big > 0) || !Number.isFinite(big)) { x.fill(0); return false; }
      if (pinv[col]! < 0 && Math.abs(x[col]!) >= PIVOT_TOL * big) ipiv = col;
      const pivot = x[ipiv]!;
      Ui[unz] = k; Ux[unz++] = pivot;
      pinv[ipiv] = k;
      Li[lnz] = ipiv; Lx[lnz++] = 1;
      for (let p = top; p < n; p++) {
        const i = xi[p]!;
        if (pinv[i]! < 0) { Li[lnz] = i; Lx[lnz++] = x[i]! / pivot; }
        x[i] = 0;
      }
    }
    this.Lp[n] = lnz; this.Up[n] = unz;
    for (let p = 0; p < lnz; p++) this.Li[p] = pinv[this.Li[p]!]!;
    return true;
  }

  /** The arithmetic of a factorization on the kept pattern and pivots; false (and nothing
   *  usable) when a pivot fails the threshold. */
  private refactor(values: Float64Array): boolean {
    const { n, colPtr, rowIdx, colEnd, q, pinv, x, Lp, Li, Lx, Up, Ui, Ux } = this;
    for (let k = 0; k < n; k++) {
      const col = q[k]!;
      for (let p = colPtr[col]!; p < colEnd[col]!; p++) x[pinv[rowIdx[p]!]!] = values[p]!;
      const diag = Up[k + 1]! - 1;
      for (let p = Up[k]!; p < diag; p++) {
        const j = Ui[p]!;
        const ujk = x[j]!;
        Ux[p] = ujk;
        x[j] = 0;
        for (let r = Lp[j]! + 1; r < Lp[j + 1]!; r++) x[Li[r]!] = x[Li[r]!]! - Lx[r]! * ujk;
      }
      const pivot = x[k]!;
      x[k] = 0;
      let big = 0;
      for (let r = Lp[k]! + 1; r < Lp[k + 1]!; r++) { const t = Math.abs(x[Li[r]!]!); if (t > big) big = t; }
      if (!(Math.abs(pivot) >= PIVOT_TOL * big) || pivot === 0 || !Number.isFinite(pivot)) { x.fill(0); return false; }
      Ux[diag] = pivot;
      for (let r = Lp[k]! + 1; r < Lp[k + 1]!; r++) { const i = Li[r]!; Lx[r] = x[i]! / pivot; x[i] = 0; }
    }
    return true;
  }

  /** Solve A·x = b in place (b holds n entries in node order). */
  solve(b: Float64Array): void {
    const { n, q, pinv, w, Lp, Li, Lx, Up, Ui, Ux } = this;
    for (let i = 0; i < n; i++) w[pinv[i]!] = b[i]!;
    for (let j = 0; j < n; j++) {
      const wj = w[j]!;
      if (wj !== 0) for (let p = Lp[j]! + 1; p < Lp[j + 1]!; p++) w[Li[p]!] = w[Li[p]!]! - Lx[p]! * wj;
    }
    for (let j = n - 1; j >= 0; j--) {
      const diag = Up[j + 1]! - 1;
      const wj = w[j]! / Ux[diag]!;
      w[j] = wj;
      if (wj !== 0) for (let p = Up[j]!; p < diag; p++) w[Ui[p]!] = w[Ui[p]!]! - Ux[p]! * wj;
    }
    for (let k = 0; k < n; k++) b[q[k]!] = w[k]!;
  }

  /** Solve Aᵀ·y = c in place with the same factors (PAQ = LU, so Aᵀ = Q·Uᵀ·Lᵀ·P). */
  solveTranspose(c: Float64Array): void {
    const { n, q, pinv, w, Lp, Li, Lx, Up, Ui, Ux } = this;
    for (let k = 0; k < n; k++) w[k] = c[q[k]!]!;
    for (let j = 0; j < n; j++) {
      const diag = Up[j + 1]! - 1;
      let s = w[j]!;
      for (let p = Up[j]!; p < diag; p++) s -= Ux[p]! * w[Ui[p]!]!;
      w[j] = s / Ux[diag]!;
    }
    for (let j = n - 1; j >= 0; j--) {
      let s = w[j]!;
      for (let p = Lp[j]! + 1; p < Lp[j + 1]!; p++) s -= Lx[p]! * w[Li[p]!]!;
      w[j] = s;
    }
    for (let i = 0; i < n; i++) c[i] = w[pinv[i]!]!;
  }

  /**
   * Aᵀ·y = c in place for a right-hand side that is zero but at the nodes `nz`, visiting only
   * the entries a nonzero can reach through Uᵀ and then Lᵀ (Gilbert and Peierls's reach, on the
   * transposed graphs). Returns the nodes where y may be nonzero, ascending; y is (exactly) zero
   * elsewhere. Every entry it computes takes the same operations in the same order as
   * `solveTranspose` (each dot product over its whole column; the entries outside the reach it
   * reads are zeros there too), so the two agree bit for bit but for the sign of a zero. Undefined
   * (and c untouched) when a factor is not finite: a zero times it would not be zero.
   */
  solveTransposeSparse(c: Float64Array, nz: readonly number[]): number[] | undefined {
    if (this.finite === undefined) this.finite = allFinite(this.Lx, this.Lp[this.n]!) && allFinite(this.Ux, this.Up[this.n]!);
    if (!this.finite) return undefined;
    const r = (this.reach ??= reachIndex(this.n, this.q, this.pinv, this.Lp, this.Li, this.Up, this.Ui));
    const { q, Lp, Li, Lx, Up, Ui, Ux, mark } = this;
    const w = r.w;
    const stamp = ++this.stamp;
    const list: number[] = [];
    for (const i of nz) { const k = r.qinv[i]!; if (mark[k] !== stamp) { mark[k] = stamp; list.push(k); } }
    // Uᵀ: entry j reads entry k when U(k, j) ≠ 0.
    for (let h = 0; h < list.length; h++) {
      const k = list[h]!;
      for (let p = r.uPtr[k]!; p < r.uPtr[k + 1]!; p++) { const j = r.uIdx[p]!; if (mark[j] !== stamp) { mark[j] = stamp; list.push(j); } }
    }
    const nU = list.length;
    // Lᵀ: entry j reads entry k when L(k, j) ≠ 0.
    for (let h = 0; h < list.length; h++) {
      const k = list[h]!;
      for (let p = r.lPtr[k]!; p < r.lPtr[k + 1]!; p++) { const j = r.lIdx[p]!; if (mark[j] !== stamp) { mark[j] = stamp; list.push(j); } }
    }
    const up = ascending(list.slice(0, nU));
    for (const k of list) w[k] = c[q[k]!]!;
    for (const j of up) {
      const diag = Up[j + 1]! - 1;
      let s = w[j]!;
      for (let p = Up[j]!; p < diag; p++) s -= Ux[p]! * w[Ui[p]!]!;
      w[j] = s / Ux[diag]!;
    }
    ascending(list);
    for (let h = list.length - 1; h >= 0; h--) {
      const j = list[h]!;
      let s = w[j]!;
      for (let p = Lp[j]! + 1; p < Lp[j + 1]!; p++) s -= Lx[p]! * w[Li[p]!]!;
      w[j] = s;
    }
    for (const i of nz) c[i] = 0;
    const out: number[] = [];
    for (const k of list) { const i = r.prow[k]!; c[i] = w[k]!; w[k] = 0; out.push(i); }
    return ascending(out);
  }
}

/** The transposed patterns of U and L (for each pivot index k, the columns j whose entries read
 *  row k), the inverse column order and pivot rows, and a zeroed scratch vector. */
interface ReachIndex {
  qinv: Int32Array; prow: Int32Array;
  uPtr: Int32Array; uIdx: Int32Array; lPtr: Int32Array; lIdx: Int32Array;
  w: Float64Array;
}

function transposed(n: number, ptr: Int32Array, idx: Int32Array, skip: (j: number, p: number) => boolean): { tPtr: Int32Array; tIdx: Int32Array } {
  const tPtr = new Int32Array(n + 1);
  for (let j = 0; j < n; j++) for (let p = ptr[j]!; p < ptr[j + 1]!; p++) if (!skip(j, p)) tPtr[idx[p]! + 1]++;
  for (let k = 0; k < n; k++) tPtr[k + 1] += tPtr[k]!;
  const next = tPtr.slice(0, n);
  const tIdx = new Int32Array(tPtr[n]!);
  for (let j = 0; j < n; j++) for (let p = ptr[j]!; p < ptr[j + 1]!; p++) if (!skip(j, p)) tIdx[next[idx[p]!]!++] = j;
  return { tPtr, tIdx };
}

function reachIndex(n: number, q: Int32Array, pinv: Int32Array, Lp: Int32Array, Li: Int32Array, Up: Int32Array, Ui: Int32Array): ReachIndex {
  const qinv = new Int32Array(n), prow = new Int32Array(n);
  for (let k = 0; k < n; k++) qinv[q[k]!] = k;
  for (let i = 0; i < n; i++) prow[pinv[i]!] = i;
  // U's last entry of each column is its diagonal, L's first its unit diagonal: neither is read.
  const u = transposed(n, Up, Ui, (j, p) => p === Up[j + 1]! - 1);
  const l = transposed(n, Lp, Li, (j, p) => p === Lp[j]!);
  return { qinv, prow, uPtr: u.tPtr, uIdx: u.tIdx, lPtr: l.tPtr, lIdx: l.tIdx, w: new Float64Array(n) };
}

function allFinite(x: Float64Array, len: number): boolean {
  for (let p = 0; p < len; p++) if (!Number.isFinite(x[p]!)) return false;
  return true;
}

/** Sorts a short list of indices in place (a reach is a few entries: insertion sort, nothing
 *  allocated), a long one by Array.prototype.sort. */
function ascending(a: number[]): number[] {
  if (a.length > 32) return a.sort((x, y) => x - y);
  for (let i = 1; i < a.length; i++) {
    const x = a[i]!;
    let k = i - 1;
    while (k >= 0 && a[k]! > x) { a[k + 1] = a[k]!; k--; }
    a[k + 1] = x;
  }
  return a;
}
