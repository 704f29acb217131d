/**
 * The parameters a device is solved with: its device flavour (`process.devices`, picked with a
 * template mirror's `device:` or a netlist device's own) when it names one, else the process's
 * nmos or pmos.
 * Every place that needs a device's parameters asks here, so a flavour is honoured everywhere.
 */
import type { DeviceParams, Polarity, ProcessSpec, ResolvedMirror } from './types';
import { isBipolarDevice } from './device-types';

export function paramsOf(process: ProcessSpec, type: Polarity, device?: string): DeviceParams {
  const f = device === undefined ? undefined : process.devices?.[device];
  return f && f.type === type ? f.params : process[type];
}

/** The parameters of a device of polarity `type` in mirror `m`. */
export function mirrorParams(process: ProcessSpec, m: ResolvedMirror, type: Polarity): DeviceParams {
  return paramsOf(process, type, m.kind === 'netlist' ? undefined : m.device);
}

/** The parameters of device `name` (a template's role, a netlist's device name) of polarity
 *  `type` in mirror `m`: a netlist device may name its own flavour. */
export function deviceParams(process: ProcessSpec, m: ResolvedMirror, name: string, type: Polarity): DeviceParams {
  if (m.kind !== 'netlist') return paramsOf(process, type, m.device);
  const d = m.devices.find((x) => x.name === name) ?? m.startup?.find((x) => x.name === name);
  return paramsOf(process, type, d && !isBipolarDevice(d) ? d.device : undefined);
}
