/**
 * Small-signal analysis at a converged operating point, from the same Jacobian Newton used:
 * the output node's conductance (Rout) and the output current's sensitivity to every device's
 * mismatch parameters, both from one adjoint solve Jᵀ·λ = ∂F_out/∂x. It sees the elements only
 * through their stamps (the Jacobian) and the devices' mismatch derivatives.
 */
import type { Circuit } from './circuit';
import { deviceMismatchCurrents } from './elements/device';
import type { Workspace } from './workspace';

/** Factor the free block of ws.G (assembled at the solution) unless already done. */
export function factorAtSolution(ws: Workspace): boolean {
  if (ws.factored) return true;
  ws.factored = ws.solver.factor(ws.G);
  return ws.factored;
}

/** λ with Jᵀ·λ = (∂F_out/∂x_free)ᵀ, so that d(F_out)/dθ = ∂F_out/∂θ − λ·∂F_free/∂θ for any
 *  parameter θ. Returns undefined when the Jacobian is singular. */
export function outputAdjoint(c: Circuit, ws: Workspace): Float64Array | undefined {
  if (!factorAtSolution(ws)) return undefined;
  const lam = new Float64Array(ws.n);
  for (let j = 0; j < ws.n; j++) lam[j] = ws.pattern.entry(ws.G, c.outNode, j);
  ws.solver.solveTranspose(lam);
  return lam;
}

/** S, total dF_out/dv_out with the free nodes following: 1/Rout. */
export function outputConductance(c: Circuit, ws: Workspace, lam: Float64Array): number {
  const o = c.outNode;
  const { colPtr, rowIdx } = ws.pattern;
  let g = ws.pattern.entry(ws.G, o, o);
  for (let p = colPtr[o]!; p < colPtr[o + 1]!; p++) {
    const j = rowIdx[p]!;
    if (j < ws.n) g -= lam[j]! * ws.G[p]!;
  }
  return g;
}

export interface Sensitivities {
  /** d iout / dθ₁ of each device (in circuit.devices order); MOSFET: ΔVT, A/V. */
  vt: Float64Array;
  /** d iout / dθ₂ of each device; MOSFET: ln β, A. */
  beta: Float64Array;
}

/** d iout/dθ for each device's two mismatch parameters (MOSFET: ΔVT added to its threshold
 *  magnitude, and ln β). */
export function outputSensitivities(c: Circuit, ws: Workspace, lam: Float64Array): Sensitivities {
  const vt = new Float64Array(c.devices.length);
  const beta = new Float64Array(c.devices.length);
  const { v, ch, n } = ws;
  let w1 = 0, w2 = 0;
  // d iout/dθ = ∂F_out/∂θ − λ·∂F_free/∂θ, summed over the nodes the device's currents leave.
  const emit = (node: number, d1: number, d2: number): void => {
    let w = 0;
    if (node === c.outNode) w += 1;
    if (node < n) w -= lam[node]!;
    w1 += w * d1; w2 += w * d2;
  };
  c.devices.forEach((d, k) => {
    w1 = 0; w2 = 0;
    deviceMismatchCurrents(d, v, ch, emit);
    vt[k] = c.outSign * w1;
    beta[k] = c.outSign * w2;
  });
  return { vt, beta };
}

/** dx_free/dv_k for a held node k: −J⁻¹·G[free, k]. Returns undefined when singular. */
export function heldNodeResponse(ws: Workspace, k: number): Float64Array | undefined {
  if (!factorAtSolution(ws)) return undefined;
  const x = new Float64Array(ws.n);
  const { colPtr, rowIdx } = ws.pattern;
  for (let p = colPtr[k]!; p < colPtr[k + 1]!; p++) {
    const i = rowIdx[p]!;
    if (i < ws.n) x[i] = -ws.G[p]!;
  }
  ws.solver.solve(x);
  return x;
}
