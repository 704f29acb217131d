/**
 * Device types as pure data (the webview's guard imports this file too): which are bipolar, and
 * which side of the supply a mirror of the type sits on. An NPN mirror sits where an NMOS one
 * does (emitters at vss, sinking its output current), a PNP one where a PMOS one does.
 */
import type { BipolarErrorSplit, ErrorSplit, BipolarType, DeviceReport, DeviceType, BipolarDeviceReport, NetlistBipolarDevice, NetlistDevice, Polarity } from './types';

export const MOS_TYPES = ['nmos', 'pmos'] as const satisfies readonly Polarity[];
export const BIPOLAR_TYPES = ['npn', 'pnp'] as const satisfies readonly BipolarType[];
export const DEVICE_TYPES = [...MOS_TYPES, ...BIPOLAR_TYPES] as const satisfies readonly DeviceType[];

export function isDeviceType(t: string): t is DeviceType {
  return (DEVICE_TYPES as readonly string[]).includes(t);
}

export function isBipolarType(t: DeviceType): t is BipolarType {
  return t === 'npn' || t === 'pnp';
}

export function isBipolarDevice(d: NetlistDevice): d is NetlistBipolarDevice {
  return isBipolarType(d.type);
}

export function isBipolarSplit(s: ErrorSplit): s is BipolarErrorSplit {
  return s.base !== undefined;
}

export function isBipolarReport(d: DeviceReport): d is BipolarDeviceReport {
  return isBipolarType(d.type);
}

/** Whether a mirror of this type has its rail at vss (NMOS, NPN): it sinks its output current,
 *  and its compliance is the lowest output voltage. */
export function sinksCurrent(t: DeviceType): boolean {
  return t === 'nmos' || t === 'npn';
}

/** +1 for NMOS and NPN, −1 for PMOS and PNP: terminal voltages times this are device-frame. */
export function polaritySign(t: DeviceType): 1 | -1 {
  return sinksCurrent(t) ? 1 : -1;
}

/** Whether a device is in its working region with a non-negative margin: saturation for a
 *  MOSFET, forward-active for a bipolar device. */
export function inWorkingRegion(d: DeviceReport): boolean {
  return d.region === workingRegion(d.type) && d.margin >= 0;
}

export function workingRegion(t: DeviceType): 'saturation' | 'forward-active' {
  return isBipolarType(t) ? 'forward-active' : 'saturation';
}

/** The voltage across a device's main current path (VDS, VCE; magnitudes) and its current. */
export function mainVoltage(d: DeviceReport): number { return isBipolarReport(d) ? d.vce : d.vds; }
export function mainCurrent(d: DeviceReport): number { return isBipolarReport(d) ? d.ic : d.id; }

/** Upper-case name of the type for people (NMOS, NPN…). */
export function typeTitle(t: DeviceType): string { return t.toUpperCase(); }
