/**
 * How the output current drifts (design §12, §14): its supply sensitivity and temperature
 * coefficient from the circuit linearized at the operating point, and the box figure over
 * process.trange from re-solves.
 *
 * Both linearized figures use the output's adjoint λ (probe.ts): for any parameter θ,
 * d iout/dθ = sign·(∂y/∂θ − λ·∂F_free/∂θ) at fixed node voltages, y the probed current. For vdd, ∂F/∂θ is the
 * Jacobian's column of the held vdd node (vss, output and netlist sources keep their absolute
 * values). For T it is each element's current at T ± DRIFT.dT with the node voltages held — a
 * central difference of the element equations only (the models' temperature laws, resistors'
 * tc1), exact to O(dT²); the circuit itself is not re-solved.
 */
import { DRIFT } from '../defaults';
import { assemble } from '../circuit/assemble';
import type { Circuit } from '../circuit/circuit';
import type { Workspace } from '../circuit/workspace';
import type { ResolvedSpec, TemperaturePoint } from '../types';
import { probeCurrent, type OutputProbe, type Probed } from './probe';
import { buildMirror, outputCurrent, solveMirror, type MirrorTarget } from './solve';

/** (vdd/iout)·∂iout/∂vdd; undefined when the circuit has no held vdd node or iout is 0. */
export function supplySensitivity(c: Circuit, ws: Workspace, pr: Probed, iout: number, vdd: number): number | undefined {
  const k = c.nodeNames.indexOf('vdd');
  if (k < c.nFree || iout === 0) return undefined;
  const { colPtr, rowIdx } = ws.pattern;
  let d = pr.row[k]!;
  for (let p = colPtr[k]!; p < colPtr[k + 1]!; p++) {
    const i = rowIdx[p]!;
    if (i < ws.n) d -= pr.lam[i]! * ws.G[p]!;
  }
  return (vdd / iout) * pr.probe.sign * d;
}

/** The spec with the operating temperature moved to T (K); tnom stays. */
export function atTemperature(spec: ResolvedSpec, t: number): ResolvedSpec {
  return { ...spec, process: { ...spec.process, temperature: t } };
}

/** The same circuit built at another temperature, and its output read the same way. */
export interface Rebuilt { circuit: Circuit; ws: Workspace; probe: OutputProbe }

/** ppm/K, (1/iout)·∂iout/∂T at the operating temperature T (K); `rebuild` builds the circuit at
 *  another temperature (undefined when it comes out different). */
export function temperatureCoefficient(
  c: Circuit, ws: Workspace, pr: Probed, iout: number, T: number, rebuild: (t: number) => Rebuilt | undefined,
): number | undefined {
  if (iout === 0) return undefined;
  const h = DRIFT.dT;
  const at = (temp: number): AtEnd | undefined => {
    const other = rebuild(temp);
    if (!other || other.circuit.nodeNames.length !== c.nodeNames.length) return undefined;
    other.ws.v.set(ws.v);
    assemble(other.circuit, other.ws, 1, 0);
    return { F: other.ws.F, y: probeCurrent(other.ws, other.probe) };
  };
  const up = at(T + h), down = at(T - h);
  if (!up || !down) return undefined;
  return coefficientFrom(ws.n, pr, iout, up, down);
}

/** The circuit's residuals and probed current at one end of T ± DRIFT.dT, node voltages held at
 *  the operating point. */
export interface AtEnd { F: Float64Array; y: number }

/** ppm/K from the two ends (`n` free nodes): what temperatureCoefficient computes once they are
 *  assembled; a network assembles its ends once for every output (network/drift.ts). */
export function coefficientFrom(n: number, pr: Probed, iout: number, up: AtEnd, down: AtEnd): number | undefined {
  if (iout === 0) return undefined;
  const h = DRIFT.dT;
  let d = (up.y - down.y) / (2 * h);
  for (let j = 0; j < n; j++) d -= pr.probe.sign * pr.lam[j]! * (up.F[j]! - down.F[j]!) / (2 * h);
  const tc = (d / iout) * 1e6;
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
