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

/** loadOwn's buffers, kept from one call to the next and grown as needed (a probe is read per
 *  output, 2 000 times in a big network: nothing of it should outlive the call). Where the probed
 *  elements stamp: F and absI at `nodes`, G at value index `pos[i]` of entry (rows[i], cols[i]),
 *  in stamp order (a value index shared by two elements appears twice); after the call, the
 *  probed node's row (column, value) in `rowCol`/`rowVal`, `rowLen` of them. */
interface OwnScratch {
  nodes: Int32Array; nNodes: number; rows: Int32Array; cols: Int32Array; pos: Int32Array; nPos: number;
  fSaved: Float64Array; aSaved: Float64Array; gSaved: Float64Array;
  rowCol: Int32Array; rowVal: Float64Array; rowLen: number;
  /** The workspace's stamp slots, the element at hand's first slot, its entries so far. */
  slots: Int32Array; slot: number; i: number;
}
const own: OwnScratch = {
  nodes: new Int32Array(64), nNodes: 0, rows: new Int32Array(64), cols: new Int32Array(64), pos: new Int32Array(64), nPos: 0,
  fSaved: new Float64Array(64), aSaved: new Float64Array(64), gSaved: new Float64Array(64),
  rowCol: new Int32Array(64), rowVal: new Float64Array(64), rowLen: 0,
  slots: new Int32Array(0), slot: 0, i: 0,
};

function grownInt(a: Int32Array, need: number): Int32Array {
  if (need <= a.length) return a;
  const b = new Int32Array(2 * need); b.set(a); return b;
}
function grownFloat(a: Float64Array, need: number): Float64Array {
  if (need <= a.length) return a;
  const b = new Float64Array(2 * need); b.set(a); return b;
}

function ownNode(k: number): void {
  own.nodes = grownInt(own.nodes, own.nNodes + 1);
  own.nodes[own.nNodes++] = k;
}

/** patternOf's callback for the element at hand (own.slots from its slot on). */
function ownEntry(r: number, c: number): void {
  ownNode(r);
  const at = own.nPos++;
  if (at >= own.rows.length) { own.rows = grownInt(own.rows, at + 1); own.cols = grownInt(own.cols, at + 1); own.pos = grownInt(own.pos, at + 1); }
  own.rows[at] = r; own.cols[at] = c; own.pos[at] = own.slots[own.slot + own.i++]!;
}

function stamps(ws: Workspace, elements: readonly CircuitElement[]): void {
  own.nNodes = 0; own.nPos = 0; own.slots = ws.slots;
  for (const e of elements) {
    if (hasSlots(e)) { own.slot = e.slot; own.i = 0; patternOf(e, ownEntry); }
    else if (e.kind === 'current') { ownNode(e.from); ownNode(e.to); }
  }
}

/** The probed elements' own current out of node p.node (returned) and their entries of its row of
 *  G (into own.rowCol/rowVal), at ws.v: those entries loaded from zero, everything they touched
 *  then put back (ws itself left as it was; only the entries they stamp are saved, not the whole
 *  circuit's). */
function loadOwn(ws: Workspace, elements: readonly CircuitElement[], node: number): number {
  stamps(ws, elements);
  const { F, G, absI } = ws, floor = ws.gdsFloor;
  const { nodes, nNodes, rows, cols, pos, nPos } = own;
  if (own.fSaved.length < nNodes) { own.fSaved = grownFloat(own.fSaved, nNodes); own.aSaved = grownFloat(own.aSaved, nNodes); }
  own.gSaved = grownFloat(own.gSaved, nPos);
  const { fSaved, aSaved, gSaved } = own;
  for (let i = 0; i < nNodes; i++) { fSaved[i] = F[nodes[i]!]!; aSaved[i] = absI[nodes[i]!]!; }
  for (let i = 0; i < nPos; i++) gSaved[i] = G[pos[i]!]!;
  for (let i = 0; i < nNodes; i++) { F[nodes[i]!] = 0; absI[nodes[i]!] = 0; }
  for (let i = 0; i < nPos; i++) G[pos[i]!] = 0;
  for (const e of elements) loadElement(e, ws, 1, 0);
  const f = F[node]!;
  own.rowCol = grownInt(own.rowCol, nPos); own.rowVal = grownFloat(own.rowVal, nPos);
  let len = 0;
  for (let i = 0; i < nPos; i++) if (rows[i] === node) { own.rowCol[len] = cols[i]!; own.rowVal[len++] = G[pos[i]!]!; }
  own.rowLen = len;
  // Put back in reverse, so an entry saved twice ends at its first (untouched) value.
  for (let i = nNodes - 1; i >= 0; i--) { F[nodes[i]!] = fSaved[i]!; absI[nodes[i]!] = aSaved[i]!; }
  for (let i = nPos - 1; i >= 0; i--) G[pos[i]!] = gSaved[i]!;
  ws.gdsFloor = floor;
  return f;
}

/** A, the probed current at ws.v (ws assembled there for a held probe). */
export function probeCurrent(ws: Workspace, p: OutputProbe): number {
  return p.sign * (p.elements ? loadOwn(ws, p.elements, p.node) : ws.F[p.node]!);
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
    loadOwn(ws, p.elements, p.node);
    for (let i = 0; i < own.rowLen; i++) row[own.rowCol[i]!] = own.rowVal[i]!;
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
  private readonly cols: number[] = [];
  private readonly seeds: number[] = [];
  private support: number[] | undefined = [];
  /** A, the current of the probe last given to `probe` (probeCurrent's, read in the same pass). */
  current = NaN;

  constructor(private readonly ws: Workspace) {
    this.row = new Float64Array(ws.nt);
    this.lam = new Float64Array(ws.n);
    let finite = true;
    for (let p = 0; p < ws.pattern.nnz; p++) if (!Number.isFinite(ws.G[p]!)) { finite = false; break; }
    this.finite = finite;
  }

  /** λ with Jᵀ·λ = ∂y/∂v_free for probe `p`; undefined when the Jacobian is singular. Sets
   *  `current` either way. */
  probe(p: OutputProbe): Probed | undefined {
    const { ws, row, lam, cols } = this;
    for (const j of cols) row[j] = 0;
    if (this.support) for (const j of this.support) lam[j] = 0; else lam.fill(0);
    cols.length = 0;
    if (p.elements) {
      this.current = p.sign * loadOwn(ws, p.elements, p.node);
      for (let i = 0; i < own.rowLen; i++) { const j = own.rowCol[i]!; row[j] = own.rowVal[i]!; cols.push(j); }
    } else {
      this.current = p.sign * ws.F[p.node]!;
      const { ptr, col, pos } = rowIndex(ws.pattern);
      for (let q = ptr[p.node]!; q < ptr[p.node + 1]!; q++) { row[col[q]!] = ws.G[pos[q]!]!; cols.push(col[q]!); }
    }
    this.support = [];
    if (!factorAtSolution(ws)) return undefined;
    const seeds = this.seeds;
    seeds.length = 0;
    for (const j of cols) if (j < ws.n) seeds.push(j);
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
