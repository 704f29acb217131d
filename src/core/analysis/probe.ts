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
import { loadElement } from '../circuit/elements/stamp';
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

/** The probed elements' F and G alone, at ws.v (ws itself left as it was). */
function loadOwn(ws: Workspace, elements: readonly CircuitElement[]): { F: Float64Array; G: Float64Array } {
  const F = ws.F.slice(), G = ws.G.slice(), absI = ws.absI.slice(), floor = ws.gdsFloor;
  ws.F.fill(0); ws.G.fill(0);
  for (const e of elements) loadElement(e, ws, 1, 0);
  const own = { F: ws.F.slice(), G: ws.G.slice() };
  ws.F.set(F); ws.G.set(G); ws.absI.set(absI); ws.gdsFloor = floor;
  return own;
}

/** A, the probed current at ws.v (ws assembled there for a held probe). */
export function probeCurrent(ws: Workspace, p: OutputProbe): number {
  return p.sign * (p.elements ? loadOwn(ws, p.elements).F[p.node]! : ws.F[p.node]!);
}

/** ∂y/∂v_j over every node (free and held), y = the probed current before its sign. */
export function probeRow(ws: Workspace, p: OutputProbe): Float64Array {
  const G = p.elements ? loadOwn(ws, p.elements).G : ws.G;
  const row = new Float64Array(ws.nt);
  const { colPtr, rowIdx } = ws.pattern;
  for (let j = 0; j < ws.nt; j++) {
    for (let q = colPtr[j]!; q < colPtr[j + 1]!; q++) if (rowIdx[q] === p.node) row[j] = G[q]!;
  }
  return row;
}

/** λ with Jᵀ·λ = ∂y/∂v_free; undefined when the Jacobian is singular. */
export function probeAdjoint(ws: Workspace, row: Float64Array): Float64Array | undefined {
  if (!factorAtSolution(ws)) return undefined;
  const lam = row.slice(0, ws.n);
  ws.solver.solveTranspose(lam);
  return lam;
}
