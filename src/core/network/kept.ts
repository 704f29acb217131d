/**
 * The joint circuit of each network the analysis solved, kept with its solution beside the
 * network it describes (`SolvedNetwork`, as long as that lives): a fix's re-check solves the same
 * group with one member edited, starting from here (edited.ts) instead of a build and a cold
 * Newton start.
 *
 * A re-check that rewires the whole group replays the other members' builder calls
 * (`JointCircuit.log`, `JointMember.ops`): they are logged by a second build of the group the
 * first time such a re-check asks (`logged`), rather than with every analysis's build — a log of a
 * thousand-mirror network is tens of thousands of small objects that live as long as the
 * analysis, each copied by the young-generation collections until promoted. A re-check that
 * solves the edited mirror's neighbourhood alone wires those few mirrors again and needs no log.
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
  /** joint.log, every member's `ops` in it, made on first use (undefined if that build differs). */
  logged(): JointCircuit['log'];
}

const kept = new WeakMap<SolvedNetwork, KeptJoint>();

/** Keep `joint`, built unperturbed from `spec` for `group` (without a log). */
export function keepJoint(net: SolvedNetwork, spec: ResolvedSpec, group: NetworkGroup, joint: JointCircuit): void {
  let index: Map<string, number> | undefined;
  // What the joint circuit was built from, until its builder calls are logged.
  let from: ResolvedSpec | undefined = joint.log ? undefined : spec;
  const names = joint.mc.circuit.nodeNames;
  kept.set(net, {
    group, joint, v: joint.mc.ws.v.slice(),
    index: () => (index ??= new Map(names.map((n, i) => [n, i] as const))),
    // The build made again from the same spec and group: the same calls, in the same order, member by member.
    logged: () => {
      if (from) {
        const again = buildJoint(from, group, undefined, undefined, { record: true });
        from = undefined;
        if (again.log && again.members.length === joint.members.length) {
          joint.log = again.log;
          again.members.forEach((m, i) => { if (m.ops) joint.members[i]!.ops = m.ops; });
        }
      }
      return joint.log;
    },
  });
}

/** The kept joint of `net`. */
export function keptJoint(net: SolvedNetwork): KeptJoint | undefined {
  return kept.get(net);
}
