/**
 * Fill-reducing ordering: minimum degree on the graph of A + Aᵀ (Tinney and Walker's scheme 2;
 * George and Liu, "The evolution of the minimum degree ordering algorithm", SIAM Review 31(1),
 * 1989). Eliminating a node joins its neighbours into a clique; the node of least degree goes
 * next (ties: lowest index, so the order is deterministic). Bias circuits are trees of mirrors
 * and stars of branches, where this ordering leaves next to no fill. The elimination also gives
 * the symbolic cost of a factorization, so a circuit whose factors would be dense is recognised
 * before any numeric work.
 */

export interface Ordering {
  /** order[k] is the node eliminated k-th. */
  order: Int32Array;
  /** Off-diagonal entries of L for a symmetric pivot sequence. */
  fill: number;
  /** Multiply-adds of one numeric factorization with that sequence. */
  flops: number;
}

/** Order the n×n pattern (compressed columns; entries of other rows are ignored). Returns
 *  undefined when the elimination itself would cost more than `maxWork` set operations. */
export function minimumDegree(n: number, colPtr: Int32Array, rowIdx: Int32Array, colEnd: Int32Array, maxWork: number): Ordering | undefined {
  const adj: Set<number>[] = [];
  for (let i = 0; i < n; i++) adj.push(new Set());
  for (let j = 0; j < n; j++) {
    for (let p = colPtr[j]!; p < colEnd[j]!; p++) {
      const i = rowIdx[p]!;
      if (i !== j && i < n) { adj[i]!.add(j); adj[j]!.add(i); }
    }
  }
  // Binary heap of keys degree·n + node, with stale entries skipped on pop.
  const heap: number[] = [];
  const push = (key: number): void => {
    let k = heap.length;
    heap.push(key);
    while (k > 0) {
      const up = (k - 1) >> 1;
      if (heap[up]! <= key) break;
      heap[k] = heap[up]!; k = up;
    }
    heap[k] = key;
  };
  const pop = (): number => {
    const top = heap[0]!;
    const last = heap.pop()!;
    if (heap.length > 0) {
      let k = 0;
      for (;;) {
        const l = 2 * k + 1;
        if (l >= heap.length) break;
        const c = l + 1 < heap.length && heap[l + 1]! < heap[l]! ? l + 1 : l;
        if (heap[c]! >= last) break;
        heap[k] = heap[c]!; k = c;
      }
      heap[k] = last;
    }
    return top;
  };
  for (let i = 0; i < n; i++) push(adj[i]!.size * n + i);
  const done = new Uint8Array(n);
  const order = new Int32Array(n);
  let fill = 0, flops = 0, work = 0;
  for (let k = 0; k < n; k++) {
    let v = -1;
    while (heap.length > 0) {
      const key = pop();
      const node = key % n, deg = (key - node) / n;
      if (!done[node] && adj[node]!.size === deg) { v = node; break; }
    }
    if (v < 0) break;   // unreachable: every node has a live entry
    order[k] = v;
    done[v] = 1;
    const nb = Array.from(adj[v]!);
    const d = nb.length;
    fill += d;
    flops += d * d + d;
    work += d * d + d;
    if (work > maxWork) return undefined;
    for (const a of nb) adj[a]!.delete(v);
    for (let x = 0; x < d; x++) {
      const a = nb[x]!, sa = adj[a]!;
      for (let y = x + 1; y < d; y++) {
        const b = nb[y]!;
        if (!sa.has(b)) { sa.add(b); adj[b]!.add(a); }
      }
    }
    for (const a of nb) push(adj[a]!.size * n + a);
    adj[v]!.clear();
  }
  return { order, fill, flops };
}
