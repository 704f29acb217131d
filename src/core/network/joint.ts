/**
 * One linked group as one circuit (design §9.1): every member's devices in one builder, each
 * linked output's node being the fed mirror's input node (no source there, no held voltage),
 * every leaf output held at its own `output.v`. Solved as one Newton system — the sparse LU of
 * circuit/ for a big group — from a starting guess built leaf to root with each kind's own guess.
 */
import { KINDS } from '../kinds/index';
import { CircuitBuilder, type BuilderOp, type Circuit } from '../circuit/circuit';
import type { DeviceElement } from '../circuit/elements/element';
import { mainCurrent, polaritySign } from '../device-types';
import { makeWorkspace, type MirrorCircuit } from '../circuit/mirrorCircuit';
import { resistorCurrent } from '../circuit/elements/resistor';
import { channelCurrent, currentNodes, deviceReport } from '../circuit/elements/device';
import { guessNodes, idealRatio, isBank, wireTemplate, type GuessContext, type PerturbationLike, type TemplateWiring, type WiredTemplate } from '../circuit/templates';
import type { ResolvedSpec, TemplateMirror } from '../types';
import { indexOf } from '../mirror-at';
import { vbiasFor } from '../analysis/vbias';
import type { NetworkGroup } from './groups';
import { rootStartCurrent } from './root-current';

export interface JointMember {
  mirror: TemplateMirror;
  index: number;
  ns: string;
  wired: WiredTemplate;
  /** Index into circuit.devices of this member's first device. */
  first: number;
  /** The elements it added, in the builder's order (circuit.elements past the held nodes'
   *  sources): from, to (exclusive). */
  added: [number, number];
  /** Its builder calls, when the build was logged (JointCircuit.log): from, to (exclusive). */
  ops?: [number, number];
  sign: 1 | -1;
}

export interface JointCircuit {
  mc: MirrorCircuit;
  members: JointMember[];
  /** Held node index of each leaf output (`mirror:output`), and the node of each linked one. */
  leafNode: Map<string, number>;
  linkNode: Map<string, number>;
  /** Device indices on each output's node (the current it delivers), by `mirror:output`. */
  outDevices: Map<string, number[]>;
  vddNode: number;
  vssNode: number;
  /** A, the root's input current at ws.v. */
  rootCurrent(): number;
  /** Every builder call of the build, with `record` (network/edited.ts replays members from it). */
  log?: BuilderOp[];
  /** The starting guess (mc.guess) of the given members' nodes alone, each as the whole guess
   *  has it when they are a member and everything it feeds, directly or not (a subtree: the
   *  guess runs leaf to root); every other free node at the supplies' midpoint. */
  guessOnly(members: ReadonlySet<number>): void;
}

/** How buildJoint wires: `record` logs the builder's calls; `replay` wires member `i` itself
 *  (the same calls a wiring of it makes) or leaves it to wireTemplate (undefined). */
export interface JointWiring {
  record?: boolean;
  replay?: (i: number, b: CircuitBuilder) => WiredTemplate | undefined;
}

export const key = (mirror: number, output: number): string => `${mirror}:${output}`;

/** Build the group's circuit; `perturb` is keyed by joint device names (`mirror/device`). With
 *  `measure` (a leaf output), that output's node is the circuit's output, only its mirror's
 *  devices count as measured, and `mc.iin` is the current arriving at that mirror. */
export function buildJoint(spec: ResolvedSpec, g: NetworkGroup, perturb?: PerturbationLike, measure?: { mirror: number; output: number }, how: JointWiring = {}): JointCircuit {
  const { vdd, vss } = spec.supplies;
  const b = new CircuitBuilder();
  if (how.record) b.log = [];
  b.hold('vdd', vdd);
  b.hold('vss', vss);
  // The node a linked output drives is the fed mirror's input node.
  const fedBy = new Map<string, string>();
  for (const m of g.members.slice(1)) fedBy.set(key(g.parent.get(indexOf(m))!.mirror, g.parent.get(indexOf(m))!.output), `${m.name}/${KINDS[m.kind].inputNode}`);
  const members: JointMember[] = [];
  let first = 0;
  let measured: string | undefined;
  let measuredSign: 1 | -1 = 1;
  for (const m of g.members) {
    const i = indexOf(m);
    const ns = `${m.name}/`;
    const own = measure?.mirror === i;
    const from = b.added, opsFrom = b.log?.length ?? 0;
    const wired = how.replay?.(i, b) ?? wireTemplate(b, spec, m, memberWiring(spec, m, (j) => fedBy.get(key(i, j)), { root: m === g.root, perturb, ...(own ? { measured: measure!.output } : {}) }));
    const sign = polaritySign(m.type);
    const mem: JointMember = { mirror: m, index: i, ns, wired, first, added: [from, b.added], sign };
    if (b.log) mem.ops = [opsFrom, b.log.length];
    members.push(mem);
    first += wired.deviceNames.length;
    wired.outNodes.forEach((n, j) => {
      const pick = measure ? own && j === measure.output : measured === undefined;
      if (pick && !fedBy.has(key(i, j))) { measured = n; measuredSign = sign; }
    });
  }
  const c = b.build(measured ?? 'vss', measuredSign, vss, vdd);
  const index = new Map(c.nodeNames.map((n, k) => [n, k] as const));
  const leafNode = new Map<string, number>(), linkNode = new Map<string, number>(), outDevices = new Map<string, number[]>();
  for (const mem of members) {
    mem.wired.outNodes.forEach((n, j) => {
      const k = index.get(n)!;
      (fedBy.has(key(mem.index, j)) ? linkNode : leafNode).set(key(mem.index, j), k);
      const devs: number[] = [];
      for (let d = mem.first; d < mem.first + mem.wired.deviceNames.length; d++) if (currentNodes(c.devices[d]!)[0] === k) devs.push(d);
      outDevices.set(key(mem.index, j), devs);
    });
  }
  const j = jointOf(spec, g, members, c, { index, leafNode, linkNode, outDevices }, measure);
  if (b.log) j.log = b.log;
  return j;
}

/** How buildJoint wires member `m` into the group's circuit: namespaced by its name, its input
 *  on its input node (the root's is its own input), its outputs on `outNode`'s nodes (a linked
 *  one on the input node it feeds), the measured output (`measured`, an index) held at its own
 *  voltage. A re-check that wires a member again passes the same (edited.ts). */
export function memberWiring(spec: ResolvedSpec, m: TemplateMirror, outNode: (output: number) => string | undefined,
  opts: { root?: boolean; perturb?: PerturbationLike; measured?: number } = {}): TemplateWiring {
  const ns = `${m.name}/`;
  const { measured } = opts;
  return {
    ns, outputIndex: measured ?? -1, vout: measured === undefined ? 0 : m.outputs[measured]?.output.v ?? 0,
    vbias: m.vbias ?? vbiasFor({ spec, mirror: m, outputIndex: 0 })?.vbias, perturb: opts.perturb,
    ...(opts.root ? {} : { inputNode: `${ns}${KINDS[m.kind].inputNode}` }), outNode,
  };
}

/** Where a joint circuit's outputs are: node indices by name, each output's node (leaf or
 *  linked) and the devices on it. The same for every circuit of the group wired alike. */
export interface JointNodes {
  index: Map<string, number>;
  leafNode: Map<string, number>;
  linkNode: Map<string, number>;
  outDevices: Map<string, number[]>;
}

/** The joint circuit around built circuit `c` of the group's `members` (buildJoint's, or one
 *  with the same nodes and elements of the same kinds: network/edited.ts). */
export function jointOf(spec: ResolvedSpec, g: NetworkGroup, members: JointMember[], c: Circuit, nodes: JointNodes, measure?: { mirror: number; output: number }): JointCircuit {
  const { vdd, vss } = spec.supplies;
  const { index, leafNode, linkNode, outDevices } = nodes;
  const rootSign = polaritySign(g.root.type);
  const ws = makeWorkspace(c);
  if (measure) {
    for (const mem of members) {
      if (mem.index === measure.mirror) continue;
      for (let d = mem.first; d < mem.first + mem.wired.deviceNames.length; d++) c.devices[d]!.measured = false;
    }
  }
  const rootRes = members[0]!.wired.inputResistor;
  const rootIn = g.root.input;
  // A reference root: the loop current of its `ref`, which its taps copy.
  const rootRef = rootIn.kind === 'self' ? members[0]!.wired.byRole[KINDS[g.root.kind].pair.ref] : undefined;
  const rootCurrent = (): number => (rootRes ? resistorCurrent(rootRes, ws.v)
    : rootRef !== undefined ? channelCurrent(c.devices[members[0]!.first + rootRef]!, ws.v)
      : rootIn.kind === 'resistor' || rootIn.kind === 'self' ? NaN : rootIn.i);
  const rail = rootSign > 0 ? vss : vdd;
  // Only a cold start reads it (a reference root is solved alone for it).
  let rootStart: number | undefined;
  const guessOnly = (only?: ReadonlySet<number>): void => jointGuess(spec, g, members, c.nodeNames, index, c.fixedV, c.nFree, ws.v, c.devices, rootStart ??= rootStartCurrent(spec, g.root), only);
  const mc: MirrorCircuit = { circuit: c, ws, sign: rootSign, rail, span: vdd - vss, guess: () => guessOnly(), iin: rootCurrent, byRole: {} };
  const joint: JointCircuit = { mc, members, leafNode, linkNode, outDevices, vddNode: index.get('vdd')!, vssNode: index.get('vss')!, rootCurrent, guessOnly };
  const fed = measure ? g.parent.get(measure.mirror) : undefined;
  if (fed) {
    const k = key(fed.mirror, fed.output);
    mc.iin = () => outputCurrentOf(joint, k);
  }
  if (measure) {
    const mem = members.find((x) => x.index === measure.mirror);
    if (mem) { mc.sign = mem.sign; mc.rail = mem.sign > 0 ? vss : vdd; }
  }
  return joint;
}

/** A, the current output `k` delivers at ws.v (a magnitude, as iout). */
export function outputCurrentOf(j: JointCircuit, k: string): number {
  const v = j.mc.ws.v;
  let sum = 0;
  for (const d of j.outDevices.get(k) ?? []) sum += mainCurrent(deviceReport(j.mc.circuit.devices[d]!, v));
  return sum;
}

/** Node voltages assuming every device saturated, leaf mirrors first: a linked output's node is
 *  the fed mirror's input node, whose guess is known by the time its feeding mirror is guessed;
 *  the currents from the root's (`rootStart`) times the ideal ratios. */
function jointGuess(
  spec: ResolvedSpec, g: NetworkGroup, members: JointMember[], names: string[], index: Map<string, number>,
  fixedV: Float64Array, nFree: number, v: Float64Array, devices: DeviceElement[] | readonly unknown[], rootStart: number,
  only?: ReadonlySet<number>,
): void {
  const { vdd, vss } = spec.supplies;
  const span = vdd - vss;
  for (let k = 0; k < nFree; k++) v[k] = NaN;
  // Currents: the root's (a resistor root: its current at a typical diode drop), then the ideal ratios.
  const current = new Map<number, number>();
  // A reference root sets its own current: solved alone once (root-current.ts), its taps' mirrors
  // start from it.
  const root0 = rootStart;
  current.set(members[0]!.index, root0);
  const byIndex = new Map(members.map((x) => [x.index, x] as const));
  for (const mem of members.slice(1)) {
    const p = g.parent.get(mem.index)!;
    const up = byIndex.get(p.mirror)!;
    current.set(mem.index, (current.get(p.mirror) ?? root0) * (idealRatio(up.mirror, p.output) ?? 1));
  }
  for (let n = members.length - 1; n >= 0; n--) {
    const mem = members[n]!;
    if (only && !only.has(mem.index)) continue;
    const m = mem.mirror;
    const rail = mem.sign > 0 ? vss : vdd;
    const devByName = new Map<string, DeviceElement>();
    mem.wired.deviceNames.forEach((local, d) => devByName.set(local, devices[mem.first + d] as DeviceElement));
    const uOuts = mem.wired.outNodes.map((nm) => {
      const k = index.get(nm)!;
      const abs = k >= nFree ? fixedV[k]! : Number.isFinite(v[k]!) ? v[k]! : rail + mem.sign * 0.5 * span;
      return mem.sign * (abs - rail);
    });
    const vbK = index.get(`${mem.ns}vbias`);
    const ctx: GuessContext = {
      m, devByName, bank: isBank(m), ratios: m.outputs.map((_, j) => idealRatio(m, j) ?? 1), uOuts,
      uVb: vbK !== undefined ? mem.sign * (fixedV[vbK]! - rail) : 0, cNodes: mem.wired.cNodes, u: {}, span,
    };
    guessNodes(ctx, current.get(mem.index) ?? root0);
    const input = KINDS[m.kind].inputNode;
    for (const [local, u] of Object.entries(ctx.u)) {
      const name = local === input ? mem.wired.inputNode : index.has(`${mem.ns}${local}`) ? `${mem.ns}${local}` : local;
      const k = index.get(name);
      if (k !== undefined && k < nFree && Number.isFinite(u)) v[k] = rail + mem.sign * u;
    }
  }
  for (let k = 0; k < nFree; k++) if (!Number.isFinite(v[k]!)) v[k] = 0.5 * (vdd + vss);
  void names;
}
