/**
 * Temperature and length adjustments of the process parameters (design §3). Shared by the
 * solver and the sizing code, so both see the same device.
 */
import { BOLTZMANN, ELEMENTARY_CHARGE } from '../defaults';
import type { DeviceParams } from '../types';

/** U_T = k·T/q (V) from the exact SI defining constants. */
export function thermalVoltage(temperatureK: number): number {
  return (BOLTZMANN * temperatureK) / ELEMENTARY_CHARGE;
}

/** Threshold at the operating temperature: VT0(T) = vt0 + tcv·(T − Tnom). For PMOS vt0 is the
 *  magnitude and tcv acts on the magnitude. */
export function thresholdAt(p: DeviceParams, temperatureK: number, tnomK: number): number {
  return p.vt0 + p.tcv * (temperatureK - tnomK);
}

/** µ·Cox at the operating temperature: kp(T) = kp·(T/Tnom)^bex. */
export function kpAt(p: DeviceParams, temperatureK: number, tnomK: number): number {
  return p.kp * Math.pow(temperatureK / tnomK, p.bex);
}

/** Length modulation at length l (m): λ = lambda·lref/L when lref is given, else lambda. */
export function lambdaAt(p: DeviceParams, l: number): number {
  return p.lref !== undefined && l > 0 ? (p.lambda * p.lref) / l : p.lambda;
}
