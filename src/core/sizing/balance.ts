/**
 * Wilson → balanced Wilson. The added diode `bal` (gate = drain = X, source on the drain of
 * `in`) drops VGS_bal, so VDS_in = VGS_diode + VGS_out − VGS_bal: it equals VDS_diode, and the
 * VDS error of the Wilson cancels, when bal runs at out's current density. bal carries iin and
 * out carries iout, so bal's β should be out's β divided by the ratio (Gray et al. ch. 4, from
 * memory; the 4-transistor Wilson).
 */
import type { DeviceSize, TemplateMirror } from '../types';

/** The size `bal` needs for equal current density with `out` (W scaled; L and m as out's). */
export function balancedBalSize(mirror: TemplateMirror, ratio: number): DeviceSize | undefined {
  const out = mirror.outputs[0]?.devices.out;
  if (!out || !(ratio > 0)) return undefined;
  return { ...out, w: out.w / ratio };
}
