/**
 * A network solved again with one member edited (a fix's re-check, rules/verify.ts), as
 * `solveNetworks(spec, undefined, { chainSigma: false })` solves it, without building the group's
 * circuit again or starting Newton cold.
 *
 * The analysis kept each group's joint circuit and solution (kept.ts). A fix edits one mirror;
 * when the edited mirror wires into the same nodes with elements of the same kinds and names (a
 * new size, a new device count: what a sizing fix writes), the group's circuit is the kept one with
 * that mirror's elements replaced — the same nodes, Jacobian pattern and elimination order, so
 * nothing else is built (as circuit/temperature.ts takes a circuit to another temperature). Every
 * other member's elements are the kept ones: a local re-check reads only the edited mirror again
 * (spec/fragment.ts), so the others are the mirrors the analysis wired, but for a held vbias that
 * the member's input current picks, picked again here as the build picks it. The whole group is
 * then solved by Newton from the kept solution — a fix moves the operating point a little, so a
 * few iterations reach it, to the solver's own tolerances —, falling back to the cold start a
 * build solves from, which then gives exactly what a build gives. A fix that rewires the mirror
 * (another kind), a group whose members or links changed, or a network the analysis did not keep
 * is built and solved as before. A re-check that reads the edited mirror alone solves its subtree
 * alone where that is the group's own solution (`solvedLocally`).
 */
import type { ResolvedSpec, SolvedNetwork, TemplateMirror } from '../types';
import { CircuitBuilder, type Circuit } from '../circuit/circuit';
import { assertNever, type CircuitElement } from '../circuit/elements/element';
import { deviceReport } from '../circuit/elements/device';
import { mainCurrent } from '../device-types';
import { wireTemplate, type WiredTemplate } from '../circuit/templates';
import { KINDS } from '../kinds/index';
import { vbiasFor } from '../analysis/vbias';
import { solveMirror } from '../analysis/solve';
import { indexOf, mirrorAt } from '../mirror-at';
import { networkGroups, type NetworkGroup } from './groups';
import { buildJoint, jointOf, key, memberWiring, outputCurrentOf, type JointCircuit, type JointMember } from './joint';
import { handedOn, handOn, withMirrors } from './index';
import { keptJoint, type KeptJoint } from './kept';

/** `spec`'s networks solved, `edited` (a file index) being the one mirror that differs from
 *  `base`, the analysed spec whose networks were kept; what solveNetworks gives without chain
 *  sigmas. With `only: 'edited'`, what a re-check that reads the edited mirror alone needs (its
 *  report without a joint drift): that mirror handed on at its group's solution, no other group
 *  solved, no other member handed on and no `networks` described — the same solve, so the
 *  edited mirror is the one the whole answer hands on. */
export function solveEditedNetworks(spec: ResolvedSpec, edited: number, base: ResolvedSpec, opts: { only?: 'edited' } = {}): ResolvedSpec {
  const only = opts.only === 'edited';
  const byRoot = new Map<number, KeptJoint>();
  for (const n of base.networks ?? []) {
    const k = keptJoint(n);
    if (k) byRoot.set(n.root, k);
  }
  const groups = (only && keptGroups(spec, edited, byRoot)) || networkGroups(spec);
  if (groups.length === 0) return spec;
  const changed = new Map<number, TemplateMirror>();
  const networks: SolvedNetwork[] = [];
  for (const g of groups) {
    if (only && !g.parent.has(edited) && indexOf(g.root) !== edited) continue;
    const k = byRoot.get(indexOf(g.root));
    const kept = k && sameLinks(g, k.group) ? k : undefined;
    const local = only && kept ? solvedLocally(spec, g, kept, edited) : undefined;
    if (local) { changed.set(edited, local); continue; }
    const patched = kept && withEdit(spec, g, kept, edited);
    const replayed = !patched && kept ? rebuilt(spec, g, kept, edited) : undefined;
    const j = patched ?? replayed?.j ?? buildJoint(spec, g);
    const warm = patched ? kept?.v : replayed?.warm;
    const r = warm ? solveMirror(j.mc, warm) : solveMirror(j.mc);
    if (!only) networks.push(handOn(spec, g, j, r, false, changed));
    else if (r.converged) handOnEdited(j, edited, changed);
  }
  return only ? withMirrors(spec, changed) : withMirrors(spec, changed, networks);
}

/** The edited member alone handed on at the solution of `j` (as handOn hands every member on). */
function handOnEdited(j: JointCircuit, edited: number, changed: Map<number, TemplateMirror>): void {
  const mem = j.members.find((x) => x.index === edited);
  if (!mem) return;
  const v = j.mc.ws.v;
  changed.set(edited, handedOn(mem.mirror, (k) => {
    const node = j.linkNode.get(k);
    return node === undefined ? undefined : { i: outputCurrentOf(j, k), v: v[node]! };
  }));
}

/**
 * The edited mirror handed on from a solve of its subtree alone, when that is the group's own
 * solution: the group's equations are then block-triangular. The mirror feeding it drives its
 * input node through output devices that are MOSFETs with their sources on a rail — a channel's
 * current enters only its drain and source, so no equation outside the subtree reads a node of
 * it — and the subtree's mirrors wire nodes of their own (namespaced) and the rails. The rest of
 * the group is then solved by the kept solution as it was (the edit changes no equation there),
 * and the subtree by its own equations with the feeder's gate held there: the subtree's members
 * as the build wires them (the edited one wired anew, the others replayed from the kept build),
 * the feeder's output devices with their gate and source held, Newton from the kept solution
 * (the topology guess at a node the edit added). The same cut is made below the mirrors the
 * edited one feeds, where each of them drives the mirrors it feeds the same way: no equation of
 * the edited mirror or of those it feeds reads a node further down, so the subtree is solved
 * down to them alone, the nodes they drive held at the kept solution (a fix of a mirror near a
 * thousand-mirror tree's root solves three mirrors, not five hundred). The same equations,
 * converged to the same tolerances, as the whole group solved (test/network/edited.test.ts);
 * undefined when any of that does not hold or the solve does not converge (the whole group is
 * solved then).
 */
export function solvedLocally(spec: ResolvedSpec, g: NetworkGroup, k: KeptJoint, edited: number): TemplateMirror | undefined {
  const p = g.parent.get(edited);
  if (!p) return undefined;
  const top = mirrorAt(spec, edited);
  if (!top || top.kind === 'netlist') return undefined;
  const byIndex = new Map(k.joint.members.map((mem) => [mem.index, mem] as const));
  const bc = k.joint.mc.circuit;
  const index = k.index();
  if (bc.fixedV[index.get('vdd') ?? -1] !== spec.supplies.vdd || bc.fixedV[index.get('vss') ?? -1] !== spec.supplies.vss) return undefined;
  const feederKey = `${p.mirror}:${p.output}`;
  const inNode = k.joint.linkNode.get(feederKey);
  const outs = k.joint.outDevices.get(feederKey);
  const own = byIndex.get(edited)!;
  // The feeder's output devices: the only elements on the input node but the edited mirror's.
  if (inNode === undefined || !outs || !railDrains(bc, inNode, outs, [0, bc.elements.length], own.added)) return undefined;
  const near = g.members.filter((m) => indexOf(m) === edited || g.parent.get(indexOf(m))?.mirror === edited);
  const cut = cutBelow(k, near.slice(1), byIndex);
  const below = cut ? undefined : subtree(g, edited);
  const members = below ? g.members.filter((m) => below.has(indexOf(m))) : near;
  for (const m of members) {
    const mem = byIndex.get(indexOf(m));
    if (!mem || KINDS[m.kind].vbias || mem.wired.inputResistor) return undefined;
  }
  const inputNode = `${top.name}/${KINDS[top.kind].inputNode}`;
  const fed = new Map<number, string>();
  for (const m of members) {
    const q = g.parent.get(indexOf(m));
    if (q?.mirror === edited) fed.set(q.output, `${m.name}/${KINDS[m.kind].inputNode}`);
  }
  const mirrorOf = new Map(members.map((m) => [indexOf(m), m] as const));
  const last = indexOf(members[members.length - 1]!);
  const sub: NetworkGroup = { root: top, members, parent: g.parent };
  let feeders: [number, number] = [0, 0];
  let firstDevice = 0;
  const j = buildJoint(spec, sub, undefined, undefined, {
    replay: (i, b) => {
      const mem = byIndex.get(i)!;
      let wired: WiredTemplate;
      if (i === edited) {
        wired = wireTemplate(b, spec, top, memberWiring(spec, top, (o) => fed.get(o)));
      } else {
        // A node cut below: held before the mirror's calls make it a free one.
        if (cut) for (const o of mem.wired.outNodes) if (cut.has(o)) b.hold(o, cut.get(o)!);
        // Wired as the group's build wired it (its linked outputs on the nodes they drove
        // there), so the builder's calls are the build's: a few mirrors wired here cost less
        // than logging the whole group's build to replay them.
        const m = mirrorOf.get(i)!;
        wired = wireTemplate(b, spec, m, memberWiring(spec, m, (o) => (k.joint.linkNode.has(key(i, o)) ? mem.wired.outNodes[o] : undefined)));
      }
      firstDevice += wired.deviceNames.length;
      if (i === last) {
        // After every member's devices, so the members' device indices are the build's.
        feeders = [firstDevice, firstDevice + outs.length];
        for (const d of outs) {
          const e = bc.devices[d]! as Extract<CircuitElement, { kind: 'mos' }>;
          const gate = b.hold(`${e.name}:gate`, k.v[e.g]!);
          const source = b.hold(bc.nodeNames[e.s]!, bc.fixedV[e.s]!);
          const bulk = e.b === e.s ? source : b.hold(bc.nodeNames[e.b]!, bc.fixedV[e.b]!);
          const desc = { name: e.name, role: e.role, type: e.type, size: e.size, params: e.params, dev: e.dev, measured: e.measured, ...(e.startup ? { startup: true as const } : {}) };
          b.mos(desc, inputNode, gate, source, bulk);
        }
      }
      return wired;
    },
  });
  const c = j.mc.circuit;
  if (c.problems.length > 0 || c.devices.length !== feeders[1]) return undefined;
  // The kept solution at every node it has; the guess only where the edit added one.
  const warm = j.mc.ws.v;
  let added = false;
  for (let x = 0; x < c.nFree && !added; x++) added = !((index.get(c.nodeNames[x]!) ?? Infinity) < bc.nFree);
  if (added) j.mc.guess();
  for (let x = 0; x < c.nFree; x++) {
    const at = index.get(c.nodeNames[x]!);
    if (at !== undefined && at < bc.nFree) warm[x] = k.v[at]!;
  }
  if (!solveMirror(j.mc, warm.slice()).converged) return undefined;
  const v = j.mc.ws.v;
  let iin = 0;
  for (let d = feeders[0]; d < feeders[1]; d++) iin += mainCurrent(deviceReport(c.devices[d]!, v));
  const mem = j.members[0]!;
  return handedOn(mem.mirror, (key) => {
    if (key === feederKey) return { i: iin };
    const node = j.linkNode.get(key);
    return node === undefined ? undefined : { i: outputCurrentOf(j, key), v: v[node]! };
  });
}

/**
 * The nodes the mirrors `fed` drive (each output linked on), by name, at the kept solution, when
 * each is driven only by the mirror's own output devices that are MOSFETs on a rail (railDrains):
 * the edited mirror's equations and theirs then read no node further down. Undefined otherwise.
 */
function cutBelow(k: KeptJoint, fed: readonly TemplateMirror[], byIndex: ReadonlyMap<number, JointMember>): Map<string, number> | undefined {
  const c = k.joint.mc.circuit;
  const cut = new Map<string, number>();
  for (const m of fed) {
    const mem = byIndex.get(indexOf(m));
    if (!mem) return undefined;
    for (let o = 0; o < m.outputs.length; o++) {
      const at = `${indexOf(m)}:${o}`;
      const node = k.joint.linkNode.get(at);
      if (node === undefined) continue;
      // Only the mirror's own elements are looked at: the ones below it are not built.
      if (!railDrains(c, node, k.joint.outDevices.get(at), mem.added)) return undefined;
      cut.set(c.nodeNames[node]!, k.v[node]!);
    }
  }
  return cut;
}

/**
 * Whether node `n` of circuit `c` is driven only by MOSFETs `devices`, each with its drain on it
 * and its source and bulk held (a rail): no other node's equation then reads it (a gate draws no
 * current). Looked at: the elements in `range` (indices past the held nodes' sources) but those
 * in `skip`.
 */
function railDrains(c: Circuit, n: number, devices: readonly number[] | undefined, range: readonly [number, number], skip?: readonly [number, number]): boolean {
  if (!devices || devices.length === 0) return false;
  const held = c.nodeNames.length - c.nFree;
  for (let q = held + range[0]; q < Math.min(held + range[1], c.elements.length); q++) {
    if (skip && q - held >= skip[0] && q - held < skip[1]) continue;
    const e = c.elements[q]!;
    const touches = e.kind === 'mos' ? e.d === n || e.s === n || e.g === n || e.b === n
      : e.kind === 'bjt' ? e.c === n || e.b === n || e.e === n
        : e.kind === 'resistor' || e.kind === 'capacitor' ? e.a === n || e.b === n
          : e.kind === 'current' ? e.from === n || e.to === n : e.node === n;
    if (!touches) continue;
    if (e.kind !== 'mos' || e.d !== n || e.s < c.nFree || (e.b !== e.s && e.b < c.nFree) || !devices.some((d) => c.devices[d] === e)) return false;
  }
  return true;
}

/**
 * The group built again with the edited mirror (and the mirror feeding it, whose output now
 * drives another input node name) wired anew and every other member's builder calls replayed
 * from the kept build: the very circuit buildJoint builds, without wiring a thousand mirrors.
 * Newton starts from the kept solution at every node it still has, the topology guess elsewhere.
 */
function rebuilt(spec: ResolvedSpec, g: NetworkGroup, k: KeptJoint, edited: number): { j: JointCircuit; warm: Float64Array } | undefined {
  const log = k.logged();
  if (!log) return undefined;
  const byIndex = new Map(k.joint.members.map((mem) => [mem.index, mem] as const));
  const feeding = g.parent.get(edited)?.mirror;
  const j = buildJoint(spec, g, undefined, undefined, {
    replay: (i, b) => {
      const mem = byIndex.get(i);
      // Wired anew: the edit, its feeding mirror, a member whose vbias its input current picks, an input resistor the joint reads.
      if (!mem?.ops || i === edited || i === feeding || KINDS[mem.mirror.kind].vbias || mem.wired.inputResistor) return undefined;
      b.replay(log, mem.ops[0], mem.ops[1]);
      return mem.wired;
    },
  });
  if (j.mc.circuit.problems.length > 0) return undefined;
  const c = j.mc.circuit, bc = k.joint.mc.circuit;
  const index = k.index();
  // Only the edited mirror's nodes can be new, and its guess reads only the guesses below it.
  j.guessOnly(subtree(g, edited));
  const warm = j.mc.ws.v.slice();
  for (let x = 0; x < c.nFree; x++) {
    const at = index.get(c.nodeNames[x]!);
    if (at !== undefined && at < bc.nFree) warm[x] = k.v[at]!;
  }
  return { j, warm };
}

/**
 * The group of the edited mirror, as networkGroups would list it, from a kept group without
 * listing the file's groups: every member as `spec` has it, each linked as in the kept group
 * (only the edited mirror differs from the analysed spec, so no other mirror joins or leaves
 * it); none when the edited mirror is neither linked nor fed and in no kept group. Undefined
 * when that is not known (networkGroups then lists them).
 */
function keptGroups(spec: ResolvedSpec, edited: number, byRoot: Map<number, KeptJoint>): NetworkGroup[] | undefined {
  const e = mirrorAt(spec, edited);
  if (!e || e.kind === 'netlist') return undefined;
  for (const k of byRoot.values()) {
    const h = k.group;
    if (!h.parent.has(edited) && indexOf(h.root) !== edited) continue;
    const members: TemplateMirror[] = [];
    for (const x of h.members) {
      const i = indexOf(x);
      const m = mirrorAt(spec, i);
      const p = h.parent.get(i);
      if (!m || m.kind === 'netlist') return undefined;
      if (p ? m.input.kind !== 'link' || m.input.mirror !== p.mirror || m.input.output !== p.output : m.input.kind === 'link') return undefined;
      members.push(m);
    }
    return [{ root: members[0]!, members, parent: h.parent }];
  }
  return e.input.kind === 'link' || e.outputs.some((o) => o.feeds !== undefined) ? undefined : [];
}

/** Mirror `top` and every member it feeds, directly or not (members list each after its feeder). */
function subtree(g: NetworkGroup, top: number): Set<number> {
  const out = new Set<number>([top]);
  for (const m of g.members) {
    const i = indexOf(m);
    const p = g.parent.get(i);
    if (p && out.has(p.mirror)) out.add(i);
  }
  return out;
}

/** The same members in the same order, each fed by the same output. */
function sameLinks(g: NetworkGroup, h: NetworkGroup): boolean {
  if (g.members.length !== h.members.length) return false;
  for (let n = 0; n < g.members.length; n++) {
    const i = indexOf(g.members[n]!);
    if (i !== indexOf(h.members[n]!)) return false;
    const p = g.parent.get(i), q = h.parent.get(i);
    if (p?.mirror !== q?.mirror || p?.output !== q?.output) return false;
  }
  return true;
}

/** The kept joint circuit with `spec`'s members: the edited one's elements wired again in place,
 *  every held vbias picked again; undefined when the edited mirror wires differently. */
function withEdit(spec: ResolvedSpec, g: NetworkGroup, kept: KeptJoint, edited: number): JointCircuit | undefined {
  const base = kept.joint, bc = base.mc.circuit;
  const { vdd, vss } = spec.supplies;
  const index = kept.index();
  const fixedV = bc.fixedV.slice();
  if (fixedV[index.get('vdd') ?? -1] !== vdd || fixedV[index.get('vss') ?? -1] !== vss) return undefined;
  const members: JointMember[] = base.members.map((mem, n) => ({ ...mem, mirror: g.members[n]! }));
  // A vbias the build picks from the member's own circuit (its input current moves with an edit upstream).
  for (const mem of members) {
    const m = mem.mirror;
    if (!KINDS[m.kind].vbias) continue;
    const at = index.get(`${mem.ns}vbias`);
    if (at === undefined || at < bc.nFree) return undefined;
    fixedV[at] = m.vbias ?? vbiasFor({ spec, mirror: m, outputIndex: 0 })?.vbias ?? 0.5 * (vdd + vss);
  }
  let circuit: Circuit = { ...bc, fixedV };
  const at = members.findIndex((mem) => mem.index === edited);
  if (at >= 0) {
    const rewired = rewire(spec, g, members[at]!, at === 0, index, circuit);
    if (!rewired) return undefined;
    circuit = rewired.circuit;
    members[at] = { ...members[at]!, wired: rewired.wired };
  }
  return jointOf(spec, g, members, circuit, { index, leafNode: base.leafNode, linkNode: base.linkNode, outDevices: base.outDevices });
}

/** Member `mem` (its mirror edited) wired alone with the names buildJoint gives it, put in place of
 *  its elements in `c`; undefined unless it has as many elements, of the same kinds and names, on
 *  the same nodes, each held node held. */
function rewire(spec: ResolvedSpec, g: NetworkGroup, mem: JointMember, root: boolean, index: Map<string, number>, c: Circuit) {
  const { vdd, vss } = spec.supplies;
  const m = mem.mirror;
  const b = new CircuitBuilder();
  b.hold('vdd', vdd);
  b.hold('vss', vss);
  const fed = new Map<number, string>();
  for (const x of g.members) {
    const p = g.parent.get(indexOf(x));
    if (p?.mirror === mem.index) fed.set(p.output, `${x.name}/${KINDS[x.kind].inputNode}`);
  }
  const wired = wireTemplate(b, spec, m, memberWiring(spec, m, (j) => fed.get(j), { root }));
  // A root fed through a resistor: the joint's root current reads that element itself.
  if (b.problems.length > 0 || wired.inputResistor || wired.deviceNames.length !== mem.wired.deviceNames.length) return undefined;
  const alone = b.build('vss', 1, vss, vdd);
  const held = c.nodeNames.length - c.nFree, heldAlone = alone.nodeNames.length - alone.nFree;
  const [from, to] = mem.added;
  if (alone.elements.length - heldAlone !== to - from) return undefined;
  // Node k of the mirror alone is node place[k] of the group; held in both or in neither.
  const place = new Int32Array(alone.nodeNames.length);
  const fixedV = c.fixedV;
  for (let k = 0; k < alone.nodeNames.length; k++) {
    const n = index.get(alone.nodeNames[k]!);
    if (n === undefined || (n < c.nFree) !== (k < alone.nFree)) return undefined;
    place[k] = n;
    if (k >= alone.nFree) fixedV[n] = alone.fixedV[k]!;
  }
  const elements = c.elements.slice(), devices = c.devices.slice();
  let d = mem.first;
  for (let q = 0; q < to - from; q++) {
    const e = alone.elements[heldAlone + q]!, was = c.elements[held + from + q]!;
    const x = inPlace(e, was, place);
    if (!x) return undefined;
    elements[held + from + q] = x;
    if (x.kind === 'mos' || x.kind === 'bjt') {
      if (devices[d] !== was) return undefined;
      devices[d++] = x;
    }
  }
  if (d !== mem.first + mem.wired.deviceNames.length) return undefined;
  return { circuit: { ...c, elements, devices }, wired };
}

/** Element `e` of the mirror alone as element `was` of the group (its nodes, its Jacobian slots),
 *  or undefined when they are not the same element on the same nodes. */
function inPlace(e: CircuitElement, was: CircuitElement, place: Int32Array): CircuitElement | undefined {
  if (e.kind !== was.kind || e.name !== was.name) return undefined;
  const same = (a: number, b: number): boolean => place[a] === b;
  switch (e.kind) {
    case 'mos': {
      const w = was as typeof e;
      return same(e.d, w.d) && same(e.g, w.g) && same(e.s, w.s) && same(e.b, w.b) ? { ...e, d: w.d, g: w.g, s: w.s, b: w.b, slot: w.slot } : undefined;
    }
    case 'bjt': {
      const w = was as typeof e;
      return same(e.c, w.c) && same(e.b, w.b) && same(e.e, w.e) ? { ...e, c: w.c, b: w.b, e: w.e, slot: w.slot } : undefined;
    }
    case 'resistor': {
      const w = was as typeof e;
      return same(e.a, w.a) && same(e.b, w.b) ? { ...e, a: w.a, b: w.b, slot: w.slot } : undefined;
    }
    case 'capacitor': {
      const w = was as typeof e;
      return same(e.a, w.a) && same(e.b, w.b) ? { ...e, a: w.a, b: w.b } : undefined;
    }
    case 'current': {
      const w = was as typeof e;
      return same(e.from, w.from) && same(e.to, w.to) ? { ...e, from: w.from, to: w.to } : undefined;
    }
    case 'voltage': return undefined;
    default: return assertNever(e);
  }
}
