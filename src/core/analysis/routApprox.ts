/**
 * The textbook first-order output resistance of a mirror (design §4 routApprox), for comparison
 * with the exact small-signal value. Each kind carries its own formula (src/core/kinds/); a
 * netlist has none.
 */
import { isTemplateKind, KINDS, type MirrorKind, type SmallSignal } from '../kinds/index';

export type { SmallSignal };

export function routApprox(kind: MirrorKind, byRole: Record<string, SmallSignal | undefined>): number | undefined {
  if (!isTemplateKind(kind)) return undefined;
  const value = KINDS[kind].rout.value(byRole);
  return value !== undefined && Number.isFinite(value) ? value : undefined;
}
