/**
 * Every device model by the name a spec gives it (`process.model`). The table is total over
 * ModelKind: a name without an implementation, or an implementation without a name, does not
 * compile. The spec reader's list of names and the schema's enum come from here.
 */
import type { ModelKind } from '../types';
import { EKV } from './ekv';
import type { DeviceModel } from './model';
import { SQUARE_LAW } from './square-law';

export const MODELS = {
  'square-law': SQUARE_LAW,
  ekv: EKV,
} as const satisfies Record<ModelKind, DeviceModel>;

/** Model names in registry order. */
export const MODEL_NAMES = Object.keys(MODELS) as readonly ModelKind[];

/** The first registered model whose equations hold below IC = 1: what a finding about weak
 *  inversion under a strong-inversion model suggests instead. */
export const WEAK_INVERSION_MODEL: ModelKind | undefined = MODEL_NAMES.find((k) => MODELS[k].coversWeakInversion);
