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

/** A probe with its gradient row and its adjoint, what the linearized figures are read from. */
export interface Probed { probe: OutputProbe; row: Float64Array; lam: Float64Array }

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

/** λ with Jᵀ·λ = ∂y/∂v_free; undefined when the Jacobian is singular. */
export function probeAdjoint(ws: Workspace, row: Float64Array): Float64Array | undefined {
  if (!factorAtSolution(ws)) return undefined;
  const lam = row.slice(0, ws.n);
  ws.solver.solveTranspose(lam);
  return lam;
}
