/**
 * Mirrors by their place in the file. A spec whose mirrors all resolved holds each one at its
 * own list index; a partial spec (spec/index.ts: some mirrors have errors and are left out until
 * they are fixed) does not, so everything that knows a mirror by its index finds it here.
 */
import type { ResolvedMirror, ResolvedSpec } from './types';

/** The mirror whose path is ['mirrors', index]. */
export function mirrorAt(spec: ResolvedSpec, index: number): ResolvedMirror | undefined {
  const m = spec.mirrors[index];
  if (m && m.path[1] === index) return m;
  return spec.mirrors.find((x) => x.path[1] === index);
}

/** The file index of the mirror a finding's path (['mirrors', i, …]) is in, else undefined. A
 *  report carries its own (`MirrorReport.mirrorIndex`); this is for paths alone. */
export function mirrorIndexOfPath(path: readonly (string | number)[]): number | undefined {
  return path[0] === 'mirrors' && typeof path[1] === 'number' ? path[1] : undefined;
}

/** The mirror's index in the file's list. */
export function indexOf(mirror: ResolvedMirror): number {
  // Defensive: a malformed mirror (a defect upstream) still gets a report saying so.
  const at: unknown = Array.isArray(mirror.path) ? mirror.path[1] : undefined;
  return typeof at === 'number' ? at : -1;
}

/** The spec with the mirror at file index `index` replaced. */
export function withMirrorAt(spec: ResolvedSpec, index: number, mirror: ResolvedMirror): ResolvedSpec {
  return { ...spec, mirrors: spec.mirrors.map((x) => (indexOf(x) === index ? mirror : x)) };
}
