/**
 * Iout and Rout versus Vout. Points are solved outward from the nominal output voltage in both
 * directions, each warm-started from its neighbour, so a sweep costs a few Newton iterations a
 * point; Rout comes from the linearized circuit at each point.
 */
import type { MirrorCircuit } from '../circuit/mirrorCircuit';
import { outputAdjoint, outputConductance } from '../circuit/smallSignal';
import type { CurvePoint } from '../types';
import { outputCurrent, setVout, solveMirror, TRIAL } from './solve';

export function sweepCircuit(mc: MirrorCircuit, vouts: number[], vNom: number, xNom?: Float64Array): CurvePoint[] {
  const out: CurvePoint[] = vouts.map((vout) => ({ vout, iout: NaN, rout: NaN, converged: false }));
  const order = vouts.map((v, i) => ({ v, i }));
  const up = order.filter((p) => p.v >= vNom).sort((a, b) => a.v - b.v);
  const down = order.filter((p) => p.v < vNom).sort((a, b) => b.v - a.v);
  for (const branch of [up, down]) {
    let warm = xNom;
    for (const { v, i } of branch) {
      setVout(mc, v);
      const r = solveMirror(mc, warm, TRIAL);
      if (!r.converged || !Number.isFinite(v)) continue;
      warm = mc.ws.v.slice();
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
