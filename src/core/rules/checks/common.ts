/** Small helpers shared by the checks. */
import type { DeviceParams, DeviceReport, MosDeviceReport, ResolvedSpec } from '../../types';
import { inWorkingRegion, sinksCurrent } from '../../device-types';
import type { OperatingPoint } from '../../analysis/index';
import { solve } from '../../sizing/devices';
import type { Site } from '../sites';
import { refOf } from '../sites';
import { mirrorParams } from '../../flavours';

/** Devices of this output: the shared reference roles and this output's own roles. */
export function siteDevices(site: Site): DeviceReport[] {
  return site.report.devices.filter((d) => {
    // A start-up element is off by design at the operating point: the start-up check judges it.
    if (d.role === 'startup') return false;
    const ref = refOf(site, d);
    return ref.output === undefined || ref.output === site.outputIndex;
  });
}

/** The process parameters a reported MOSFET was solved with. */
export function paramsOfDevice(spec: ResolvedSpec, site: Site, d: MosDeviceReport): DeviceParams {
  return mirrorParams(spec.process, site.mirror, d.type);
}

/** In its working region (MOSFET saturation, bipolar forward-active) with a margin ≥ 0. */
export function isSaturated(d: DeviceReport): boolean {
  return inWorkingRegion(d);
}

export function deviceIn(op: OperatingPoint | undefined, name: string): DeviceReport | undefined {
  return op?.devices.find((d) => d.name === name);
}

/** Margin of device `name` at `vout` in a (modified) spec, minus `target`; NaN if unsolvable. */
export function marginGoal(site: Site, name: string, target: number, vout: number): (s: ResolvedSpec) => number {
  return (s) => {
    const d = deviceIn(solve(s, site.mirrorIndex, site.outputIndex, vout), name);
    return d ? d.margin - target : NaN;
  };
}

/** Vout on the supply side of nominal (away from the compliance rail): NMOS above, PMOS below. */
export function awayFromRail(site: Site, spec: ResolvedSpec): { from: number; to: number } {
  return sinksCurrent(site.mirror.type) ? { from: site.vout, to: spec.supplies.vdd } : { from: site.vout, to: spec.supplies.vss };
}

/**
 * The output voltage between `a` (where `test` is true) and `b` (false) at which `test` flips,
 * by bisection to 1 mV on full solves.
 */
export function crossing(site: Site, spec: ResolvedSpec, a: number, b: number, test: (op: OperatingPoint) => boolean | undefined): number | undefined {
  let good = a;
  let bad = b;
  for (let i = 0; i < 40 && Math.abs(bad - good) > 1e-3; i++) {
    const mid = 0.5 * (good + bad);
    const op = solve(spec, site.mirrorIndex, site.outputIndex, mid);
    const t = op ? test(op) : undefined;
    if (t === undefined) return undefined;
    if (t) good = mid; else bad = mid;
  }
  return 0.5 * (good + bad);
}
