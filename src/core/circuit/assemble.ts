/**
 * Nodal equations of a circuit: F_i = Σ currents leaving node i through its elements, and the
 * Jacobian G_ij = ∂F_i/∂v_j over every node (free and held), from the elements' stamps. Newton
 * uses the free block; the small-signal analysis uses the rows and columns of the held nodes too.
 */
import type { Circuit } from './circuit';
import { loadElement } from './elements/stamp';
import type { Workspace } from './workspace';

/** Evaluate F and G at ws.v. `alpha` scales every current source (source stepping); `gmin`
 *  (S) sits across every channel and from every free node to c.vmid. */
export function assemble(c: Circuit, ws: Workspace, alpha: number, gmin: number): void {
  const { v, F, G, absI } = ws;
  F.fill(0); G.fill(0); absI.fill(0);
  ws.gdsFloor = Infinity;
  for (const e of c.elements) loadElement(e, ws, alpha, gmin);
  const diag = ws.pattern.diag;
  for (let k = 0; k < c.nFree; k++) {
    F[k] = F[k]! + gmin * (v[k]! - c.vmid);
    G[diag[k]!] = G[diag[k]!]! + gmin;
  }
}
