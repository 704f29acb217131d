/**
 * The textbook first-order output resistance of a mirror (design §4 routApprox), for comparison
 * with the exact small-signal value. Each kind carries its own formula per device family
 * (src/core/kinds/); a netlist has none.
 */
import { isTemplateKind, routFormula, type MirrorKind, type RoutContext, type SmallSignal } from '../kinds/index';
import type { DeviceType } from '../types';

export type { SmallSignal };

export function routApprox(kind: MirrorKind, type: DeviceType, byRole: Record<string, SmallSignal | undefined>, ctx: RoutContext = {}): number | undefined {
  if (!isTemplateKind(kind)) return undefined;
  const value = routFormula(kind, type)?.value(byRole, ctx);
  return value !== undefined && Number.isFinite(value) ? value : undefined;
}
