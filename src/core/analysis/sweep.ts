/**
 * Iout and Rout versus Vout. Points are solved outward from the nominal output voltage in both
 * directions, each warm-started from its neighbour (the solution path), so a sweep costs a few
 * Newton iterations a point; Rout comes from the linearized circuit at each point.
 *
 * Where a device changes region abruptly (a Wilson's output device reversing as Vout passes its
 * source near the rail), a full step can leave Newton's basin: the step from the last solved
 * point is then halved until the solver follows, and grown again once it does. A point still not
 * reached is marked `converged: false` (the CLI's CSV column, the panel's plot marks) and the
 * next point continues from the last good one.
 */
import type { MirrorCircuit } from '../circuit/mirrorCircuit';
import { outputAdjoint, outputConductance } from '../circuit/smallSignal';
import type { CurvePoint } from '../types';
import { outputCurrent, setVout, solveMirror, TRIAL } from './solve';

/** Halvings of one step before a point is given up (a step of 1/64 of the original). */
const MAX_HALVINGS = 6;
/** Plain-Newton solves spent on the halved path to one point (bounds a sweep's time). */
const MAX_PATH_SOLVES = 16;
const PATH_STEP: typeof TRIAL = { ...TRIAL, plainOnly: true };

interface PathState { v: number; x: Float64Array }

/**
 * The solution at `to`, continued from `from`: first one full solve warm-started from it (the
 * neighbour); when that fails and `halve` is set, the path from `from` is walked in steps
 * halved on failure and grown again on success (plain Newton, warm from the last point
 * reached). Undefined when `to` is not reached; otherwise the circuit holds the solution at `to`.
 */
function follow(mc: MirrorCircuit, from: PathState, to: number, halve: boolean): PathState | undefined {
  setVout(mc, to);
  if (solveMirror(mc, from.x, TRIAL).converged) return { v: to, x: mc.ws.v.slice() };
  if (!halve) return undefined;
  let at = from;
  let step = (to - from.v) / 2;
  let halvings = 1;
  for (let solves = 0; solves < MAX_PATH_SOLVES; solves++) {
    const last = Math.abs(to - at.v) <= Math.abs(step);
    const v = last ? to : at.v + step;
    setVout(mc, v);
    if (solveMirror(mc, at.x, PATH_STEP).converged) {
      at = { v, x: mc.ws.v.slice() };
      if (last) return at;
      step *= 2;
    } else if (++halvings > MAX_HALVINGS) {
      return undefined;
    } else {
      step /= 2;
    }
  }
  return undefined;
}

export function sweepCircuit(mc: MirrorCircuit, vouts: number[], vNom: number, xNom?: Float64Array): CurvePoint[] {
  const out: CurvePoint[] = vouts.map((vout) => ({ vout, iout: NaN, rout: NaN, converged: false }));
  const order = vouts.map((v, i) => ({ v, i }));
  const up = order.filter((p) => p.v >= vNom).sort((a, b) => a.v - b.v);
  const down = order.filter((p) => p.v < vNom).sort((a, b) => b.v - a.v);
  for (const branch of [up, down]) {
    let good: PathState | undefined = xNom ? { v: vNom, x: xNom } : undefined;
    // Past a point with no operating point (an ideal input current no device can carry), the
    // rest of the branch is tried directly: halving cannot reach what does not exist, and would
    // only cost time.
    let failed = false;
    for (const { v, i } of branch) {
      if (!Number.isFinite(v)) continue;
      let reached: PathState | undefined;
      if (good) {
        reached = follow(mc, good, v, !failed);
      } else {
        setVout(mc, v);
        if (solveMirror(mc, undefined, TRIAL).converged) reached = { v, x: mc.ws.v.slice() };
      }
      if (!reached) { failed = true; continue; }
      good = reached;
      // The circuit holds the solution at v (follow ends on it).
      const lam = outputAdjoint(mc.circuit, mc.ws);
      const g = lam ? outputConductance(mc.circuit, mc.ws, lam) : NaN;
      out[i] = { vout: v, iout: outputCurrent(mc), rout: g !== 0 ? 1 / g : Infinity, converged: true };
    }
  }
  setVout(mc, vNom);
  return out;
}

/** n points from a to b inclusive. */
export function linspace(a: number, b: number, n: number): number[] {
  const k = Math.max(2, Math.floor(n));
  return Array.from({ length: k }, (_, i) => a + ((b - a) * i) / (k - 1));
}
