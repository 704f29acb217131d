/**
 * Bias networks (design §9): every connected group of linked mirrors is solved as one circuit
 * (joint.ts); then each member is handed on as the mirror it is at that solution — its input the
 * current that arrives, each linked output held at the solved node voltage — so every later step
 * (measurements, rules and their fixes, corners, the CLI's sweep) sees the operating point of the
 * whole network, and measures each mirror's own figures (rout, compliance, sigma) there.
 *
 * `provisionalLinks` gives each linked input its intended current before design targets size
 * anything; `solveNetworks` solves the groups and records them in `spec.networks`.
 */
import type { ResolvedMirror, ResolvedSpec, SolvedNetwork, SolvedNetworkOutput, TemplateMirror } from '../types';
import { solveMirror } from '../analysis/solve';
import { deviceMismatchCurrents, deviceSigmas } from '../circuit/elements/device';
import { factorAtSolution } from '../circuit/smallSignal';
import { indexOf, mirrorAt } from '../mirror-at';
import { intendedInputOf, intendedInputs, networkGroups, type NetworkGroup } from './groups';
import { rootStartCurrent } from './root-current';
import { buildJoint, key, outputCurrentOf, type JointCircuit, type JointMember } from './joint';
import type { PerturbationLike } from '../circuit/templates';
import type { DcResult } from '../circuit/newton';
import { keepJoint } from './kept';
import { takesVbias } from '../kinds/index';
import { keepJoints, sameAfterHandOn, type SolvedJoint } from './handed';

function templateAt(spec: ResolvedSpec) {
  return (i: number): TemplateMirror | undefined => {
    const m = mirrorAt(spec, i);
    return m && m.kind !== 'netlist' ? m : undefined;
  };
}

/** Replace mirrors by file index (new spec and mirror objects; the input is not changed). */
export function withMirrors(spec: ResolvedSpec, changed: Map<number, TemplateMirror>, networks?: SolvedNetwork[]): ResolvedSpec {
  const mirrors: ResolvedMirror[] = spec.mirrors.map((m) => changed.get(indexOf(m)) ?? m);
  const out: ResolvedSpec = { ...spec, mirrors };
  if (networks) out.networks = networks;
  return out;
}

/** Each linked input's current set to its intended value (root current × ideal ratios). With
 *  `only` (a file index), the inputs a re-check of that one mirror reads (network/edited.ts with
 *  `only: 'edited'`: the joint circuit reads no linked input's current but where a `vbias` is
 *  picked from it): that mirror's own, and every one of its group if a member there takes a
 *  `vbias`; the other mirrors are kept as they are. */
export function provisionalLinks(spec: ResolvedSpec, opts: { only?: number } = {}): ResolvedSpec {
  const changed = new Map<number, TemplateMirror>();
  const at = templateAt(spec);
  const only = opts.only;
  // No vbias to pick: that mirror's input alone, along its path (no group listed).
  if (only !== undefined && !spec.mirrors.some(takesVbias)) {
    const m = at(only);
    if (!m || m.input.kind !== 'link') return spec;
    const cur = intendedInputOf(only, (root) => rootStartCurrent(spec, root), at, spec.mirrors.length);
    if (cur !== undefined) return withMirrors(spec, new Map([[only, { ...m, input: { ...m.input, i: cur } }]]));
  }
  const groups = networkGroups(spec);
  if (groups.length === 0) return spec;
  for (const g of groups) {
    const whole = only === undefined || g.members.some(takesVbias);
    if (!whole && !g.parent.has(only)) continue;
    const i0 = rootStartCurrent(spec, g.root);
    for (const [i, cur] of intendedInputs(g, i0, at)) {
      if (!whole && i !== only) continue;
      const m = at(i);
      if (m && m.input.kind === 'link') changed.set(i, { ...m, input: { ...m.input, i: cur } });
    }
  }
  return withMirrors(spec, changed);
}

/** Solve every group of `spec` and hand on its members at the solution; `spec.networks` then
 *  describes each group. A spec without links comes back unchanged. `chainSigma: false` leaves
 *  out the leaves' chain sigmas (one adjoint solve per leaf), which a fix's re-check and a corner
 *  do not report. */
export function solveNetworks(spec: ResolvedSpec, perturb?: PerturbationLike, opts: { chainSigma?: boolean } = {}): ResolvedSpec {
  const groups = networkGroups(spec);
  if (groups.length === 0) return spec;
  const changed = new Map<number, TemplateMirror>();
  const networks: SolvedNetwork[] = [];
  const chain = opts.chainSigma !== false;
  // The analysis's own solve (with chain sigmas, unperturbed) is kept: a fix's re-check starts from it (edited.ts).
  const keep = chain && !perturb;
  // And the member outputs' drift and noise start from it (handed.ts).
  const joints = new Map<number, SolvedJoint>();
  for (const g of groups) {
    const j = buildJoint(spec, g, perturb);
    const r = solveMirror(j.mc);
    if (!perturb && sameAfterHandOn(g)) joints.set(indexOf(g.root), { j, converged: r.converged });
    const net = handOn(spec, g, j, r, chain, changed);
    networks.push(net);
    if (keep && r.converged) keepJoint(net, spec, g, j);
  }
  const out = withMirrors(spec, changed, networks);
  keepJoints(out, joints);
  return out;
}

/** The group's figures at the solve `r` of its joint circuit `j` (design §9.3), each member handed
 *  on at the solution into `changed` (when it converged). */
export function handOn(spec: ResolvedSpec, g: NetworkGroup, j: JointCircuit, r: DcResult, chain: boolean, changed: Map<number, TemplateMirror>): SolvedNetwork {
  const net = describe(spec, g, j, r.converged, chain);
  if (r.note) net.solveNote = r.note;
  if (!r.converged) return net;
  for (const mem of j.members) changed.set(mem.index, handedOn(mem.mirror, (k) => net.outputs[k]));
  return net;
}

/** Member `m` at a joint solution: its linked input the current that arrives, each linked output
 *  at its node's voltage (`at`: the solved output `mirror:output`, a leaf's without `v`). */
export function handedOn(m: TemplateMirror, at: (k: string) => SolvedNetworkOutput | undefined): TemplateMirror {
  const i = indexOf(m);
  const outputs = m.outputs.map((o, k) => {
    const v = at(key(i, k))?.v;
    return v === undefined ? o : { ...o, output: { ...o.output, v } };
  });
  const input = m.input.kind === 'link' ? { ...m.input, i: at(key(m.input.mirror, m.input.output))!.i } : m.input;
  return { ...m, input, outputs };
}

/** λ with Jᵀ·λ = the leaf's row of G over the free columns (smallSignal.outputAdjoint, with the
 *  row given as (column, value index) pairs), into `lam` (the LU factored at the solution, `lam`
 *  zero but where the last call left its support: cleared here). Solved only where the row
 *  reaches (a leaf's path) where the factors allow; returns the support, or undefined (every
 *  node). */
function leafAdjoint(ws: JointCircuit['mc']['ws'], row: number[], lam: Float64Array, last: number[] | undefined): number[] | undefined {
  if (last) for (const k of last) lam[k] = 0; else lam.fill(0);
  const seeds: number[] = [];
  for (let k = 0; k < row.length; k += 2) { lam[row[k]!] = ws.G[row[k + 1]!]!; seeds.push(row[k]!); }
  const support = ws.solver.solveTransposeSparse(lam, seeds);
  if (!support) ws.solver.solveTranspose(lam);
  return support;
}

/** What a device's mismatch does at the solution, whichever output reads it: its sigmas and
 *  the derivatives of the currents leaving its nodes (node, d1, d2 in turn). */
interface DeviceMismatch { sigmas: [number, number] | undefined; currents: number[] }

function deviceMismatch(c: JointCircuit['mc']['circuit'], ws: JointCircuit['mc']['ws'], d: number): DeviceMismatch {
  const currents: number[] = [];
  const sigmas = deviceSigmas(c.devices[d]!);
  if (sigmas) deviceMismatchCurrents(c.devices[d]!, ws.v, ws.ch, (node, d1, d2) => { currents.push(node, d1, d2); });
  return { sigmas, currents };
}

/** A device's part of a leaf's chain variance, Σ (d ln(iout)/dθ)²·σ² over its two mismatch
 *  parameters, from the output's adjoint λ (as smallSignal.outputSensitivities, for one device:
 *  a leaf's path is a small part of a big network). */
function pathVariance(c: JointCircuit['mc']['circuit'], n: number, lam: Float64Array, currents: number[], iout: number, s: [number, number]): number {
  let w1 = 0, w2 = 0;
  // Summed over the nodes the device's currents leave (a bipolar device: its base too).
  for (let k = 0; k < currents.length; k += 3) {
    const node = currents[k]!;
    let w = 0;
    if (node === c.outNode) w += 1;
    if (node < n) w -= lam[node]!;
    w1 += w * currents[k + 1]!; w2 += w * currents[k + 2]!;
  }
  const svt = c.outSign * w1 / iout, sb = c.outSign * w2 / iout;
  return svt * svt * s[0] * s[0] + sb * sb * s[1] * s[1];
}

/** The network's figures at the joint solution (design §9.3). */
function describe(spec: ResolvedSpec, g: NetworkGroup, j: JointCircuit, converged: boolean, chain: boolean): SolvedNetwork {
  const { ws, circuit: c } = j.mc;
  const outputs: Record<string, SolvedNetworkOutput> = {};
  for (const [k, node] of j.linkNode) outputs[k] = { i: outputCurrentOf(j, k), v: ws.v[node]! };
  // Leaf outputs: iout from the held node; chainSigma from the joint adjoint over the devices of
  // every mirror on the path from the root (walked up by parent: a path is a few mirrors of many).
  const byIndex = new Map(j.members.map((m) => [m.index, m] as const));
  const saved = { node: c.outNode, sign: c.outSign };
  const sigmaAt = chain && converged && factorAtSolution(ws);
  // Each leaf's row of the Jacobian (its free columns), gathered in one pass over the pattern:
  // the adjoint's right-hand side without a search per entry.
  const rows = new Map<number, number[]>();
  if (sigmaAt) {
    for (const node of j.leafNode.values()) rows.set(node, []);
    const { colPtr, rowIdx } = ws.pattern;
    for (let col = 0; col < ws.n; col++) {
      for (let p = colPtr[col]!; p < colPtr[col + 1]!; p++) rows.get(rowIdx[p]!)?.push(col, p);
    }
  }
  const lam = sigmaAt ? new Float64Array(ws.n) : undefined;
  let support: number[] | undefined = [];
  // Each device's mismatch figures, made the first time a leaf's path reaches it.
  const mismatch: (DeviceMismatch | undefined)[] = [];
  let toVdd = 0, toVss = 0;
  for (const mem of j.members) {
    mem.mirror.outputs.forEach((_, o) => {
      const k = key(mem.index, o);
      const node = j.leafNode.get(k);
      if (node === undefined) return;
      const iout = mem.sign * ws.F[node]!;
      const out: SolvedNetworkOutput = { i: iout };
      // A leaf's current flows through its load between the rails.
      if (mem.sign > 0) toVdd += iout; else toVss += iout;
      if (lam) {
        c.outNode = node; c.outSign = mem.sign;
        support = leafAdjoint(ws, rows.get(node) ?? [], lam, support);
        let sum = 0, any = false;
        for (let at: JointMember | undefined = mem; at; at = byIndex.get(g.parent.get(at.index)?.mirror ?? -1)) {
          for (let d = at.first; d < at.first + at.wired.deviceNames.length; d++) {
            const dm = (mismatch[d] ??= deviceMismatch(c, ws, d));
            const s = dm.sigmas;
            if (!s) continue;
            any = true;
            sum += pathVariance(c, ws.n, lam, dm.currents, iout, s);
          }
        }
        if (any && Number.isFinite(sum)) out.chainSigma = Math.sqrt(sum);
      }
      outputs[k] = out;
    });
  }
  c.outNode = saved.node; c.outSign = saved.sign;
  const { vdd, vss } = spec.supplies;
  const supplyCurrent = { vdd: ws.F[j.vddNode]! + toVdd, vss: -ws.F[j.vssNode]! + toVss };
  return {
    root: indexOf(g.root), members: g.members.map(indexOf), converged,
    rootCurrent: j.rootCurrent(), supplyCurrent, power: (vdd - vss) * 0.5 * (supplyCurrent.vdd + supplyCurrent.vss), outputs,
  };
}
