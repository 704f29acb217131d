/**
 * How the output current drifts (design §12, §14): its supply sensitivity and temperature
 * coefficient from the circuit linearized at the operating point, and the box figure over
 * process.trange from re-solves.
 *
 * Both linearized figures use the output adjoint λ (smallSignal.ts): for any parameter θ,
 * d iout/dθ = outSign·(∂F_out/∂θ − λ·∂F_free/∂θ) at fixed node voltages. For vdd, ∂F/∂θ is the
 * Jacobian's column of the held vdd node (vss, output and netlist sources keep their absolute
 * values). For T it is each element's current at T ± DRIFT.dT with the node voltages held — a
 * central difference of the element equations only (the models' temperature laws, resistors'
 * tc1), exact to O(dT²); the circuit itself is not re-solved.
 */
import { DRIFT } from '../defaults';
import { assemble } from '../circuit/assemble';
import type { MirrorCircuit } from '../circuit/mirrorCircuit';
import type { ResolvedSpec, TemperaturePoint } from '../types';
import { buildMirror, outputCurrent, solveMirror, type MirrorTarget } from './solve';

/** (vdd/iout)·∂iout/∂vdd; undefined when the circuit has no vdd node or iout is 0. */
export function supplySensitivity(mc: MirrorCircuit, lam: Float64Array, iout: number, vdd: number): number | undefined {
  const c = mc.circuit, ws = mc.ws;
  const k = c.nodeNames.indexOf('vdd');
  if (k < c.nFree || iout === 0) return undefined;
  const { colPtr, rowIdx } = ws.pattern;
  let d = 0;
  for (let p = colPtr[k]!; p < colPtr[k + 1]!; p++) {
    const i = rowIdx[p]!;
    if (i === c.outNode) d += ws.G[p]!;
    else if (i < ws.n) d -= lam[i]! * ws.G[p]!;
  }
  return (vdd / iout) * c.outSign * d;
}

/** The spec with the operating temperature moved to T (K); tnom stays. */
export function atTemperature(spec: ResolvedSpec, t: number): ResolvedSpec {
  return { ...spec, process: { ...spec.process, temperature: t } };
}

/** ppm/K, (1/iout)·∂iout/∂T at the operating temperature. */
export function temperatureCoefficient(
  t: MirrorTarget, mc: MirrorCircuit, lam: Float64Array, iout: number, vout: number, vbias: number | undefined,
): number | undefined {
  if (iout === 0) return undefined;
  const c = mc.circuit;
  const T = t.spec.process.temperature, h = DRIFT.dT;
  const currents = (temp: number): Float64Array | undefined => {
    const other = buildMirror({ ...t, spec: atTemperature(t.spec, temp) }, vout, vbias);
    if (other.circuit.nodeNames.length !== c.nodeNames.length) return undefined;
    other.ws.v.set(mc.ws.v);
    assemble(other.circuit, other.ws, 1, 0);
    return other.ws.F;
  };
  const up = currents(T + h), down = currents(T - h);
  if (!up || !down) return undefined;
  const dF = (k: number): number => (up[k]! - down[k]!) / (2 * h);
  let d = dF(c.outNode);
  for (let j = 0; j < mc.ws.n; j++) d -= lam[j]! * dF(j);
  const tc = (c.outSign * d / iout) * 1e6;
  return Number.isFinite(tc) ? tc : undefined;
}

/** Iout re-solved at DRIFT.trangePoints temperatures across [tmin, tmax], each solve starting
 *  from the previous one (the nominal point first). */
export function driftCurve(
  t: MirrorTarget, range: [number, number], vout: number, vbias: number | undefined, warm: Float64Array,
): TemperaturePoint[] {
  const [lo, hi] = range;
  const n = DRIFT.trangePoints;
  const points: TemperaturePoint[] = [];
  let start = warm;
  for (let k = 0; k < n; k++) {
    const temp = lo + ((hi - lo) * k) / (n - 1);
    const mc = buildMirror({ ...t, spec: atTemperature(t.spec, temp) }, vout, vbias);
    const r = solveMirror(mc, start);
    points.push({ t: temp, iout: r.converged ? outputCurrent(mc) : NaN, converged: r.converged });
    if (r.converged) start = mc.ws.v.slice();
  }
  return points;
}

/** ppm/K, (max − min)/(iout·Δt) over the curve; undefined when a point did not converge. */
export function boxCoefficient(points: TemperaturePoint[], iout: number): number | undefined {
  if (points.length < 2 || points.some((p) => !p.converged) || iout === 0) return undefined;
  let lo = Infinity, hi = -Infinity;
  for (const p of points) { lo = Math.min(lo, p.iout); hi = Math.max(hi, p.iout); }
  const span = points[points.length - 1]!.t - points[0]!.t;
  return ((hi - lo) / (Math.abs(iout) * span)) * 1e6;
}
