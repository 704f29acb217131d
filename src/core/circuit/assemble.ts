/**
 * Nodal equations of a circuit: F_i = Σ currents leaving node i through its elements, and the
 * full conductance matrix G_ij = ∂F_i/∂v_j over every node (free and held). Newton uses the
 * free block; the small-signal analysis uses the rows and columns of the held nodes too.
 */
import { newChannelEval } from '../models/core';
import { evalTerminal } from '../models/terminal';
import type { Circuit } from './circuit';

/** Preallocated buffers of one circuit; nothing is allocated inside a Newton iteration. */
export class Workspace {
  readonly n: number;
  readonly nt: number;
  /** V, every node's voltage: free entries are the unknowns, held entries are set by the solver. */
  readonly v: Float64Array;
  readonly F: Float64Array;
  /** Row-major nt×nt. */
  readonly G: Float64Array;
  /** Σ|current| per node, the scale of the residual tolerance. */
  readonly absI: Float64Array;
  readonly lu: Float64Array;
  readonly perm: Int32Array;
  readonly dx: Float64Array;
  readonly tmp: Float64Array;
  readonly saved: Float64Array;
  readonly best: Float64Array;
  /** Whether lu holds the factors of the free block at v. */
  factored = false;
  readonly ch = newChannelEval();

  constructor(c: Circuit) {
    const n = c.nFree, nt = c.nodeNames.length;
    this.n = n;
    this.nt = nt;
    // One allocation for every buffer: a workspace is built for each measured output.
    const buf = new Float64Array(8 * nt + nt * nt + n * n);
    let at = 0;
    const take = (len: number): Float64Array => { const a = buf.subarray(at, at + len); at += len; return a; };
    this.v = take(nt); this.F = take(nt); this.absI = take(nt); this.dx = take(nt); this.tmp = take(nt);
    this.saved = take(nt); this.best = take(nt); this.G = take(nt * nt); this.lu = take(n * n);
    this.perm = new Int32Array(n);
  }
}

/** Evaluate F and G at ws.v. `alpha` scales every current source (source stepping); `gmin`
 *  (S) sits across every channel and from every free node to c.vmid. */
export function assemble(c: Circuit, ws: Workspace, alpha: number, gmin: number): void {
  const { v, F, G, absI, nt, ch } = ws;
  F.fill(0); G.fill(0); absI.fill(0);
  for (const m of c.mos) {
    const { d, g, s, b } = m;
    const vs = v[s]!;
    const vds = v[d]! - vs;
    evalTerminal(m.dev, v[g]! - vs, vds, v[b]! - vs, ch);
    const i = ch.id + gmin * vds;
    const gds = ch.gds + gmin;
    const gm = ch.gm, gmb = ch.gmb;
    const gss = gm + gds + gmb;
    F[d] = F[d]! + i; F[s] = F[s]! - i;
    const ai = Math.abs(i);
    absI[d] = absI[d]! + ai; absI[s] = absI[s]! + ai;
    const rd = d * nt, rs = s * nt;
    G[rd + d] = G[rd + d]! + gds; G[rd + g] = G[rd + g]! + gm; G[rd + b] = G[rd + b]! + gmb; G[rd + s] = G[rd + s]! - gss;
    G[rs + d] = G[rs + d]! - gds; G[rs + g] = G[rs + g]! - gm; G[rs + b] = G[rs + b]! - gmb; G[rs + s] = G[rs + s]! + gss;
  }
  for (const src of c.isrc) {
    const i = alpha * src.i;
    F[src.from] = F[src.from]! + i; F[src.to] = F[src.to]! - i;
    const ai = Math.abs(i);
    absI[src.from] = absI[src.from]! + ai; absI[src.to] = absI[src.to]! + ai;
  }
  for (const r of c.res) {
    const { a, b, g } = r;
    const i = g * (v[a]! - v[b]!);
    F[a] = F[a]! + i; F[b] = F[b]! - i;
    const ai = Math.abs(i);
    absI[a] = absI[a]! + ai; absI[b] = absI[b]! + ai;
    G[a * nt + a] = G[a * nt + a]! + g; G[a * nt + b] = G[a * nt + b]! - g;
    G[b * nt + a] = G[b * nt + a]! - g; G[b * nt + b] = G[b * nt + b]! + g;
  }
  for (let k = 0; k < c.nFree; k++) {
    F[k] = F[k]! + gmin * (v[k]! - c.vmid);
    G[k * nt + k] = G[k * nt + k]! + gmin;
  }
}

/** Copy the free block of G into ws.lu. */
export function copyFreeBlock(ws: Workspace): void {
  const { n, nt, G, lu } = ws;
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) lu[i * n + j] = G[i * nt + j]!;
}
