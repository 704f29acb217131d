/**
 * Sparsity pattern of the nodal Jacobian G_ij = ∂F_i/∂v_j over every node (free and held), in
 * compressed columns with sorted rows. Built once per circuit from the elements' stamps: each
 * stamp entry gets a slot (an index into the value array), so assembling writes straight into
 * place and a Newton iteration costs O(nonzeros), never O(nodes²). Free nodes come first, so
 * the free block of each column (what Newton factors) is a prefix of it.
 */
/** The sort keys of the pattern being built: one buffer for every pattern (read only while
 *  the constructor runs). */
let keysBuf = new Float64Array(512);
function keyScratch(len: number): Float64Array {
  if (keysBuf.length < len) keysBuf = new Float64Array(2 * len);
  return keysBuf.subarray(0, len);
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
    // Key col·nt + row sorts by column, then row; nt² stays far below 2⁵³.
    const keys = keyScratch(2 * (count + n));
    for (let k = 0; k < count; k++) keys[k] = entries[2 * k + 1]! * nt + entries[2 * k]!;
    for (let k = 0; k < n; k++) keys[count + k] = k * nt + k;
    const sorted = keys.subarray(count + n);
    sorted.set(keys.subarray(0, count + n));
    sorted.sort();
    let nnz = 0;
    for (let k = 0; k < sorted.length; k++) if (k === 0 || sorted[k] !== sorted[k - 1]) sorted[nnz++] = sorted[k]!;
    this.nnz = nnz;
    // One allocation for the index arrays: a pattern is built for each measured output.
    const buf = new Int32Array(nt + 1 + nnz + count + 2 * n);
    let at = 0;
    const take = (len: number): Int32Array => { const a = buf.subarray(at, at + len); at += len; return a; };
    this.colPtr = take(nt + 1); this.rowIdx = take(nnz); this.slots = take(count); this.diag = take(n); this.freeEnd = take(n);
    for (let p = 0; p < nnz; p++) {
      const key = sorted[p]!;
      const col = Math.floor(key / nt);
      this.rowIdx[p] = key - col * nt;
      this.colPtr[col + 1]!++;
    }
    for (let j = 0; j < nt; j++) this.colPtr[j + 1] = this.colPtr[j + 1]! + this.colPtr[j]!;
    const find = (key: number): number => {
      let lo = 0, hi = nnz - 1;
      while (lo < hi) { const mid = (lo + hi) >> 1; if (sorted[mid]! < key) lo = mid + 1; else hi = mid; }
      return lo;
    };
    for (let k = 0; k < count; k++) this.slots[k] = find(keys[k]!);
    for (let k = 0; k < n; k++) this.diag[k] = find(k * nt + k);
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
