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
import type { MirrorCircuit } from '../circuit/mirrorCircuit';
import { circuitAt } from '../circuit/temperature';
import { Workspace } from '../circuit/workspace';
import type { ResolvedSpec, TemperaturePoint } from '../types';
import { heldProbe, probeCurrent, type OutputProbe, type Probed } from './probe';
import { buildMirror, outputCurrent, solveMirror, type MirrorSolve, type MirrorTarget } from './solve';

/** Index of each circuit's held vdd node (−1 without one): read once, not per output. */
const vddNodes = new WeakMap<Circuit, number>();

function vddNode(c: Circuit): number {
  let k = vddNodes.get(c);
  if (k === undefined) { k = c.nodeNames.indexOf('vdd'); vddNodes.set(c, k); }
  return k;
}

/** (vdd/iout)·∂iout/∂vdd; undefined when the circuit has no held vdd node or iout is 0. */
export function supplySensitivity(c: Circuit, ws: Workspace, pr: Probed, iout: number, vdd: number): number | undefined {
  const k = vddNode(c);
  if (k < c.nFree || iout === 0) return undefined;
  const { colPtr, rowIdx } = ws.pattern;
  let d = pr.row[k]!;
  if (pr.support) {
    // Only where λ is not zero, in the column's (ascending) row order: the same sum.
    for (const i of pr.support) {
      const p = ws.pattern.index(i, k);
      if (p >= 0) d -= pr.lam[i]! * ws.G[p]!;
    }
  } else {
    for (let p = colPtr[k]!; p < colPtr[k + 1]!; p++) {
      const i = rowIdx[p]!;
      if (i < ws.n) d -= pr.lam[i]! * ws.G[p]!;
    }
  }
  return (vdd / iout) * pr.probe.sign * d;
}

/** The spec with the operating temperature moved to T (K); tnom stays. */
export function atTemperature(spec: ResolvedSpec, t: number): ResolvedSpec {
  return { ...spec, process: { ...spec.process, temperature: t } };
}

/** The same circuit built at another temperature, and its output read the same way. */
export interface Rebuilt { circuit: Circuit; ws: Workspace; probe: OutputProbe }

/** What the measured mirror's circuit is built from, so that it can be built at another
 *  temperature when it cannot be taken there. */
export interface MirrorBuild { t: MirrorTarget; vout: number; vbias: number | undefined }

function noGuess(): never {
  throw new Error('a circuit taken to another temperature has no starting guess of its own');
}

/** `mc` at temperature temp (K), with a workspace of its own (or `ws`, one made for `mc`'s circuit
 *  and free to overwrite): its elements taken there (circuit/temperature.ts), the same as a circuit
 *  built there but without a starting guess (a solve of it starts warm); undefined where it must
 *  be built. Only for a circuit built without a Monte Carlo perturbation. */
export function takenTo(mc: MirrorCircuit, spec: ResolvedSpec, temp: number, ws?: Workspace): MirrorCircuit | undefined {
  const c = circuitAt(mc.circuit, { model: spec.process.model, temperature: temp, tnom: spec.process.tnom });
  return c && { ...mc, circuit: c, ws: ws ?? new Workspace(c), guess: noGuess, iin: noGuess };
}

/** A circuit (or what holds one, such as a network's joint circuit) at another temperature,
 *  solved from `start`: `taken` (the nominal one taken there, takenTo) solved warm; only when
 *  that fails (or it could not be taken there) is `build()` solved as a fresh circuit is (warm,
 *  then from its own guess). Either way the outcome is that of `solveMirror(build(), start)`,
 *  without the build. */
export function solvedAtTemperature<J extends { mc: MirrorCircuit }>(
  taken: J | undefined, start: Float64Array, build: () => J,
): { at: J; r: MirrorSolve } {
  let failed = false;
  if (taken) {
    const r = solveMirror(taken.mc, start, { plainOnly: true });
    if (r.converged) return { at: taken, r };
    // Newton failed (not a point beyond the rails, which the build's warm solve would keep).
    failed = r.beyond === undefined;
  }
  const at = build();
  // The build's warm solve would repeat the failed one step for step (the same equations from
  // the same start): a dense circuit goes to its guess at once, as that solve would next (it
  // overwrites every unknown, and a dense factorization keeps nothing between solves; its
  // iteration count is not read). A sparse one keeps its pivot sequence: it goes the whole way.
  return { at, r: solveMirror(at.mc, failed && !at.mc.circuit.ordering ? undefined : start) };
}

/** The measured output's circuit at temperature temp (K), read at its held node: what
 *  temperatureCoefficient's `rebuild` asks of a mirror. */
export function mirrorRebuild(mc: MirrorCircuit, b: MirrorBuild): (temp: number) => Rebuilt {
  return (temp) => {
    const other = takenTo(mc, b.t.spec, temp) ?? buildMirror({ ...b.t, spec: atTemperature(b.t.spec, temp) }, b.vout, b.vbias);
    return { circuit: other.circuit, ws: other.ws, probe: heldProbe(other.circuit) };
  };
}

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
 *  the operating point; `finite`: every free node's residual is finite (what lets a sum over
 *  λ's support leave out the rest). */
export interface AtEnd { F: Float64Array; y: number; finite?: boolean }

/** ppm/K from the two ends (`n` free nodes): what temperatureCoefficient computes once they are
 *  assembled; a network assembles its ends once for every output (network/drift.ts). */
export function coefficientFrom(n: number, pr: Probed, iout: number, up: AtEnd, down: AtEnd): number | undefined {
  if (iout === 0) return undefined;
  const h = DRIFT.dT;
  let d = (up.y - down.y) / (2 * h);
  const term = (j: number): void => { d -= pr.probe.sign * pr.lam[j]! * (up.F[j]! - down.F[j]!) / (2 * h); };
  // λ's support (a network's output): every other term is a zero, as long as the ends are finite.
  if (pr.support && up.finite && down.finite) for (const j of pr.support) term(j);
  else for (let j = 0; j < n; j++) term(j);
  const tc = (d / iout) * 1e6;
  return Number.isFinite(tc) ? tc : undefined;
}

/** Iout re-solved at DRIFT.trangePoints temperatures across [tmin, tmax], each solve starting
 *  from the previous one (the nominal point first); each point is the nominal circuit `mc` taken
 *  to its temperature (solvedAtTemperature), what a build per temperature gives. */
export function driftCurve(
  mc: MirrorCircuit, b: MirrorBuild, range: [number, number], warm: Float64Array,
): TemperaturePoint[] {
  const [lo, hi] = range;
  const n = DRIFT.trangePoints;
  const points: TemperaturePoint[] = [];
  // One workspace for every point taken there: a solve of a dense circuit reads nothing from its
  // workspace but the start it is given (a sparse factorization keeps its pivots: one each).
  const ws = mc.circuit.ordering ? undefined : new Workspace(mc.circuit);
  // Where each converged point is kept as the next one's start (`warm` is the caller's).
  const last = new Float64Array(warm.length);
  let start = warm;
  for (let k = 0; k < n; k++) {
    const temp = lo + ((hi - lo) * k) / (n - 1);
    const build = (): { mc: MirrorCircuit } => ({ mc: buildMirror({ ...b.t, spec: atTemperature(b.t.spec, temp) }, b.vout, b.vbias) });
    const taken = takenTo(mc, b.t.spec, temp, ws);
    const { at, r } = solvedAtTemperature(taken && { mc: taken }, start, build);
    points.push({ t: temp, iout: r.converged ? outputCurrent(at.mc) : NaN, converged: r.converged });
    if (r.converged) { last.set(at.mc.ws.v); start = last; }
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
