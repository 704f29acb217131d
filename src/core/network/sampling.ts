/**
 * A bias network as Monte Carlo samples it (design §9.1): the whole group is one circuit, every
 * device of it drawn once per sample, and the one solution of a sample is read at every output of
 * the group — a leaf's spread includes every stage above it, an intermediate output's too (and the
 * devices below it that set its node's voltage).
 *
 * The circuit is the one `buildJoint` wires with no output singled out: its nodes, elements and
 * solutions are those of the group measured at any one output, so each output's figures are what
 * a circuit built for that output alone would give, to the last bit (test/network/sampling.test.ts).
 * One caveat: a group of more than SOLVER.denseMaxNodes unknowns is solved by the sparse LU, which
 * keeps its pivots from one factorization to the next, so another output's compliance solves
 * between two samples may move the last bits of a later sample (never its statistics).
 */
import type { ResolvedSpec } from '../types';
import type { MirrorCircuit } from '../circuit/mirrorCircuit';
import { indexOf } from '../mirror-at';
import { networkGroups } from './groups';
import { channelCurrent } from '../circuit/elements/device';
import { buildJoint, key } from './joint';

/** One output of the group, read at the circuit's present solution (ws.v, ws.F). */
export interface SampledOutput {
  mirrorIndex: number;
  outputIndex: number;
  /** A, the output's current. */
  iout: () => number;
  /** A, the current arriving at its mirror (at the root, the root's input). */
  iin: () => number;
  /** Devices counted for its saturation: its mirror's reference and this output's own. */
  counted: number[];
  /** Held node of a leaf output, where its compliance is tested; undefined for a linked output
   *  (the fed mirror's input node: solved, not held). */
  node?: number;
}

/** Every device of `mc` is drawn per sample; `outputs` is every output of every member, root
 *  first. */
export interface NetworkSampling { mc: MirrorCircuit; outputs: SampledOutput[] }

/** The group mirror `mirrorIndex` belongs to, built once for sampling; undefined when the mirror is
 *  in no network. Throws where buildJoint does (a group it cannot wire). */
export function networkSampling(spec: ResolvedSpec, mirrorIndex: number): NetworkSampling | undefined {
  if (!spec.networks) return undefined;
  const g = networkGroups(spec).find((x) => x.members.some((m) => indexOf(m) === mirrorIndex));
  if (!g) return undefined;
  const j = buildJoint(spec, g);
  const { circuit: c, ws } = j.mc;
  const devices = c.devices;
  // A linked output's current: joint.ts's outputCurrentOf, read without a device report (the
  // same channel evaluation, summed in the same order) — it is read every sample.
  const delivered = (k: string): (() => number) => {
    const on = j.outDevices.get(k) ?? [];
    return () => {
      let sum = 0;
      for (const d of on) sum += channelCurrent(devices[d]!, ws.v);
      return sum;
    };
  };
  const outputs: SampledOutput[] = [];
  for (const mem of j.members) {
    const fed = g.parent.get(mem.index);
    const iin = fed ? delivered(key(fed.mirror, fed.output)) : j.rootCurrent;
    // The reference devices: wired as counted whichever output is measured (no output is here).
    const shared: number[] = [];
    for (let d = mem.first; d < mem.first + mem.wired.deviceNames.length; d++) if (c.devices[d]!.measured) shared.push(d);
    const sign = mem.sign;
    mem.mirror.outputs.forEach((_, o) => {
      const k = key(mem.index, o);
      const node = j.leafNode.get(k);
      const counted = [...shared, ...(mem.wired.outputDevices[o] ?? []).map((d) => mem.first + d)].sort((a, b) => a - b);
      const iout = node === undefined ? delivered(k) : () => sign * ws.F[node]!;
      const out: SampledOutput = { mirrorIndex: mem.index, outputIndex: o, iout, iin, counted };
      if (node !== undefined) out.node = node;
      outputs.push(out);
    });
  }
  return { mc: j.mc, outputs };
}
