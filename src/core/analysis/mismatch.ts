/**
 * Random mismatch of the output current (design §4, Pelgrom): σ(iout)/iout =
 * sqrt(Σ_i S_VT,i²·σ_VT,i² + S_β,i²·σ_β,i²), with σ_VT,i = avt/sqrt(2·m·W·L) and
 * σ_β,i = abeta/sqrt(2·m·W·L) per device (Pelgrom's coefficients describe a matched pair's
 * difference; one device carries 1/√2 of it) and S the sensitivities of ln(iout) from the
 * linearized circuit. A coefficient the process leaves out counts as zero; the figure is absent
 * only when no device has either coefficient.
 */
import type { MosInstance } from '../circuit/circuit';
import type { Sensitivities } from '../circuit/smallSignal';

/** Per-device 1σ of ΔVT (V) and of Δβ/β, or undefined when the process gives neither. */
export function deviceSigmas(m: MosInstance): { vt: number; beta: number } | undefined {
  const { avt, abeta } = m.params;
  if (avt === undefined && abeta === undefined) return undefined;
  const root = Math.sqrt(2 * m.size.m * m.size.w * m.size.l);
  if (!(root > 0)) return undefined;
  return { vt: (avt ?? 0) / root, beta: (abeta ?? 0) / root };
}

export function outputSigma(mos: MosInstance[], sens: Sensitivities, iout: number): number | undefined {
  let sum = 0;
  let any = false;
  mos.forEach((m, k) => {
    const s = deviceSigmas(m);
    if (!s) return;
    any = true;
    const svt = sens.vt[k]! / iout, sb = sens.beta[k]! / iout;
    sum += svt * svt * s.vt * s.vt + sb * sb * s.beta * s.beta;
  });
  return any && Number.isFinite(sum) ? Math.sqrt(sum) : undefined;
}
