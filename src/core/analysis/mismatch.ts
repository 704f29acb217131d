/**
 * Random mismatch of the output current (design §4, Pelgrom): σ(iout)/iout =
 * sqrt(Σ_i S_VT,i²·σ_VT,i² + S_β,i²·σ_β,i²), with σ_VT,i = avt/sqrt(2·m·W·L) and
 * σ_β,i = abeta/sqrt(2·m·W·L) per device (Pelgrom's coefficients describe a matched pair's
 * difference; one device carries 1/√2 of it) and S the sensitivities of ln(iout) from the
 * linearized circuit. A coefficient the process leaves out counts as zero; the figure is absent
 * only when no device has either coefficient.
 */
import { deviceSigmas } from '../circuit/elements/device';
import type { DeviceElement } from '../circuit/elements/element';
import type { Sensitivities } from '../circuit/smallSignal';

export function outputSigma(devices: DeviceElement[], sens: Sensitivities, iout: number): number | undefined {
  let sum = 0;
  let any = false;
  devices.forEach((d, k) => {
    const s = deviceSigmas(d);
    if (!s) return;
    any = true;
    const svt = sens.vt[k]! / iout, sb = sens.beta[k]! / iout;
    sum += svt * svt * s[0] * s[0] + sb * sb * s[1] * s[1];
  });
  return any && Number.isFinite(sum) ? Math.sqrt(sum) : undefined;
}
