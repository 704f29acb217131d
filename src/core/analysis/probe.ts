/**
 * What a drift or noise figure measures (design §12): an output current, read as the current
 * that leaves one node through some of its elements. A held output node takes every element on
 * it (its KCL residual, as Rout and sigma read it); the output of a network feeding another
 * mirror sits on a free node and takes its own output devices only — the current they deliver
 * into the fed mirror, with that node free to move (network/drift.ts).
 *
 * The linearized figures then follow from one adjoint: Jᵀ·λ = ∂y/∂v_free, and for any
 * parameter θ, dy/dθ = ∂y/∂θ − λ·∂F_free/∂θ at fixed node voltages.
 */
import type { Circuit } from '../circuit/circuit';
import { hasSlots, loadElement, patternOf } from '../circuit/elements/stamp';
import type { CircuitElement } from '../circuit/elements/element';
import { factorAtSolution } from '../circuit/smallSignal';
import type { Workspace } from '../circuit/workspace';

export interface OutputProbe {
  node: number;
  /** +1 when the output sinks current (its current leaves the node through the elements). */
  sign: 1 | -1;
  /** The elements the current flows through; undefined: every element on the node. */
  elements?: readonly CircuitElement[];
}

/** A probe with its gradient row and its adjoint, what the linearized figures are read from.
 *  `support`: the free nodes where λ may be nonzero, ascending (λ is exactly zero elsewhere, and
 *  every value a sum would add there is finite); absent, any. */
export interface Probed { probe: OutputProbe; row: Float64Array; lam: Float64Array; support?: readonly number[] }

/** The measured output of a circuit: its held output node, every element on it. */
export function heldProbe(c: Circuit): OutputProbe {
  return { node: c.outNode, sign: c.outSign };
}

/** Whether a noise source of element `name` is part of the probed current itself. */
export function owns(p: OutputProbe, name: string): boolean {
  return p.elements === undefined || p.elements.some((e) => e.name === name);
}

/** Where the probed elements stamp: F and absI at `nodes`, G at value index `pos[i]` of entry
 *  (rows[i], cols[i]), in stamp order (a value index shared by two elements appears twice). */
interface Stamps { nodes: number[]; rows: number[]; cols: number[]; pos: number[] }

function stamps(ws: Workspace, elements: readonly CircuitElement[]): Stamps {
  const st: Stamps = { nodes: [], rows: [], cols: [], pos: [] };
  for (const e of elements) {
    if (hasSlots(e)) {
      let i = 0;
      patternOf(e, (r, c) => { st.nodes.push(r); st.rows.push(r); st.cols.push(c); st.pos.push(ws.slots[e.slot + i++]!); });
    } else if (e.kind === 'current') st.nodes.push(e.from, e.to);
  }
  return st;
}

/** The probed elements' own current out of node p.node and their entries of its row of G, at
 *  ws.v: those entries loaded from zero, everything they touched then put back (ws itself left as
 *  it was; only the entries they stamp are saved, not the whole circuit's). */
function loadOwn(ws: Workspace, elements: readonly CircuitElement[], node: number): { f: number; row: [number, number][] } {
  const st = stamps(ws, elements);
  const { F, G, absI } = ws, floor = ws.gdsFloor;
  const fSaved = st.nodes.map((k) => F[k]!), aSaved = st.nodes.map((k) => absI[k]!), gSaved = st.pos.map((q) => G[q]!);
  for (const k of st.nodes) { F[k] = 0; absI[k] = 0; }
  for (const q of st.pos) G[q] = 0;
  for (const e of elements) loadElement(e, ws, 1, 0);
  const f = F[node]!;
  const row: [number, number][] = [];
  st.rows.forEach((r, i) => { if (r === node) row.push([st.cols[i]!, G[st.pos[i]!]!]); });
  // Put back in reverse, so an entry saved twice ends at its first (untouched) value.
  for (let i = st.nodes.length - 1; i >= 0; i--) { F[st.nodes[i]!] = fSaved[i]!; absI[st.nodes[i]!] = aSaved[i]!; }
  for (let i = st.pos.length - 1; i >= 0; i--) G[st.pos[i]!] = gSaved[i]!;
  ws.gdsFloor = floor;
  return { f, row };
}

/** A, the probed current at ws.v (ws assembled there for a held probe). */
export function probeCurrent(ws: Workspace, p: OutputProbe): number {
  return p.sign * (p.elements ? loadOwn(ws, p.elements, p.node).f : ws.F[p.node]!);
}

/** Each row's entries of a pattern (column, value index), columns ascending: a row read without
 *  a pass over the whole matrix. */
const rowsOf = new WeakMap<Workspace['pattern'], { ptr: Int32Array; col: Int32Array; pos: Int32Array }>();

function rowIndex(pattern: Workspace['pattern']): { ptr: Int32Array; col: Int32Array; pos: Int32Array } {
  let r = rowsOf.get(pattern);
  if (r) return r;
  const { colPtr, rowIdx, nt, nnz } = pattern;
  const ptr = new Int32Array(nt + 1), col = new Int32Array(nnz), pos = new Int32Array(nnz);
  for (let q = 0; q < nnz; q++) ptr[rowIdx[q]! + 1]++;
  for (let i = 0; i < nt; i++) ptr[i + 1] += ptr[i]!;
  const next = ptr.slice(0, nt);
  for (let j = 0; j < nt; j++) {
    for (let q = colPtr[j]!; q < colPtr[j + 1]!; q++) { const at = next[rowIdx[q]!]!++; col[at] = j; pos[at] = q; }
  }
  r = { ptr, col, pos };
  rowsOf.set(pattern, r);
  return r;
}

/** ∂y/∂v_j over every node (free and held), y = the probed current before its sign. */
export function probeRow(ws: Workspace, p: OutputProbe): Float64Array {
  const row = new Float64Array(ws.nt);
  if (p.elements) {
    for (const [j, g] of loadOwn(ws, p.elements, p.node).row) row[j] = g;
    return row;
  }
  const { ptr, col, pos } = rowIndex(ws.pattern);
  for (let q = ptr[p.node]!; q < ptr[p.node + 1]!; q++) row[col[q]!] = ws.G[pos[q]!]!;
  return row;
}

/**
 * The probes of one assembled solution of a big circuit (a network's joint circuit, whose every
 * output is probed): each output's row and adjoint written into buffers kept from one output to
 * the next, the adjoint solved only where its row reaches (`solveTransposeSparse`: a leaf's
 * reaches the few nodes of its path), so an output costs its path, not the circuit. The values
 * are solveTranspose's on a row.slice, bit for bit; `support` is set only when every Jacobian
 * entry is finite (a zero of λ times any of them is then zero). One probe at a time: the next
 * call reuses the buffers.
 */
export class AdjointScratch {
  private readonly row: Float64Array;
  private readonly lam: Float64Array;
  private readonly finite: boolean;
  private cols: number[] = [];
  private support: number[] | undefined = [];

  constructor(private readonly ws: Workspace) {
    this.row = new Float64Array(ws.nt);
    this.lam = new Float64Array(ws.n);
    let finite = true;
    for (let p = 0; p < ws.pattern.nnz; p++) if (!Number.isFinite(ws.G[p]!)) { finite = false; break; }
    this.finite = finite;
  }

  /** λ with Jᵀ·λ = ∂y/∂v_free for probe `p`; undefined when the Jacobian is singular. */
  probe(p: OutputProbe): Probed | undefined {
    const { ws, row, lam } = this;
    for (const j of this.cols) row[j] = 0;
    if (this.support) for (const j of this.support) lam[j] = 0; else lam.fill(0);
    const cols: number[] = [];
    if (p.elements) {
      for (const [j, g] of loadOwn(ws, p.elements, p.node).row) { row[j] = g; cols.push(j); }
    } else {
      const { ptr, col, pos } = rowIndex(ws.pattern);
      for (let q = ptr[p.node]!; q < ptr[p.node + 1]!; q++) { row[col[q]!] = ws.G[pos[q]!]!; cols.push(col[q]!); }
    }
    this.cols = cols;
    this.support = [];
    if (!factorAtSolution(ws)) return undefined;
    const seeds = cols.filter((j) => j < ws.n);
    for (const j of seeds) lam[j] = row[j]!;
    this.support = this.finite ? ws.solver.solveTransposeSparse(lam, seeds) : undefined;
    if (!this.support) {
      lam.set(row.subarray(0, ws.n));
      ws.solver.solveTranspose(lam);
      return { probe: p, row, lam };
    }
    return { probe: p, row, lam, support: this.support };
  }
}
