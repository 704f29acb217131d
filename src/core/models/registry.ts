/**
 * Every device model by the name a spec gives it (`process.model`). The table is total over
 * ModelKind: a name without an implementation, or an implementation without a name, does not
 * compile. The spec reader's list of names and the schema's enum come from here.
 */
import type { DeviceParams, ModelKind } from '../types';
import { EKV } from './ekv';
import type { DeviceModel } from './model';
import { SQUARE_LAW } from './square-law';
import { TABLE } from './table/model';

export const MODELS = {
  'square-law': SQUARE_LAW,
  ekv: EKV,
  table: TABLE,
} as const satisfies Record<ModelKind, DeviceModel>;

/** The model a device with these parameters follows: its table when it has one, else the
 *  process model. */
export function modelKindOf(p: DeviceParams, kind: ModelKind): ModelKind {
  return p.table ? 'table' : kind;
}

/** Model names in registry order. */
export const MODEL_NAMES = Object.keys(MODELS) as readonly ModelKind[];

/** The first registered model whose equations hold below IC = 1: what a finding about weak
 *  inversion under a strong-inversion model suggests instead. */
export const WEAK_INVERSION_MODEL: ModelKind | undefined = MODEL_NAMES.find((k) => MODELS[k].coversWeakInversion && k !== 'table');
