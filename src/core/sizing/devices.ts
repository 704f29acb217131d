/**
 * Devices of a resolved mirror addressed by role (and output, in a bias bank), and modified
 * copies of a spec with some devices resized — what every sizing solver evaluates.
 */
import { isBipolarDevice } from '../device-types';
import type { DeviceSize, MirrorReport, ResolvedMirror, ResolvedSpec } from '../types';
import { measureMirror, solveAt, type MirrorContext, type OperatingPoint } from '../analysis/index';
import type { MeasureOptions } from '../analysis/measure';
import { mirrorAt, withMirrorAt } from '../mirror-at';

/** One device of a mirror: a role (of output `output` for output roles), or a netlist device name. */
export interface DeviceRef { mirror: number; role: string; output?: number }

/** A written size key: MOSFET w, l; bipolar area; m for both. */
export type SizeKey = 'w' | 'l' | 'm' | 'area';

/** Every device of a mirror (all outputs of a bank). */
export function allDevices(spec: ResolvedSpec, mirrorIndex: number): DeviceRef[] {
  const m = mirrorAt(spec, mirrorIndex);
  if (!m) return [];
  if (m.kind === 'netlist') return m.devices.map((d) => ({ mirror: mirrorIndex, role: d.name }));
  const refs: DeviceRef[] = Object.keys(m.devices).map((role) => ({ mirror: mirrorIndex, role }));
  m.outputs.forEach((o, j) => { for (const role of Object.keys(o.devices)) refs.push({ mirror: mirrorIndex, role, output: j }); });
  return refs;
}

export function sameRef(a: DeviceRef, b: DeviceRef): boolean {
  return a.mirror === b.mirror && a.role === b.role && (a.output ?? -1) === (b.output ?? -1);
}

/** The resolved size of a device. */
export function sizeOf(spec: ResolvedSpec, ref: DeviceRef): DeviceSize | undefined {
  const m = mirrorAt(spec, ref.mirror);
  if (!m) return undefined;
  if (m.kind === 'netlist') {
    const d = m.devices.find((x) => x.name === ref.role);
    if (d && isBipolarDevice(d)) return { w: 0, l: 0, m: d.m, bulk: 'rail', area: d.area };
    return d ? { w: d.w, l: d.l, m: d.m, bulk: 'rail' } : undefined;
  }
  if (ref.output !== undefined) return m.outputs[ref.output]?.devices[ref.role];
  return m.devices[ref.role];
}

/** A copy of the spec whose mirror `mirrorIndex` has each device's size replaced by `change` (undefined: unchanged). */
export function resized(spec: ResolvedSpec, mirrorIndex: number, change: (ref: DeviceRef, size: DeviceSize) => DeviceSize | undefined): ResolvedSpec {
  const m = mirrorAt(spec, mirrorIndex);
  if (!m) return spec;
  let next: ResolvedMirror;
  if (m.kind === 'netlist') {
    next = {
      ...m,
      devices: m.devices.map((d) => {
        if (isBipolarDevice(d)) {
          const s = change({ mirror: mirrorIndex, role: d.name }, { w: 0, l: 0, m: d.m, bulk: 'rail', area: d.area });
          return s ? { ...d, area: s.area ?? d.area, m: s.m } : d;
        }
        const s = change({ mirror: mirrorIndex, role: d.name }, { w: d.w, l: d.l, m: d.m, bulk: 'rail' });
        return s ? { ...d, w: s.w, l: s.l, m: s.m } : d;
      }),
    };
  } else {
    const map = (devices: Record<string, DeviceSize>, output?: number) => {
      const out: Record<string, DeviceSize> = {};
      for (const [role, size] of Object.entries(devices)) out[role] = change({ mirror: mirrorIndex, role, output }, size) ?? size;
      return out;
    };
    next = { ...m, devices: map(m.devices), outputs: m.outputs.map((o, j) => ({ ...o, devices: map(o.devices, j) })) };
  }
  return withMirror(spec, mirrorIndex, next);
}

export function withMirror(spec: ResolvedSpec, mirrorIndex: number, mirror: ResolvedMirror): ResolvedSpec {
  return withMirrorAt(spec, mirrorIndex, mirror);
}

/** Scale w and/or l of the selected devices (all when `only` is absent). */
export function scaled(spec: ResolvedSpec, mirrorIndex: number, k: { w?: number; l?: number }, only?: (ref: DeviceRef) => boolean): ResolvedSpec {
  return resized(spec, mirrorIndex, (ref, s) => (only && !only(ref) ? undefined : { ...s, w: s.w * (k.w ?? 1), l: s.l * (k.l ?? 1) }));
}

function contextOf(spec: ResolvedSpec, mirrorIndex: number, outputIndex: number): MirrorContext | undefined {
  const mirror = mirrorAt(spec, mirrorIndex);
  return mirror ? { spec, mirror, outputIndex } : undefined;
}

/** Nominal output voltage of an output. */
function nominalVout(spec: ResolvedSpec, mirrorIndex: number, outputIndex: number): number {
  const m = mirrorAt(spec, mirrorIndex);
  if (!m) return NaN;
  return m.kind === 'netlist' ? m.output.v : m.outputs[outputIndex]?.output.v ?? NaN;
}

/** The full report of one output of a (modified) spec; undefined if the engine throws. */
export function measure(spec: ResolvedSpec, mirrorIndex: number, outputIndex: number, drift: MeasureOptions['drift'] = 'required'): MirrorReport | undefined {
  const ctx = contextOf(spec, mirrorIndex, outputIndex);
  if (!ctx) return undefined;
  try {
    return measureMirror(ctx, { drift });
  } catch {
    return undefined;
  }
}

/** One DC solve of an output at `vout` (default: nominal); undefined if not converged. */
export function solve(spec: ResolvedSpec, mirrorIndex: number, outputIndex: number, vout?: number): OperatingPoint | undefined {
  const ctx = contextOf(spec, mirrorIndex, outputIndex);
  if (!ctx) return undefined;
  try {
    const op = solveAt(ctx, vout ?? nominalVout(spec, mirrorIndex, outputIndex));
    return op.converged ? op : undefined;
  } catch {
    return undefined;
  }
}
