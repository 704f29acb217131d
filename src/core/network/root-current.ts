/**
 * The current a group's root sets, as the network's starting point (the intended inputs before
 * design targets size anything, and the joint Newton guess): an ideal current is itself; a
 * resistor-fed root, its current at a typical diode drop; a self-biased reference, its own loop
 * current, solved alone first. Alone, a reference's taps are held at their own voltages instead
 * of the fed inputs': their gates draw no current, so the loop — and the current the taps copy —
 * is the same to within their λ. A reference that does not solve alone starts from a typical
 * bias current, 10 µA, as before; Newton takes the network from there.
 */
import type { ResolvedSpec, TemplateMirror } from '../types';
import { buildMirror, nominalVout, solveMirror } from '../analysis/solve';
import { vbiasFor } from '../analysis/vbias';

/** A, where a reference that cannot be solved alone starts (a typical bias current). */
export const REFERENCE_FALLBACK = 10e-6;

export function rootStartCurrent(spec: ResolvedSpec, root: TemplateMirror): number {
  const rin = root.input;
  if (rin.kind === 'current' || rin.kind === 'link') return rin.i;
  const span = spec.supplies.vdd - spec.supplies.vss;
  if (rin.kind === 'resistor') return Math.max(span - 0.7, 0.1 * span) / rin.r;
  return referenceAlone(spec, root) ?? REFERENCE_FALLBACK;
}

/** A, the loop current of reference `root` solved as a mirror of its own; undefined when it
 *  does not converge. */
function referenceAlone(spec: ResolvedSpec, root: TemplateMirror): number | undefined {
  try {
    const t = { spec, mirror: root, outputIndex: 0 };
    const mc = buildMirror(t, nominalVout(t), root.vbias ?? vbiasFor(t)?.vbias);
    if (!solveMirror(mc).converged) return undefined;
    const i = mc.iin();
    return i > 0 && Number.isFinite(i) ? i : undefined;
  } catch {
    return undefined;
  }
}
