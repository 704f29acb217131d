/**
 * Drift and noise of a network member's outputs (design §12 on §9): from the group's joint
 * circuit, so a linked output's supply sensitivity, temperature coefficient, drift over
 * process.trange and noise carry everything above it — the reference's own drift, the noise of
 * every device on its path — instead of its mirror alone fed by an ideal current.
 *
 * A leaf output is read at its held node; an output feeding another mirror is read as the current
 * its own devices deliver into the shared node, which stays free (analysis/probe.ts). The group is
 * solved once per spec and temperature and every output of it is read from that solution.
 */
import { DRIFT } from '../defaults';
import { solveMirror } from '../analysis/solve';
import { atTemperature, boxCoefficient, supplySensitivity, temperatureCoefficient, type Rebuilt } from '../analysis/drift';
import { DEFAULT_ANALYSIS, outputNoise } from '../analysis/noise';
import { probeAdjoint, probeCurrent, probeRow, type OutputProbe, type Probed } from '../analysis/probe';
import { indexOf } from '../mirror-at';
import type { NoiseReport, ResolvedSpec, TemperaturePoint } from '../types';
import { networkGroups, type NetworkGroup } from './groups';
import { buildJoint, key, type JointCircuit } from './joint';

/** The drift and noise figures of one output (MirrorReport's fields of the same names). */
export interface JointDrift {
  supplySensitivity?: number;
  tc?: number;
  tcBox?: number;
  noise?: NoiseReport;
  drift?: TemperaturePoint[];
}

interface Solved { j: JointCircuit; converged: boolean }
interface GroupCache { group: NetworkGroup; at: Map<number, Solved>; curve?: (Solved | undefined)[] }

/** Per spec object: its groups by member index, each group's solutions by temperature. */
const cache = new WeakMap<ResolvedSpec, Map<number, GroupCache>>();

function groupOf(spec: ResolvedSpec, mirrorIndex: number): GroupCache | undefined {
  let groups = cache.get(spec);
  if (!groups) {
    groups = new Map();
    for (const group of networkGroups(spec)) {
      const entry: GroupCache = { group, at: new Map() };
      for (const m of group.members) groups.set(indexOf(m), entry);
    }
    cache.set(spec, groups);
  }
  return groups.get(mirrorIndex);
}

/** The group's joint circuit at temperature T (K), solved (from `warm` when given). */
function solvedAt(spec: ResolvedSpec, gc: GroupCache, t: number, warm?: Float64Array): Solved {
  let s = gc.at.get(t);
  if (!s) {
    const j = buildJoint(atTemperature(spec, t), gc.group);
    s = { j, converged: solveMirror(j.mc, warm).converged };
    gc.at.set(t, s);
  }
  return s;
}

/** How output `k` of the joint circuit is read. */
function probeOf(j: JointCircuit, k: string): OutputProbe | undefined {
  const mem = j.members.find((x) => k.startsWith(`${x.index}:`));
  if (!mem) return undefined;
  const leaf = j.leafNode.get(k);
  if (leaf !== undefined) return { node: leaf, sign: mem.sign };
  const link = j.linkNode.get(k);
  if (link === undefined) return undefined;
  return { node: link, sign: mem.sign, elements: (j.outDevices.get(k) ?? []).map((d) => j.mc.circuit.devices[d]!) };
}

/** Joint element names (`mirror/device`) as the report names them: its own mirror's devices by
 *  their own names, every other element by its path. */
function renamed(n: NoiseReport, ns: string): NoiseReport {
  const name = (x: string): string => (x.startsWith(ns) ? x.slice(ns.length) : x);
  const shares: Record<string, number> = {};
  for (const [k, v] of Object.entries(n.shares)) shares[name(k)] = v;
  const out: NoiseReport = { ...n, shares };
  if (n.spectrum) {
    const parts: Record<string, number[]> = {};
    for (const [k, v] of Object.entries(n.spectrum.parts)) parts[name(k)] = v;
    out.spectrum = { ...n.spectrum, parts };
  }
  return out;
}

/**
 * The drift and noise of output `outputIndex` of mirror `mirrorIndex` through its network's joint
 * circuit; undefined when the mirror is in no network or the group does not solve (its figures
 * would mean nothing). `box`: the drift over process.trange (re-solves); `curve`: keep its points
 * and the noise spectrum.
 */
export function jointDrift(spec: ResolvedSpec, mirrorIndex: number, outputIndex: number, opts: { box: boolean; curve: boolean }): JointDrift | undefined {
  if (!spec.networks) return undefined;
  const gc = groupOf(spec, mirrorIndex);
  if (!gc) return undefined;
  const T = spec.process.temperature;
  const nominal = solvedAt(spec, gc, T);
  if (!nominal.converged) return undefined;
  const k = key(mirrorIndex, outputIndex);
  const { j } = nominal;
  const probe = probeOf(j, k);
  if (!probe) return undefined;
  const { circuit: c, ws } = j.mc;
  const iout = probeCurrent(ws, probe);
  const out: JointDrift = {};
  const row = probeRow(ws, probe);
  const lam = probeAdjoint(ws, row);
  if (lam) {
    const pr: Probed = { probe, row, lam };
    const s = supplySensitivity(c, ws, pr, iout, spec.supplies.vdd);
    if (s !== undefined && Number.isFinite(s)) out.supplySensitivity = s;
    const rebuild = (temp: number): Rebuilt | undefined => {
      const other = buildJoint(atTemperature(spec, temp), gc.group);
      const p = probeOf(other, k);
      return p ? { circuit: other.mc.circuit, ws: other.mc.ws, probe: p } : undefined;
    };
    const tc = temperatureCoefficient(c, ws, pr, iout, T, rebuild);
    if (tc !== undefined) out.tc = tc;
    const noise = outputNoise(c, ws, pr, T, spec.analysis ?? DEFAULT_ANALYSIS, opts.curve);
    const mem = j.members.find((x) => x.index === mirrorIndex);
    if (noise && mem) out.noise = renamed(noise, mem.ns);
  }
  const trange = spec.process.trange;
  if (trange && opts.box) {
    const curve = jointCurve(spec, gc, trange, ws.v).map((s, n) => {
      const t = trange[0] + ((trange[1] - trange[0]) * n) / (DRIFT.trangePoints - 1);
      const p = s?.converged ? probeOf(s.j, k) : undefined;
      return { t, iout: p && s ? probeCurrent(s.j.mc.ws, p) : NaN, converged: p !== undefined };
    });
    if (opts.curve) out.drift = curve;
    const box = boxCoefficient(curve, iout);
    if (box !== undefined) out.tcBox = box;
  }
  return out;
}

/** The group solved at DRIFT.trangePoints temperatures across [tmin, tmax], each solve starting
 *  from the previous one (the nominal point first); shared by every output of the group. */
function jointCurve(spec: ResolvedSpec, gc: GroupCache, [lo, hi]: [number, number], warm: Float64Array): (Solved | undefined)[] {
  if (gc.curve) return gc.curve;
  const n = DRIFT.trangePoints;
  const curve: (Solved | undefined)[] = [];
  let start = warm;
  for (let k = 0; k < n; k++) {
    const s = solvedAt(spec, gc, lo + ((hi - lo) * k) / (n - 1), start);
    curve.push(s);
    if (s.converged) start = s.j.mc.ws.v.slice();
  }
  gc.curve = curve;
  return curve;
}
