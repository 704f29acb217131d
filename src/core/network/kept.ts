/**
 * The joint circuit of each network the analysis solved, kept with its solution beside the
 * network it describes (`SolvedNetwork`, as long as that lives): a fix's re-check solves the same
 * group with one member edited, starting from here (edited.ts) instead of a build and a cold
 * Newton start.
 *
 * The re-check replays the other members' builder calls (`JointCircuit.log`, `JointMember.ops`),
 * which only a re-check reads: they are logged by a second build of the group, the first time a
 * re-check asks for the kept joint, rather than with every analysis's build — a log of a
 * thousand-mirror network is tens of thousands of small objects that live as long as the
 * analysis, each copied by the young-generation collections until promoted.
 */
import type { ResolvedSpec, SolvedNetwork } from '../types';
import type { NetworkGroup } from './groups';
import { buildJoint, type JointCircuit } from './joint';

export interface KeptJoint {
  group: NetworkGroup;
  joint: JointCircuit;
  /** V, every node at the solution (the circuit's workspace is the solver's, not kept still). */
  v: Float64Array;
  /** The circuit's node indices by name, made on first use. */
  index(): Map<string, number>;
}

/** `spec`: what the joint circuit was built from, until its builder calls are logged. */
const kept = new WeakMap<SolvedNetwork, { k: KeptJoint; spec?: ResolvedSpec }>();

/** Keep `joint`, built unperturbed from `spec` for `group` (without a log). */
export function keepJoint(net: SolvedNetwork, spec: ResolvedSpec, group: NetworkGroup, joint: JointCircuit): void {
  let index: Map<string, number> | undefined;
  const names = joint.mc.circuit.nodeNames;
  const k: KeptJoint = { group, joint, v: joint.mc.ws.v.slice(), index: () => (index ??= new Map(names.map((n, i) => [n, i] as const))) };
  kept.set(net, joint.log ? { k } : { k, spec });
}

/** The kept joint of `net`, its builder calls logged (the build made again from the same spec
 *  and group: the same calls, in the same order, member by member). */
export function keptJoint(net: SolvedNetwork): KeptJoint | undefined {
  const e = kept.get(net);
  if (e?.spec) {
    const { joint } = e.k;
    const again = buildJoint(e.spec, e.k.group, undefined, undefined, { record: true });
    e.spec = undefined;
    if (again.log && again.members.length === joint.members.length) {
      joint.log = again.log;
      again.members.forEach((m, i) => { if (m.ops) joint.members[i]!.ops = m.ops; });
    }
  }
  return e?.k;
}
