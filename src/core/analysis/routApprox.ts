/**
 * Textbook first-order output resistance per kind (design §4), for comparison with the exact
 * small-signal value:
 *   simple                  1/gds_out
 *   cascode, wide-swing     ro_out + ro_outc + (gm_outc + gmb_outc)·ro_outc·ro_out
 *   wilson, wilson-balanced gm_out·ro_out·ro_in·gm_in/gm_diode
 */
import type { MirrorKind } from '../types';

/** Small-signal parameters of one device as the circuit sees them: gmb is zero for a device
 *  whose bulk is tied to its own source (the model's ∂ID/∂VBS exists, but VBS cannot move). */
export interface SmallSignal { gm: number; gds: number; gmb: number }

export function routApprox(kind: MirrorKind, byRole: Record<string, SmallSignal | undefined>): number | undefined {
  const ro = (r?: SmallSignal): number => (r && r.gds > 0 ? 1 / r.gds : NaN);
  const { out, outc, in: inDev, diode } = byRole;
  let value: number;
  switch (kind) {
    case 'simple': value = ro(out); break;
    case 'cascode':
    case 'wide-swing': {
      if (!out || !outc) return undefined;
      const r1 = ro(out), r2 = ro(outc);
      value = r1 + r2 + (outc.gm + outc.gmb) * r1 * r2;
      break;
    }
    case 'wilson':
    case 'wilson-balanced':
      if (!out || !inDev || !diode || diode.gm === 0) return undefined;
      value = (out.gm * ro(out) * ro(inDev) * inDev.gm) / diode.gm;
      break;
    default: return undefined;
  }
  return Number.isFinite(value) ? value : undefined;
}
