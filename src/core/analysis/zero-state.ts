/**
 * The zero-current state of a self-biased circuit (design §9.2). Newton will not find it: gmin
 * across every channel and EKV's weak-inversion current both push the loop off zero (references
 * §2.3), so qpoint tests for it explicitly. With every channel off, only the resistors and the
 * held nodes set voltages: a node tied through resistors to held nodes takes their (linear)
 * solution, a group of nodes reached only through off channels floats at one common voltage
 * anywhere between the rails. The state is consistent when the floating voltages can be chosen
 * so that every device stays in cutoff — a set of difference constraints (v_ctrl − v_ref ≤ VT0),
 * decided exactly by Bellman–Ford: feasible unless the constraint graph has a negative cycle.
 * A bipolar device is off while VBE ≤ UT·ln(1001), where IC is 1000·IS: a junction has no
 * threshold, and a current that small (0.1 pA for a unit device) is below its leakage, so a loop
 * resting there is the state a start-up must leave (models/bipolar.ts, CUTOFF_IS, the same rule
 * as the region report's cutoff; elements/device.ts, cutoffBound).
 */
import type { Circuit } from '../circuit/circuit';
import { cutoffBound } from '../circuit/elements/device';

export interface ZeroState {
  /** Every counted device can sit in cutoff with no current in any channel. */
  consistent: boolean;
  /** One such state (V per node name: the highest voltages the constraints allow), when consistent. */
  nodes?: Record<string, number>;
}

/** V, the slack a constraint needs before it counts as violated (numerical noise only). */
const SLACK = 1e-9;

/**
 * Whether an all-off state is consistent with the devices `counted` (by index into
 * circuit.devices; every device when absent) in cutoff and the others absent. A circuit with an
 * independent current source has none: the source's current must flow somewhere.
 */
export function zeroCurrentState(c: Circuit, counted?: (k: number) => boolean): ZeroState {
  if (c.elements.some((e) => e.kind === 'current' && e.i !== 0)) return { consistent: false };
  const n = c.nFree;
  // Groups of free nodes joined by resistors; each group is either pinned by a held node through
  // a resistor (solved below) or floats.
  const parent = Array.from({ length: n }, (_, k) => k);
  const find = (k: number): number => { while (parent[k] !== k) { parent[k] = parent[parent[k]!]!; k = parent[k]!; } return k; };
  const resistors = c.elements.filter((e) => e.kind === 'resistor');
  for (const r of resistors) if (r.a < n && r.b < n) parent[find(r.a)] = find(r.b);
  const pinned = new Set<number>();
  for (const r of resistors) {
    if (r.a < n && r.b >= n) pinned.add(find(r.a));
    if (r.b < n && r.a >= n) pinned.add(find(r.b));
  }
  const fixed = solvePinned(c, resistors, (k) => pinned.has(find(k)));

  // Difference constraints x_a − x_b ≤ w as edges b → a; vertex `zero` is 0 V, vertices 0…n−1
  // are the floating groups (by root).
  const zero = n;
  const edges: [number, number, number][] = [];
  const term = (k: number): { v: number; c: number } =>
    k >= n ? { v: zero, c: c.fixedV[k]! } : fixed.has(k) ? { v: zero, c: fixed.get(k)! } : { v: find(k), c: 0 };
  const lo = Math.min(c.vss, 2 * c.vmid - c.vss), hi = Math.max(c.vss, 2 * c.vmid - c.vss);
  for (let k = 0; k < n; k++) {
    if (find(k) !== k || pinned.has(k)) continue;
    edges.push([zero, k, hi], [k, zero, -lo]);   // lo ≤ x_k ≤ hi
  }
  c.devices.forEach((d, k) => {
    if (counted && !counted(k)) return;
    const b = cutoffBound(d);
    const a = term(b.ctrl), r = term(b.ref);
    // x_a + c_a − x_r − c_r ≤ bound
    edges.push([r.v, a.v, b.bound - a.c + r.c + SLACK]);
  });
  const dist = new Float64Array(n + 1).fill(Infinity);
  dist[zero] = 0;
  for (let pass = 0; pass <= n + 1; pass++) {
    let changed = false;
    for (const [from, to, w] of edges) {
      const cand = dist[from]! + w;
      if (dist[from]! < Infinity && cand < dist[to]! - 1e-15) { dist[to] = cand; changed = true; }
    }
    if (!changed) {
      const nodes: Record<string, number> = {};
      for (let k = 0; k < c.nodeNames.length; k++) {
        const t = term(k);
        nodes[c.nodeNames[k]!] = (t.v === zero ? 0 : dist[t.v]!) + t.c;
      }
      return { consistent: true, nodes };
    }
  }
  return { consistent: false };   // a negative cycle: some device must conduct
}

/** V of every free node tied through resistors to a held node, with every channel off: the
 *  resistor network's own solution (small dense Gaussian elimination). */
function solvePinned(c: Circuit, resistors: { a: number; b: number; g: number }[], isPinned: (k: number) => boolean): Map<number, number> {
  const nodes: number[] = [];
  for (let k = 0; k < c.nFree; k++) if (isPinned(k)) nodes.push(k);
  const at = new Map(nodes.map((k, i) => [k, i] as const));
  const m = nodes.length;
  const A = Array.from({ length: m }, () => new Float64Array(m + 1));
  for (const r of resistors) {
    const ia = at.get(r.a), ib = at.get(r.b);
    if (ia !== undefined) { A[ia]![ia]! += r.g; if (ib !== undefined) A[ia]![ib]! -= r.g; else A[ia]![m]! += r.g * c.fixedV[r.b]!; }
    if (ib !== undefined) { A[ib]![ib]! += r.g; if (ia !== undefined) A[ib]![ia]! -= r.g; else A[ib]![m]! += r.g * c.fixedV[r.a]!; }
  }
  for (let col = 0; col < m; col++) {
    let piv = col;
    for (let r = col + 1; r < m; r++) if (Math.abs(A[r]![col]!) > Math.abs(A[piv]![col]!)) piv = r;
    [A[col], A[piv]] = [A[piv]!, A[col]!];
    const p = A[col]![col]!;
    if (p === 0) continue;
    for (let r = 0; r < m; r++) {
      if (r === col) continue;
      const f = A[r]![col]! / p;
      if (f !== 0) for (let k = col; k <= m; k++) A[r]![k]! -= f * A[col]![k]!;
    }
  }
  const out = new Map<number, number>();
  nodes.forEach((k, i) => { const p = A[i]![i]!; out.set(k, p !== 0 ? A[i]![m]! / p : c.vmid); });
  return out;
}
