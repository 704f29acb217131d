/**
 * The joint circuit of each network the analysis solved, kept with its solution beside the
 * network it describes (`SolvedNetwork`, as long as that lives): a fix's re-check solves the same
 * group with one member edited, starting from here (edited.ts) instead of a build and a cold
 * Newton start.
 */
import type { SolvedNetwork } from '../types';
import type { NetworkGroup } from './groups';
import type { JointCircuit } from './joint';

export interface KeptJoint {
  group: NetworkGroup;
  joint: JointCircuit;
  /** V, every node at the solution (the circuit's workspace is the solver's, not kept still). */
  v: Float64Array;
  /** The circuit's node indices by name, made on first use. */
  index(): Map<string, number>;
}

const kept = new WeakMap<SolvedNetwork, KeptJoint>();

export function keepJoint(net: SolvedNetwork, group: NetworkGroup, joint: JointCircuit): void {
  let index: Map<string, number> | undefined;
  const names = joint.mc.circuit.nodeNames;
  kept.set(net, { group, joint, v: joint.mc.ws.v.slice(), index: () => (index ??= new Map(names.map((n, k) => [n, k] as const))) });
}

export function keptJoint(net: SolvedNetwork): KeptJoint | undefined {
  return kept.get(net);
}
