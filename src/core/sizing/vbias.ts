/**
 * The wide-swing cascode gate voltage. qpoint's own pick (the engine root-finds vbias so that
 * `ref` sits at VDS = VDSsat + limits.margin) is what a fix writes in place of a vbias that
 * leaves a device in triode.
 */
import type { ResolvedSpec } from '../types';
import { measure, withMirror } from './devices';
import { mirrorAt } from '../mirror-at';
import { takesVbias } from '../kinds/index';

/** The vbias qpoint would pick for this wide-swing mirror (absolute V), or undefined. */
export function pickedVbias(spec: ResolvedSpec, mirrorIndex: number, outputIndex: number): number | undefined {
  const m = mirrorAt(spec, mirrorIndex);
  if (!m || !takesVbias(m)) return undefined;
  const { vbias: _written, ...rest } = m;
  void _written;
  const report = measure(withMirror(spec, mirrorIndex, rest), mirrorIndex, outputIndex);
  return report && report.converged && report.vbias !== undefined && Number.isFinite(report.vbias) ? report.vbias : undefined;
}

/** The spec with a given vbias on a wide-swing mirror. */
export function withVbias(spec: ResolvedSpec, mirrorIndex: number, vbias: number): ResolvedSpec {
  const m = mirrorAt(spec, mirrorIndex);
  if (!m || !takesVbias(m)) return spec;
  return withMirror(spec, mirrorIndex, { ...m, vbias });
}
