/**
 * The registry of template mirror kinds: one description per kind (kind.ts), one file each.
 * `satisfies` makes a kind of names.ts without a description, or a description without a name,
 * a compile error. Everything else that differs by kind reads this table, or switches over the
 * kind and ends in `assertNever`, so the compiler names each place a new kind must be handled.
 */
import { betaHelper } from './beta-helper';
import { betaMultiplier } from './beta-multiplier';
import { cascode } from './cascode';
import type { KindSpec } from './kind';
import { TEMPLATE_KINDS, type MirrorKind, type TemplateKind } from './names';
import { ptat } from './ptat';
import { simple } from './simple';
import { vbeResistor } from './vbe-resistor';
import { vgsResistor } from './vgs-resistor';
import { wideSwing } from './wide-swing';
import { wilson } from './wilson';
import { wilsonBalanced } from './wilson-balanced';
import { widlar } from './widlar';
import type { DeviceType, ResolvedMirror, TemplateMirror } from '../types';
import type { DeviceFamily, RoutFormula } from './kind';
import { isBipolarType } from '../device-types';

export { MIRROR_KINDS, TEMPLATE_KINDS, type MirrorKind, type TemplateKind } from './names';
export type { Connection, DeviceFamily, KindSpec, ReferenceLoop, RoutContext, RoutFormula, SmallSignal } from './kind';

export const KINDS = {
  simple,
  cascode,
  'wide-swing': wideSwing,
  wilson,
  'wilson-balanced': wilsonBalanced,
  'beta-helper': betaHelper,
  widlar,
  'beta-multiplier': betaMultiplier,
  'vgs-resistor': vgsResistor,
  ptat,
  'vbe-resistor': vbeResistor,
} satisfies Record<TemplateKind, KindSpec>;

export function isTemplateKind(kind: MirrorKind): kind is TemplateKind {
  return kind !== 'netlist';
}

/** Kinds that take `outputs:` (bias banks), in list order. */
export const BANK_KINDS: readonly TemplateKind[] = TEMPLATE_KINDS.filter((k) => KINDS[k].bank);
/** Kinds that take `vbias:`, in list order. */
export const VBIAS_KINDS: readonly TemplateKind[] = TEMPLATE_KINDS.filter((k) => KINDS[k].vbias);

/** Whether the mirror takes `vbias:` (its kind holds a cascode gate at a bias voltage). */
export function takesVbias(m: ResolvedMirror): m is TemplateMirror {
  return isTemplateKind(m.kind) && KINDS[m.kind].vbias;
}

/** Self-biased reference kinds (they take `resistor:` and `startup:`, no `input`), in list order. */
export const REFERENCE_KINDS: readonly TemplateKind[] = TEMPLATE_KINDS.filter((k) => KINDS[k].loop !== undefined);

/** Roles of the shared reference (every role but the output roles), in role order. */
export function referenceRoles(kind: TemplateKind): string[] {
  const { roles, outputRoles } = KINDS[kind];
  return roles.filter((r) => !outputRoles.includes(r));
}

/** The device family of a type. */
export function familyOf(type: DeviceType): DeviceFamily {
  return isBipolarType(type) ? 'bipolar' : 'mosfet';
}

/** The kind's textbook Rout for the family of `type`, if it has one. */
export function routFormula(kind: TemplateKind, type: DeviceType): RoutFormula | undefined {
  const k = KINDS[kind];
  const family = familyOf(type);
  if (k.families[0] === family) return k.rout;
  return family === 'bipolar' ? k.bipolarRout : undefined;
}
