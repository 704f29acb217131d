/**
 * The joint circuits `solveNetworks` solved, kept with the spec it handed its members on in, so
 * that the drift and noise of every member output (drift.ts) start from that very solution
 * instead of building and solving the group again. Only where the second solve would be the
 * same circuit from the same guess, so its solution the same bits: a group solved without a
 * perturbation, whose build reads nothing the hand-on changes — the handed-on members differ
 * in their linked inputs' currents and linked outputs' voltages, which the joint circuit does not
 * read, but a picked `vbias` (vbias.ts, picked at the mirror's input current) and a reference
 * root's starting current (root-current.ts, solved with its taps at their output voltages) do.
 */
import { takesVbias } from '../kinds/index';
import { indexOf } from '../mirror-at';
import type { ResolvedSpec } from '../types';
import type { NetworkGroup } from './groups';
import type { JointCircuit } from './joint';

export interface SolvedJoint { j: JointCircuit; converged: boolean }

const handed = new WeakMap<ResolvedSpec, Map<number, SolvedJoint>>();

/** Whether the group's joint circuit and guess are the same built from the spec before the
 *  hand-on and after it. */
export function sameAfterHandOn(g: NetworkGroup): boolean {
  if (g.root.input.kind === 'self') return false;
  return g.members.every((m) => !(takesVbias(m) && m.vbias === undefined));
}

/** Keep each group's solved joint circuit (by its root's file index) with the handed-on spec. */
export function keepJoints(spec: ResolvedSpec, joints: Map<number, SolvedJoint>): void {
  if (joints.size > 0) handed.set(spec, joints);
}

/** The joint circuit solveNetworks solved for group `g` of `spec`, when it may stand for a new
 *  solve. */
export function handedJoint(spec: ResolvedSpec, g: NetworkGroup): SolvedJoint | undefined {
  return sameAfterHandOn(g) ? handed.get(spec)?.get(indexOf(g.root)) : undefined;
}
