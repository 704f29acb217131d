/**
 * The parameters a device is solved with: its mirror's device flavour (`process.devices`,
 * picked with a mirror's `device:`) when it names one, else the process's nmos or pmos.
 * Every place that needs a device's parameters asks here, so a flavour is honoured everywhere.
 */
import type { DeviceParams, Polarity, ProcessSpec, ResolvedMirror } from './types';

export function paramsOf(process: ProcessSpec, type: Polarity, device?: string): DeviceParams {
  const f = device === undefined ? undefined : process.devices?.[device];
  return f && f.type === type ? f.params : process[type];
}

/** The parameters of a device of polarity `type` in mirror `m`. */
export function mirrorParams(process: ProcessSpec, m: ResolvedMirror, type: Polarity): DeviceParams {
  return paramsOf(process, type, m.kind === 'netlist' ? undefined : m.device);
}
