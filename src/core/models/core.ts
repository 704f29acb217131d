/**
 * The two channel models in the forward frame (VDS ≥ 0, device polarity), design §3. Each fills
 * a caller-owned record so the Newton loop allocates nothing.
 */
import type { ModelDevice } from './device';

/** Forward-frame result: current and its partial derivatives with respect to VGS, VDS, VBS. */
export interface ChannelEval {
  id: number; gm: number; gds: number; gmb: number;
  vth: number; vdsat: number; ic: number;
  /** 0 cutoff, 1 triode, 2 saturation. */
  region: 0 | 1 | 2;
}

export function newChannelEval(): ChannelEval {
  return { id: 0, gm: 0, gds: 0, gmb: 0, vth: 0, vdsat: 0, ic: 0, region: 0 };
}

/** Level-1 square law with body effect and length modulation; triode carries (1 + λ·VDS). */
export function squareLaw(dev: ModelDevice, vgs: number, vds: number, vbs: number, out: ChannelEval): void {
  const { beta, lambda, gamma, phi } = dev;
  const arg = phi - vbs;
  const root = arg > 0 ? Math.sqrt(arg) : 0;
  const vth = dev.vt0 + gamma * (root - Math.sqrt(phi));
  // dVT/dVBS = −γ/(2·sqrt(φ + VSB)); gmb = −gm·dVT/dVBS. Zero where the sqrt argument clamps.
  const bodySlope = arg > 0 ? gamma / (2 * root) : 0;
  const vov = vgs - vth;
  out.vth = vth;
  if (vov <= 0) {
    out.id = 0; out.gm = 0; out.gds = 0; out.gmb = 0; out.vdsat = 0; out.region = 0;
  } else {
    const clm = 1 + lambda * vds;
    if (vds < vov) {
      const core = vov * vds - 0.5 * vds * vds;
      out.id = beta * core * clm;
      out.gm = beta * vds * clm;
      out.gds = beta * ((vov - vds) * clm + core * lambda);
      out.region = 1;
    } else {
      const core = 0.5 * vov * vov;
      out.id = beta * core * clm;
      out.gm = beta * vov * clm;
      out.gds = beta * core * lambda;
      out.region = 2;
    }
    out.gmb = out.gm * bodySlope;
    out.vdsat = vov;
  }
  const is = 2 * dev.n * beta * dev.ut * dev.ut;
  out.ic = is > 0 ? out.id / is : 0;
}

/** ln(1 + eˣ) without overflow. */
function softplus(x: number): number {
  return x > 0 ? x + Math.log1p(Math.exp(-x)) : Math.log1p(Math.exp(x));
}

/** 1/(1 + e⁻ˣ) without overflow. */
function logistic(x: number): number {
  if (x >= 0) return 1 / (1 + Math.exp(-x));
  const e = Math.exp(x);
  return e / (1 + e);
}

/** Simplified EKV, constant slope factor, voltages referred to the bulk (design §3). */
export function ekv(dev: ModelDevice, vgs: number, vds: number, vbs: number, out: ChannelEval): void {
  const { beta, lambda, n, ut } = dev;
  const vp = (vgs - vbs - dev.vt0) / n;          // VP = (VGB − VT0)/n
  const is = 2 * n * beta * ut * ut;
  const xf = (vp + vbs) / (2 * ut);               // (VP − VSB)/(2·U_T)
  const xr = (vp - vds + vbs) / (2 * ut);         // (VP − VDB)/(2·U_T)
  const lf = softplus(xf);
  const lr = softplus(xr);
  const iF = is * lf * lf;
  const iR = is * lr * lr;
  // d(ln²(1 + eˣ))/dx = 2·ln(1 + eˣ)·logistic(x)
  const dF = is * 2 * lf * logistic(xf);
  const dR = is * 2 * lr * logistic(xr);
  const clm = 1 + lambda * vds;
  out.id = (iF - iR) * clm;
  out.gm = (clm * (dF - dR)) / (2 * n * ut);
  out.gmb = (clm * (dF - dR) * (n - 1)) / (2 * n * ut);
  out.gds = (clm * dR) / (2 * ut) + lambda * (iF - iR);
  out.ic = is > 0 ? iF / is : 0;
  out.vdsat = 2 * ut * Math.sqrt(out.ic + 0.25) + 3 * ut;
  out.vth = dev.vt0 - (n - 1) * vbs;              // VGS at which VP = VSB
  out.region = vds >= out.vdsat ? 2 : 1;
}

export function evalChannel(dev: ModelDevice, vgs: number, vds: number, vbs: number, out: ChannelEval): void {
  if (dev.model === 'ekv') ekv(dev, vgs, vds, vbs, out);
  else squareLaw(dev, vgs, vds, vbs, out);
}
