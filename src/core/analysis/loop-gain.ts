/**
 * Loop gain of a self-biased reference at its operating point, from Bode's return difference:
 * removing one controlled source g·(v_ctrl − v_ref) from the nodal Jacobian J leaves J₀ = J − c·wᵀ
 * (c: +g at the node the current leaves, −g where it enters; w: +1 at ctrl, −1 at ref), and
 * F = det J / det J₀ = 1 + T. By the matrix determinant lemma det J₀ = det J·(1 − wᵀJ⁻¹c), so one
 * solve with the factors Newton already has gives it. A self-biased loop feeds back positively:
 * its loop gain is −T = 1 − F (below 1 where the operating point is stable; a beta multiplier's is
 * √K/(2√K − 1), references §2.1). Any controlled source of a single loop gives the same figure.
 */
import { controlledSource, currentNodes } from '../circuit/elements/device';
import type { MirrorCircuit } from '../circuit/mirrorCircuit';
import { factorAtSolution } from '../circuit/smallSignal';

/** The loop gain through device `k` (index into circuit.devices), or undefined when the
 *  Jacobian is singular or the device's terminals are all held. */
export function loopGain(mc: MirrorCircuit, k: number): number | undefined {
  const { ws, circuit } = mc;
  const d = circuit.devices[k];
  if (!d || !factorAtSolution(ws)) return undefined;
  const n = ws.n;
  const src = controlledSource(d, ws.v);
  const [from, to] = currentNodes(d);
  const y = new Float64Array(n);
  if (from < n) y[from] = src.g;
  if (to < n) y[to] = y[to]! - src.g;
  ws.solver.solve(y);
  const q = (src.ctrl < n ? y[src.ctrl]! : 0) - (src.ref < n ? y[src.ref]! : 0);
  if (!Number.isFinite(q) || q === 1) return undefined;
  return 1 - 1 / (1 - q);
}
