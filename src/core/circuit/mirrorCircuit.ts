/**
 * A mirror elaborated into a circuit plus what the measurements need to read it: the input
 * branch, the mirror pair, devices by role, and a topology-aware initial guess.
 */
import { Workspace } from './workspace';
import type { Circuit } from './circuit';

export interface MirrorCircuit {
  circuit: Circuit;
  ws: Workspace;
  /** +1 NMOS (voltages measured up from vss), −1 PMOS (down from vdd). */
  sign: 1 | -1;
  /** V, the mirror's own rail: vss for NMOS, vdd for PMOS. */
  rail: number;
  /** V, vdd − vss. */
  span: number;
  /** Write the initial guess for the present held voltages into ws.v's free entries. */
  guess(): void;
  /** A, the input-branch current at ws.v. */
  iin(): number;
  /** Indices into circuit.devices of the mirror pair (ratioIdeal: out over ref). */
  pair?: { ref: number; out: number };
  /** Index into circuit.devices of the measured output's device (or a shared one) by role. */
  byRole: Record<string, number>;
  /** Held node of the wide-swing cascode gate. */
  vbiasNode?: number;
  /** A bank's circuit for its output j, made from this one without a build: what building it
   *  for output j gives (templates.ts); undefined where it cannot. `ws`: a workspace of this
   *  circuit's to take over instead of a new one, for a caller that overwrites all of it
   *  (Workspace.restore) before anything reads it. */
  forOutput?: (j: number, ws?: Workspace) => MirrorCircuit | undefined;
}

export function makeWorkspace(c: Circuit): Workspace { return new Workspace(c); }
