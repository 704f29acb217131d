/**
 * Where a fix may move a device: not into a region where its model is not trusted. The square
 * law holds in strong inversion; below an inversion coefficient of about 1 it overestimates
 * gm/ID (it keeps 2/VOV growing past the weak-inversion limit 1/(n·UT)) and misplaces VDSsat
 * (design §3; docs/references.md §6: gm·n·UT/ID = 2/(1 + √(1 + 4·IC))). A widening
 * fix verified by the square law down there is verified by numbers that are not true, so it is
 * not offered; the designer is pointed at `model: ekv` or a smaller step instead.
 */
import { isBipolarReport } from '../device-types';
import type { DeviceReport, MirrorReport } from '../types';

/** IC below which the square law is not trusted (the square-law-weak-inversion finding's bound). */
export const SQUARE_LAW_MIN_IC = 1;

/**
 * The first device of `after` that a square-law fix moved below SQUARE_LAW_MIN_IC — one that was
 * at or above it in `before`, or already below and moved further down — else undefined. Devices
 * are matched by report path and name; a device new to the circuit counts as moved. Only solved
 * reports count (an unsolved one has no operating point, and its own finding).
 */
export function untrustedMove(before: readonly MirrorReport[], after: readonly MirrorReport[]): DeviceReport | undefined {
  const was = icIndex(before);
  for (const r of after) {
    if (!r.converged) continue;
    let own: Map<string, number> | undefined;
    for (const d of r.devices) {
      // A bipolar device's `ic` is its collector current, and its model holds at any current. A
      // start-up element is meant to sit near cutoff at the operating point: its figure there is
      // the start-up check's, not a square-law operating point.
      if (isBipolarReport(d) || d.role === 'startup' || !(d.ic < SQUARE_LAW_MIN_IC)) continue;
      own ??= was.get(pathKey(r));
      const ic = own?.get(d.name);
      if (ic === undefined || d.ic < Math.min(SQUARE_LAW_MIN_IC, ic) * (1 - 1e-6)) return d;
    }
  }
  return undefined;
}

/**
 * Each solved report's device ICs by report path, then device name: built once per `before` list
 * (a file's reports, against which every one of its fixes is compared), not once per fix.
 */
const icIndexes = new WeakMap<readonly MirrorReport[], Map<string, Map<string, number>>>();

function icIndex(reports: readonly MirrorReport[]): Map<string, Map<string, number>> {
  let index = icIndexes.get(reports);
  if (index) return index;
  index = new Map();
  for (const r of reports) {
    if (!r.converged) continue;
    const key = pathKey(r);
    let devices = index.get(key);
    if (!devices) index.set(key, devices = new Map());
    for (const d of r.devices) devices.set(d.name, d.ic);
  }
  icIndexes.set(reports, index);
  return index;
}

function pathKey(r: MirrorReport): string {
  return r.path.join('/');
}
