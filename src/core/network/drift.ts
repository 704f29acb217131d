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
import { assemble } from '../circuit/assemble';
import { atTemperature, boxCoefficient, coefficientFrom, solvedAtTemperature, supplySensitivity, takenTo, type AtEnd } from '../analysis/drift';
import { takesVbias } from '../kinds/index';
import { DEFAULT_ANALYSIS, noiseParts, outputNoise, type NoiseParts } from '../analysis/noise';
import { NoiseSources } from '../circuit/elements/noise';
import { AdjointScratch, probeCurrent, type OutputProbe } from '../analysis/probe';
import { Workspace } from '../circuit/workspace';
import { indexOf } from '../mirror-at';
import type { NoiseReport, ResolvedSpec, TemperaturePoint } from '../types';
import { networkGroups, type NetworkGroup } from './groups';
import { buildJoint, key, type JointCircuit, type JointMember } from './joint';
import { handedJoint } from './handed';

/** The drift and noise figures of one output (MirrorReport's fields of the same names). */
export interface JointDrift {
  supplySensitivity?: number;
  tc?: number;
  tcBox?: number;
  noise?: NoiseReport;
  drift?: TemperaturePoint[];
}

interface Solved { j: JointCircuit; converged: boolean }
/** The group at one end of T ± DRIFT.dT, assembled at the nominal solution: its residuals, and
 *  every output's probed current there (by slot: `Ends.slots`; NaN where the output is not read
 *  there), read as the end is made — the element equations there do not depend on the output
 *  read, so every output's tc shares them, and the circuit itself is not kept. */
interface End { F: Float64Array; y: Float64Array }
/** `finite`: every free node's residual at both ends is; `slots`: each member's first output's
 *  slot in `End.y`, by file index. */
interface Ends { up: End; down: End; finite: boolean; slots: Map<number, number> }
/** The nominal solution's noise sources, once per group, and which elements sit on each node:
 *  an output hears only the elements on its own node and on nodes its adjoint reaches (a leaf:
 *  the few mirrors on its path), so each output passes those alone to outputNoise. */
interface GroupNoise {
  /** Run r (one element's sources) is parts.sources[runStart[r] … runStart[r + 1]); the runs on
   *  node k are nodeRuns[nodePtr[k] … nodePtr[k + 1]) — typed arrays, not an array per node and
   *  per run: they live as long as the analysis, and every small object there is copied by each
   *  young-generation collection until it is promoted. */
  parts: NoiseParts; runStart: Int32Array; nodePtr: Int32Array; nodeRuns: Int32Array; always: number[];
  /** Runs picked for the output at hand (`picked[r] === stamp`): a set without one per output. */
  picked: Int32Array; stamp: number;
  /** The picked runs, and the sources they hold (what `reaching` returns, rewritten for each
   *  output: outputNoise keeps none of it). */
  order: Int32Array; reached: NoiseParts;
}
interface GroupCache {
  group: NetworkGroup; at: Map<number, Solved>; curve?: (Solved | undefined)[]; ends?: Ends | null; noise?: GroupNoise;
  /** Each output's row and adjoint at the nominal solution. */
  adjoint?: AdjointScratch;
}

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

/** Whether the group's circuit at another temperature is its nominal circuit taken there
 *  (analysis/drift.ts `takenTo`): not when a member's vbias is picked, which a build at that
 *  temperature picks again there. */
function takesTemperature(g: NetworkGroup): boolean {
  return g.members.every((m) => !takesVbias(m) || m.vbias !== undefined);
}

/** The nominal joint circuit `j` at temperature temp (K), without a build: its members, nodes
 *  and probes are the nominal's, its outputs are read through probes (no guess, no root current
 *  of its own: a solve of it starts warm); undefined where it must be built. */
function takenJoint(j: JointCircuit, g: NetworkGroup, spec: ResolvedSpec, temp: number, ws?: Workspace): JointCircuit | undefined {
  const mc = takesTemperature(g) ? takenTo(j.mc, spec, temp, ws) : undefined;
  return mc && { ...j, mc, rootCurrent: mc.iin };
}

/** The group's joint circuit at temperature T (K), solved (from `warm` when given): away from
 *  the operating temperature, the nominal circuit taken there and solved warm, built only when
 *  that fails (solvedAtTemperature: the outcome of the build's solve, without the build); at the
 *  spec's own temperature, the one solveNetworks solved where it is the same (handed.ts). */
function solvedAt(spec: ResolvedSpec, gc: GroupCache, t: number, warm?: Float64Array): Solved {
  let s = gc.at.get(t);
  if (!s && !warm && t === spec.process.temperature) {
    s = handedJoint(spec, gc.group);
    if (s) gc.at.set(t, s);
  }
  if (!s) {
    const build = (): JointCircuit => buildJoint(atTemperature(spec, t), gc.group);
    const from = warm ? gc.at.get(spec.process.temperature) : undefined;
    if (warm && from?.converged) {
      const { at, r } = solvedAtTemperature(takenJoint(from.j, gc.group, spec, t), warm, build);
      s = { j: at, converged: r.converged };
    } else {
      const j = build();
      s = { j, converged: solveMirror(j.mc, warm).converged };
    }
    gc.at.set(t, s);
  }
  return s;
}

/** Each joint circuit's members by file index (a probe per output, without a search). */
const membersOf = new WeakMap<JointCircuit, Map<number, JointMember>>();

function memberOf(j: JointCircuit, mirrorIndex: number): JointMember | undefined {
  let m = membersOf.get(j);
  if (!m) { m = new Map(j.members.map((x) => [x.index, x] as const)); membersOf.set(j, m); }
  return m.get(mirrorIndex);
}

/** Where an output of a joint circuit is read: its node, its sign, and for an output feeding
 *  another mirror its own devices (indices into circuit.devices). */
interface Where { node: number; sign: 1 | -1; devices?: readonly number[] }

/** Each joint circuit's outputs as whereOf reads them, by file index and output: found once
 *  per member (its outputs are read at the nominal point and at each end). */
const wheres = new WeakMap<JointCircuit, Map<number, (Where | undefined)[]>>();

function whereOf(j: JointCircuit, mirrorIndex: number, outputIndex: number): Where | undefined {
  let byMirror = wheres.get(j);
  if (!byMirror) { byMirror = new Map(); wheres.set(j, byMirror); }
  let known = byMirror.get(mirrorIndex);
  if (!known) {
    known = [];
    const mem = memberOf(j, mirrorIndex);
    for (let o = 0; mem && o < mem.mirror.outputs.length; o++) {
      const k = key(mirrorIndex, o);
      const leaf = j.leafNode.get(k), link = j.linkNode.get(k);
      known.push(leaf !== undefined ? { node: leaf, sign: mem.sign }
        : link !== undefined ? { node: link, sign: mem.sign, devices: j.outDevices.get(k) ?? [] } : undefined);
    }
    byMirror.set(mirrorIndex, known);
  }
  return known[outputIndex];
}

/** The probe of `w` in joint circuit `j` (its devices are j's own). */
function probeAt(j: JointCircuit, w: Where): OutputProbe {
  return w.devices ? { node: w.node, sign: w.sign, elements: w.devices.map((d) => j.mc.circuit.devices[d]!) } : { node: w.node, sign: w.sign };
}

/** How output `outputIndex` of mirror `mirrorIndex` in the joint circuit is read. */
function probeOf(j: JointCircuit, mirrorIndex: number, outputIndex: number): OutputProbe | undefined {
  const w = whereOf(j, mirrorIndex, outputIndex);
  return w && probeAt(j, w);
}

/** Whether `other` is `j` taken to another temperature (takenJoint: the same members, nodes and
 *  outputs, its own elements), where an output is read where it is read in `j`. */
function sameLayout(other: JointCircuit, j: JointCircuit): boolean {
  return other.members === j.members && other.leafNode === j.leafNode && other.linkNode === j.linkNode && other.outDevices === j.outDevices;
}

/** The group's ends at T ± DRIFT.dT with the node voltages of `nominal` (null when a rebuilt
 *  circuit comes out different), made once per group: the nominal circuit taken there
 *  (takenJoint: the same elements a build there gives) where the build would read nothing
 *  else of the spec at that temperature (no picked vbias), else built. Both ends taken there
 *  share one workspace: each end's residuals and probes are read before the next is assembled. */
function endsOf(spec: ResolvedSpec, gc: GroupCache, nominal: JointCircuit, T: number): Ends | null {
  if (gc.ends !== undefined) return gc.ends;
  const slots = new Map<number, number>();
  let count = 0;
  for (const mem of nominal.members) { slots.set(mem.index, count); count += mem.mirror.outputs.length; }
  let ws: Workspace | undefined;
  const end = (temp: number): End | undefined => {
    const taken = takesTemperature(gc.group) ? takenJoint(nominal, gc.group, spec, temp, ws ??= new Workspace(nominal.mc.circuit)) : undefined;
    const other = taken ?? buildJoint(atTemperature(spec, temp), gc.group);
    if (other.mc.circuit.nodeNames.length !== nominal.mc.circuit.nodeNames.length) return undefined;
    other.mc.ws.v.set(nominal.mc.ws.v);
    assemble(other.mc.circuit, other.mc.ws, 1, 0);
    const y = new Float64Array(count);
    const same = sameLayout(other, nominal);
    for (const mem of nominal.members) {
      const first = slots.get(mem.index)!;
      for (let o = 0; o < mem.mirror.outputs.length; o++) {
        const w = whereOf(nominal, mem.index, o);
        const p = !w ? undefined : same ? probeAt(other, w) : probeOf(other, mem.index, o);
        y[first + o] = p ? probeCurrent(other.mc.ws, p) : NaN;
      }
    }
    return { F: other.mc.ws.F.slice(), y };
  };
  const up = end(T + DRIFT.dT), down = end(T - DRIFT.dT);
  let finite = true;
  if (up && down) for (let k = 0; k < nominal.mc.ws.n && finite; k++) finite = Number.isFinite(up.F[k]! - down.F[k]!);
  gc.ends = up && down ? { up, down, finite, slots } : null;
  return gc.ends;
}

/** One output read at one end `e` (NaN where it is not read there: no figure, as undefined). */
function endOf(ends: Ends, e: End, mirrorIndex: number, outputIndex: number): AtEnd {
  return { F: e.F, y: e.y[ends.slots.get(mirrorIndex)! + outputIndex]!, finite: ends.finite };
}

function groupNoise(gc: GroupCache, j: JointCircuit, T: number): GroupNoise {
  if (gc.noise) return gc.noise;
  const { circuit: c, ws } = j.mc;
  const parts = noiseParts(c, ws, T);
  const { sources } = parts;
  const nt = ws.nt;
  // Each element's sources are consecutive: one run per element, in the circuit's order.
  const starts: number[] = [];
  for (let i = 0; i < sources.length;) {
    let e = i;
    while (e < sources.length && sources.element[e] === sources.element[i]) e++;
    starts.push(i);
    i = e;
  }
  starts.push(sources.length);
  const runStart = Int32Array.from(starts);
  const nRuns = runStart.length - 1;
  // Each run listed once per node its sources touch (`listed[k] === r + 1`: already on node k),
  // counted in a first pass and placed in a second.
  const listed = new Int32Array(nt);
  const nodePtr = new Int32Array(nt + 1);
  const always: number[] = [];
  const fill = new Int32Array(nt);
  /** Run r on the nodes its sources touch: counted (`place` false) or placed. */
  const each = (r: number, place: boolean): void => {
    const on = (k: number): void => {
      if (k < 0 || k >= nt || listed[k] === r + 1) return;
      listed[k] = r + 1;
      if (place) nodeRuns[fill[k]!++] = r; else nodePtr[k + 1]!++;
    };
    for (let q = runStart[r]!; q < runStart[r + 1]!; q++) { on(sources.from[q]!); on(sources.to[q]!); }
  };
  let nodeRuns = new Int32Array(0);
  for (let r = 0; r < nRuns; r++) {
    each(r, false);
    // A source of infinite or undefined density is not silent even at zero gain (0·∞).
    for (let q = runStart[r]!; q < runStart[r + 1]!; q++) {
      if (!Number.isFinite(sources.white[q]!) || !Number.isFinite(sources.flicker[q]!)) { always.push(r); break; }
    }
  }
  for (let k = 0; k < nt; k++) nodePtr[k + 1] = nodePtr[k + 1]! + nodePtr[k]!;
  nodeRuns = new Int32Array(nodePtr[nt]!);
  fill.set(nodePtr.subarray(0, nt));
  listed.fill(0);
  for (let r = 0; r < nRuns; r++) each(r, true);
  // Runs of one name each (joint element names carry their mirror's path): outputNoise then
  // finds each element's part without a search.
  const names = new Set<string>();
  for (let r = 0; r < nRuns; r++) names.add(sources.element[runStart[r]!]!);
  if (names.size === nRuns) parts.distinct = true;
  const reached: NoiseParts = { sources: new NoiseSources(), caps: parts.caps };
  if (parts.distinct) reached.distinct = true;
  gc.noise = { parts, runStart, nodePtr, nodeRuns, always, picked: new Int32Array(nRuns), stamp: 0, order: new Int32Array(nRuns), reached };
  return gc.noise;
}

/** The sources that can reach an output: those of every element on the probed node or on a free
 *  node where its adjoint is not zero (within `support`, when known), in the circuit's order.
 *  Every other source's gain is exactly zero (no direct path, λ zero at both ends), so leaving
 *  it out changes no sum. With capacitors the AC transfer differs from λ: every source. */
function reaching(gn: GroupNoise, probe: OutputProbe, lam: Float64Array, support: readonly number[] | undefined): NoiseParts {
  if (gn.parts.caps.length > 0) return gn.parts;
  const stamp = ++gn.stamp;
  const { picked, order, nodePtr, nodeRuns, runStart } = gn;
  let n = 0;
  const onNode = (k: number): void => {
    for (let p = nodePtr[k]!; p < nodePtr[k + 1]!; p++) {
      const r = nodeRuns[p]!;
      if (picked[r] !== stamp) { picked[r] = stamp; order[n++] = r; }
    }
  };
  for (const r of gn.always) if (picked[r] !== stamp) { picked[r] = stamp; order[n++] = r; }
  if (probe.node >= 0 && probe.node < nodePtr.length - 1) onNode(probe.node);
  const count = support ? support.length : lam.length;
  for (let i = 0; i < count; i++) {
    const k = support ? support[i]! : i;
    if (lam[k] === 0) continue;
    onNode(k);
  }
  // Each run at most once: n ≤ runs. A typed array sorts numerically, in place.
  const sorted = order.subarray(0, n).sort();
  const { sources } = gn.reached;
  sources.clear();
  for (let i = 0; i < n; i++) {
    const r = sorted[i]!;
    for (let q = runStart[r]!; q < runStart[r + 1]!; q++) sources.addFrom(gn.parts.sources, q);
  }
  return gn.reached;
}

/** Joint element names (`mirror/device`) as the report names them: its own mirror's devices by
 *  their own names, every other element by its path. */
function localNames(ns: string): (element: string) => string {
  return (x) => (x.startsWith(ns) ? x.slice(ns.length) : x);
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
  const { j } = nominal;
  const where = whereOf(j, mirrorIndex, outputIndex);
  if (!where) return undefined;
  const probe = probeAt(j, where);
  const { circuit: c, ws } = j.mc;
  const out: JointDrift = {};
  gc.adjoint ??= new AdjointScratch(ws);
  // The probed current is read in the same pass as the adjoint's row (probeCurrent's value).
  const pr = gc.adjoint.probe(probe);
  const iout = gc.adjoint.current;
  if (pr) {
    const s = supplySensitivity(c, ws, pr, iout, spec.supplies.vdd);
    if (s !== undefined && Number.isFinite(s)) out.supplySensitivity = s;
    const ends = iout !== 0 ? endsOf(spec, gc, j, T) : null;
    const tc = ends ? coefficientFrom(ws.n, pr, iout, endOf(ends, ends.up, mirrorIndex, outputIndex), endOf(ends, ends.down, mirrorIndex, outputIndex)) : undefined;
    if (tc !== undefined) out.tc = tc;
    const mem = memberOf(j, mirrorIndex);
    const noise = mem && outputNoise(c, ws, pr, T, spec.analysis ?? DEFAULT_ANALYSIS, opts.curve, reaching(groupNoise(gc, j, T), probe, pr.lam, pr.support), localNames(mem.ns));
    if (noise) out.noise = noise;
  }
  const trange = spec.process.trange;
  if (trange && opts.box) {
    const curve = jointCurve(spec, gc, trange, ws.v).map((s, n) => {
      const t = trange[0] + ((trange[1] - trange[0]) * n) / (DRIFT.trangePoints - 1);
      const p = s?.converged ? probeOf(s.j, mirrorIndex, outputIndex) : undefined;
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
