/**
 * Sparsity pattern of the nodal Jacobian G_ij = ∂F_i/∂v_j over every node (free and held), in
 * compressed columns with sorted rows. Built once per circuit from the elements' stamps: each
 * stamp entry gets a slot (an index into the value array), so assembling writes straight into
 * place and a Newton iteration costs O(nonzeros), never O(nodes²). Free nodes come first, so
 * the free block of each column (what Newton factors) is a prefix of it.
 */
/** The scratch of the pattern being built: one buffer for every pattern (read only while the
 *  constructor runs). */
let scratchBuf = new Int32Array(1024);
function scratch(len: number): Int32Array {
  if (scratchBuf.length < len) scratchBuf = new Int32Array(2 * len);
  return scratchBuf;
}

export class JacobianPattern {
  /** Every node, and the unknown (free) ones: indices 0 … n−1. */
  readonly nt: number;
  readonly n: number;
  /** Column j holds value indices colPtr[j] … colPtr[j+1]−1, rows rowIdx[…] ascending. */
  readonly colPtr: Int32Array;
  readonly rowIdx: Int32Array;
  /** Value index of each stamp entry, in the order the stamps declared them. */
  readonly slots: Int32Array;
  /** Value index of (k, k) for each free node k (where gmin to the midpoint goes). */
  readonly diag: Int32Array;
  /** Free block in compressed columns: column j's entries end at freeEnd[j] (from colPtr[j]). */
  readonly freeEnd: Int32Array;
  readonly nnz: number;

  /** `entries` holds (row, col) pairs in stamp order: row at 2k, col at 2k+1. */
  constructor(nt: number, n: number, entries: Int32Array) {
    this.nt = nt;
    this.n = n;
    const count = entries.length >> 1;
    // The entries and each free node's diagonal bucketed by column (a counting sort: linear in
    // the entries), then each column's rows sorted and made unique in place.
    const buf0 = scratch(2 * (nt + 1) + count + n);
    const start = buf0.subarray(0, nt + 1).fill(0), fill = buf0.subarray(nt + 1, 2 * (nt + 1));
    const rows = buf0.subarray(2 * (nt + 1), 2 * (nt + 1) + count + n);
    for (let k = 0; k < count; k++) start[entries[2 * k + 1]! + 1]!++;
    for (let k = 0; k < n; k++) start[k + 1]!++;
    for (let j = 0; j < nt; j++) start[j + 1] = start[j + 1]! + start[j]!;
    fill.set(start);
    for (let k = 0; k < count; k++) rows[fill[entries[2 * k + 1]!]!++] = entries[2 * k]!;
    for (let k = 0; k < n; k++) rows[fill[k]!++] = k;
    // Column j's unique rows move down to rows[fill[j] …] (fill now the new column starts).
    let nnz = 0;
    for (let j = 0; j < nt; j++) {
      const from = start[j]!, to = start[j + 1]!;
      const col = rows.subarray(from, to);
      if (to - from > 16) col.sort();
      else {
        for (let a = 1; a < col.length; a++) {
          const x = col[a]!;
          let b = a - 1;
          while (b >= 0 && col[b]! > x) { col[b + 1] = col[b]!; b--; }
          col[b + 1] = x;
        }
      }
      fill[j] = nnz;
      for (let a = 0; a < col.length; a++) if (a === 0 || col[a] !== col[a - 1]) rows[nnz++] = col[a]!;
    }
    fill[nt] = nnz;
    this.nnz = nnz;
    // One allocation for the index arrays: a pattern is built for each measured output.
    const buf = new Int32Array(nt + 1 + nnz + count + 2 * n);
    let at = 0;
    const take = (len: number): Int32Array => { const a = buf.subarray(at, at + len); at += len; return a; };
    this.colPtr = take(nt + 1); this.rowIdx = take(nnz); this.slots = take(count); this.diag = take(n); this.freeEnd = take(n);
    this.colPtr.set(fill.subarray(0, nt + 1));
    this.rowIdx.set(rows.subarray(0, nnz));
    for (let k = 0; k < count; k++) this.slots[k] = this.index(entries[2 * k]!, entries[2 * k + 1]!);
    for (let k = 0; k < n; k++) this.diag[k] = this.index(k, k);
    for (let j = 0; j < n; j++) {
      let p = this.colPtr[j]!;
      const end = this.colPtr[j + 1]!;
      while (p < end && this.rowIdx[p]! < n) p++;
      this.freeEnd[j] = p;
    }
  }

  /** Value index of (i, j), or −1 when the entry is structurally zero. */
  index(i: number, j: number): number {
    let lo = this.colPtr[j]!, hi = this.colPtr[j + 1]! - 1;
    while (lo <= hi) {
      const mid = (lo + hi) >> 1;
      const r = this.rowIdx[mid]!;
      if (r === i) return mid;
      if (r < i) lo = mid + 1; else hi = mid - 1;
    }
    return -1;
  }

  /** G_ij from the values, 0 where structurally zero. */
  entry(values: Float64Array, i: number, j: number): number {
    const p = this.index(i, j);
    return p < 0 ? 0 : values[p]!;
  }
}
