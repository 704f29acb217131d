/**
 * Public one-device evaluation for the reports and the sizing code: process parameters, size
 * and device-frame bias in; current, small-signal parameters, region and inversion out.
 */
import { DEFAULTS } from '../defaults';
import type { DeviceParams, Inversion, ModelKind, Region } from '../types';
import { newChannelEval } from './core';
import { prepareDevice, type DeviceSizeLike, type ModelDevice } from './device';
import { evalFrame } from './terminal';

export interface DeviceEvaluation {
  /** A, drain current in the device frame (negative when the device conducts backwards). */
  id: number;
  /** S, ∂ID/∂VGS, ∂ID/∂VDS, ∂ID/∂VBS. */
  gm: number; gds: number; gmb: number;
  vth: number; vdsat: number;
  /** Inversion coefficient ID/IS (square law: ID/(2·n·β·U_T²)). */
  ic: number;
  region: Region;
  inversion: Inversion;
  /** True when VDS < 0 made drain and source trade places. */
  swapped: boolean;
}

const REGIONS: readonly Region[] = ['cutoff', 'triode', 'saturation'];

/** weak IC < 0.1 ≤ moderate ≤ 10 < strong (design §3). */
export function inversionOf(ic: number): Inversion {
  if (ic < 0.1) return 'weak';
  return ic <= 10 ? 'moderate' : 'strong';
}

/** Evaluate a prepared device at device-frame voltages (VSG, VSD, VSB for PMOS). */
export function evalPrepared(dev: ModelDevice, vgs: number, vds: number, vbs: number): DeviceEvaluation {
  const ch = newChannelEval();
  const swapped = evalFrame(dev, vgs, vds, vbs, ch);
  return {
    id: ch.id, gm: ch.gm, gds: ch.gds, gmb: ch.gmb, vth: ch.vth, vdsat: ch.vdsat, ic: ch.ic,
    region: REGIONS[ch.region] ?? 'cutoff', inversion: inversionOf(ch.ic), swapped,
  };
}

/** One device at device-frame voltages. `temperatureK` is the operating temperature, `tnomK`
 *  where `params` hold (default DEFAULTS.tnom). PMOS: pass magnitudes (VSG, VSD, VSB as VBS). */
export function evalDevice(
  params: DeviceParams, size: DeviceSizeLike, vgs: number, vds: number, vbs: number,
  temperatureK: number, model: ModelKind, tnomK: number = DEFAULTS.tnom,
): DeviceEvaluation {
  const dev = prepareDevice(params, size, 'nmos', { model, temperature: temperatureK, tnom: tnomK });
  return evalPrepared(dev, vgs, vds, vbs);
}

/** Gate drive VGS (device frame) that makes a saturated device carry `id` with its source at
 *  `vsb` above the bulk, ignoring length modulation: the device's model inverted, for initial
 *  guesses and the sizing code. */
export function gateDriveFor(dev: ModelDevice, id: number, vsb: number): number {
  return dev.model.gateDrive(dev, id, vsb);
}
