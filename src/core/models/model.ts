/**
 * The device-model interface: everything the core asks of a device model, answered by each
 * implementation in its own file and registered by name in registry.ts. Code outside this
 * folder reaches a model through `MODELS[kind]` or a prepared device's `model`, never by
 * testing the model's name.
 */
import type { DesignTarget } from '../types';
import type { ChannelEval } from './core';
import type { ModelDevice } from './device';
import type { TableSlice } from './table/slice';

/** Process values a design target is sized with: kp at the operating temperature (A/V²), the
 *  slope factor n and the thermal voltage U_T (V). */
export interface SizingContext {
  kp: number; n: number; ut: number;
  /** A table device's table at the device's length and the operating temperature. */
  slice?: TableSlice;
}

export interface DeviceModel {
  /** Name in messages ("the square law", "the EKV model"). */
  readonly title: string;
  /** Whether the equations hold in weak and moderate inversion (IC below 1). */
  readonly coversWeakInversion: boolean;
  /**
   * Forward frame (VDS ≥ 0, device polarity): fills `out` with ID, gm, gds, gmb, VT, VDSsat,
   * the inversion coefficient and the region. The Newton loop calls this per device per
   * iteration, so it must not allocate.
   */
  channel(dev: ModelDevice, vgs: number, vds: number, vbs: number, out: ChannelEval): void;
  /** Gate drive VGS (device frame) that makes a saturated device carry `id` with its source at
   *  `vsb` above the bulk, ignoring length modulation (initial guesses, bias picks). */
  gateDrive(dev: ModelDevice, id: number, vsb: number): number;
  /** VDSsat (V) of a saturated device carrying `id` with its source at the bulk. */
  saturationVoltage(dev: ModelDevice, id: number): number;
  /** First-order change of VDSsat when the gate drive of a saturated device moves by `dvgs`
   *  at a fixed source. */
  saturationShift(dev: ModelDevice, dvgs: number): number;
  /** Aspect ratio m·W/L that puts a saturated device carrying `id` (A) at `target`, with `clm`
   *  the factor (1 + λ·VDS) at its operating point; undefined when no size reaches it. */
  aspectForTarget(ctx: SizingContext, id: number, target: DesignTarget, clm: number): number | undefined;
  /** Why this model cannot reach `target` at any size (a limit in numbers), if that is why. */
  targetLimit(ctx: SizingContext, target: DesignTarget): string | undefined;
}
