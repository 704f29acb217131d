/** Preallocated buffers of one circuit; nothing is allocated inside a Newton iteration. */
import { newChannelEval, type ChannelEval } from '../models/core';
import type { Circuit } from './circuit';
import type { JacobianPattern } from './jacobian';
import { DenseSolver, SparseSolver, type LinearSolver } from './linearSolver';

export class Workspace {
  readonly n: number;
  readonly nt: number;
  /** V, every node's voltage: free entries are the unknowns, held entries are set by the solver. */
  readonly v: Float64Array;
  readonly F: Float64Array;
  /** Jacobian values at the positions of `pattern` (G_ij = ∂F_i/∂v_j over every node). */
  readonly G: Float64Array;
  /** Σ|current| per node, the scale of the residual tolerance. */
  readonly absI: Float64Array;
  readonly dx: Float64Array;
  readonly saved: Float64Array;
  readonly best: Float64Array;
  readonly pattern: JacobianPattern;
  /** Value index of each stamp entry (pattern.slots), where the element stamps write. */
  readonly slots: Int32Array;
  readonly solver: LinearSolver;
  /** S, the smallest nonzero output conductance of a conducting device at the last assembly. */
  gdsFloor = Infinity;
  /** Whether the solver holds the factors of the free block at v. */
  factored = false;
  readonly ch = newChannelEval();
  /** The one buffer behind the node buffers, G and a dense solver's factors and pivots. */
  private readonly mem: ArrayBuffer;

  constructor(c: Circuit) {
    const nt = c.nodeNames.length;
    this.n = c.nFree;
    this.nt = nt;
    this.pattern = c.jacobian;
    this.slots = c.jacobian.slots;
    // One allocation for the node buffers and a dense solver's factors and pivots: a workspace
    // is built for each measured output and each temperature its drift is read at.
    const n = c.nFree, dense = c.ordering ? 0 : n * n + n;
    const floats = 6 * nt + c.jacobian.nnz + dense;
    const mem = new ArrayBuffer(8 * floats + (c.ordering ? 0 : 4 * n));
    this.mem = mem;
    const buf = new Float64Array(mem, 0, floats);
    let at = 0;
    const take = (len: number): Float64Array => { const a = buf.subarray(at, at + len); at += len; return a; };
    this.v = take(nt); this.F = take(nt); this.absI = take(nt); this.dx = take(nt);
    this.saved = take(nt); this.best = take(nt); this.G = take(c.jacobian.nnz);
    this.solver = c.ordering ? new SparseSolver(c.jacobian, c.ordering)
      : new DenseSolver(c.jacobian, take(dense), new Int32Array(mem, 8 * floats, n));
  }

  /** Everything a solve leaves here, for `restore` into a workspace of the same circuit (the
   *  same nodes and pattern) solved dense; undefined for a sparse one (its factorization keeps
   *  state of its own). */
  snapshot(): WorkspaceState | undefined {
    if (!(this.solver instanceof DenseSolver)) return undefined;
    return { bytes: this.mem.slice(0), gdsFloor: this.gdsFloor, factored: this.factored, ch: { ...this.ch } };
  }

  /** This workspace as `s` left another one: the same bits in every buffer; false (nothing
   *  done) when `s` is of a workspace of another size. */
  restore(s: WorkspaceState): boolean {
    if (s.bytes.byteLength !== this.mem.byteLength || !(this.solver instanceof DenseSolver)) return false;
    new Uint8Array(this.mem).set(new Uint8Array(s.bytes));
    this.gdsFloor = s.gdsFloor;
    this.factored = s.factored;
    Object.assign(this.ch, s.ch);
    return true;
  }
}

/** A dense workspace's whole state (Workspace.snapshot). */
export interface WorkspaceState { bytes: ArrayBuffer; gdsFloor: number; factored: boolean; ch: ChannelEval }
