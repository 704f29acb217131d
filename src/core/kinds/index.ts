/**
 * The registry of template mirror kinds: one description per kind (kind.ts), one file each.
 * `satisfies` makes a kind of names.ts without a description, or a description without a name,
 * a compile error. Everything else that differs by kind reads this table, or switches over the
 * kind and ends in `assertNever`, so the compiler names each place a new kind must be handled.
 */
import { betaMultiplier } from './beta-multiplier';
import { cascode } from './cascode';
import type { KindSpec } from './kind';
import { TEMPLATE_KINDS, type MirrorKind, type TemplateKind } from './names';
import { simple } from './simple';
import { vgsResistor } from './vgs-resistor';
import { wideSwing } from './wide-swing';
import { wilson } from './wilson';
import { wilsonBalanced } from './wilson-balanced';
import type { ResolvedMirror, TemplateMirror } from '../types';

export { MIRROR_KINDS, TEMPLATE_KINDS, type MirrorKind, type TemplateKind } from './names';
export type { Connection, DeviceFamily, KindSpec, ReferenceLoop, SmallSignal } from './kind';

export const KINDS = {
  simple,
  cascode,
  'wide-swing': wideSwing,
  wilson,
  'wilson-balanced': wilsonBalanced,
  'beta-multiplier': betaMultiplier,
  'vgs-resistor': vgsResistor,
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
