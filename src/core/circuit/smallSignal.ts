/**
 * Small-signal analysis at a converged operating point, from the same Jacobian Newton used:
 * the output node's conductance (Rout) and the output current's sensitivity to every device's
 * threshold and current factor, both from one adjoint solve Jᵀ·λ = ∂F_out/∂x.
 */
import { evalTerminal } from '../models/terminal';
import { copyFreeBlock, type Workspace } from './assemble';
import type { Circuit } from './circuit';
import { luFactor, luSolve, luSolveTranspose } from './lu';

/** Factor the free block of ws.G (assembled at the solution) unless already done. */
export function factorAtSolution(ws: Workspace): boolean {
  if (ws.factored) return true;
  copyFreeBlock(ws);
  ws.factored = luFactor(ws.lu, ws.n, ws.perm);
  return ws.factored;
}

/** λ with Jᵀ·λ = (∂F_out/∂x_free)ᵀ, so that d(F_out)/dθ = ∂F_out/∂θ − λ·∂F_free/∂θ for any
 *  parameter θ. Returns undefined when the Jacobian is singular. */
export function outputAdjoint(c: Circuit, ws: Workspace): Float64Array | undefined {
  if (!factorAtSolution(ws)) return undefined;
  const lam = new Float64Array(ws.n);
  const row = c.outNode * ws.nt;
  for (let j = 0; j < ws.n; j++) lam[j] = ws.G[row + j]!;
  luSolveTranspose(ws.lu, ws.n, ws.perm, lam, ws.tmp);
  return lam;
}

/** S, total dF_out/dv_out with the free nodes following: 1/Rout. */
export function outputConductance(c: Circuit, ws: Workspace, lam: Float64Array): number {
  const o = c.outNode;
  let g = ws.G[o * ws.nt + o]!;
  for (let j = 0; j < ws.n; j++) g -= lam[j]! * ws.G[j * ws.nt + o]!;
  return g;
}

export interface Sensitivities {
  /** A/V, d iout / d ΔVT of each device (in circuit.mos order). */
  vt: Float64Array;
  /** A, d iout / d ln β of each device. */
  beta: Float64Array;
}

/** d iout/dθ for θ = each device's ΔVT (added to its threshold magnitude) and ln β. */
export function outputSensitivities(c: Circuit, ws: Workspace, lam: Float64Array): Sensitivities {
  const vt = new Float64Array(c.mos.length);
  const beta = new Float64Array(c.mos.length);
  const { v, ch, n } = ws;
  c.mos.forEach((m, k) => {
    const vs = v[m.s]!;
    evalTerminal(m.dev, v[m.g]! - vs, v[m.d]! - vs, v[m.b]! - vs, ch);
    // The threshold enters as VG − VT in the device frame: ∂I/∂VT = −sign·∂I/∂VG.
    const dIdVt = -m.dev.sign * ch.gm;
    const dIdLnBeta = ch.id;
    // F_d gains I, F_s loses it.
    let w = 0;
    if (m.d === c.outNode) w += 1;
    if (m.s === c.outNode) w -= 1;
    if (m.d < n) w -= lam[m.d]!;
    if (m.s < n) w += lam[m.s]!;
    vt[k] = c.outSign * w * dIdVt;
    beta[k] = c.outSign * w * dIdLnBeta;
  });
  return { vt, beta };
}

/** dx_free/dv_k for a held node k: −J⁻¹·G[free, k]. Returns undefined when singular. */
export function heldNodeResponse(ws: Workspace, k: number): Float64Array | undefined {
  if (!factorAtSolution(ws)) return undefined;
  const x = new Float64Array(ws.n);
  for (let i = 0; i < ws.n; i++) x[i] = -ws.G[i * ws.nt + k]!;
  luSolve(ws.lu, ws.n, ws.perm, x, ws.tmp);
  return x;
}
