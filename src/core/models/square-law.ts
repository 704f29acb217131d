/**
 * Level-1 square law with body effect and length modulation (design §3). Valid in strong
 * inversion only; the inversion coefficient ID/(2·n·β·U_T²) is still reported so a designer
 * sees when it is being trusted below IC = 1.
 */
import type { ChannelEval } from './core';
import type { ModelDevice } from './device';
import type { DeviceModel } from './model';

/** VT = VT0 + γ·(sqrt(φ + VSB) − sqrt(φ)), the root clamped at zero. */
function threshold(dev: ModelDevice, vsb: number): number {
  const arg = dev.phi + vsb;
  return dev.vt0 + dev.gamma * ((arg > 0 ? Math.sqrt(arg) : 0) - Math.sqrt(dev.phi));
}

export const SQUARE_LAW: DeviceModel = {
  title: 'square law',
  coversWeakInversion: false,

  /** Triode carries (1 + λ·VDS) too, so ID is continuous at VDS = VOV. */
  channel(dev, vgs, vds, vbs, out: ChannelEval): void {
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
  },

  /** VGS = VT(VSB) + sqrt(2·ID/β). */
  gateDrive(dev, id, vsb): number {
    const vth = threshold(dev, vsb);
    if (!(dev.beta > 0) || !(id > 0)) return vth;
    return vth + Math.sqrt((2 * id) / dev.beta);
  },

  /** VDSsat = VOV = sqrt(2·ID/β). */
  saturationVoltage(dev, id): number {
    return dev.beta > 0 && id > 0 ? Math.sqrt((2 * id) / dev.beta) : 0;
  },

  /** VDSsat = VGS − VT moves one for one with the gate. */
  saturationShift(_dev, dvgs): number {
    return dvgs;
  },

  /** ID = β/2·VOV²·(1 + λ·VDS), gm/ID = 2/VOV (the length-modulation factor cancels in gm/ID),
   *  IC = ID/(2·n·β·U_T²) as the channel reports it. */
  aspectForTarget(ctx, id, target, clm): number | undefined {
    if (!(id > 0) || !(target.value > 0)) return undefined;
    if (target.kind === 'ic') return id / (2 * ctx.n * ctx.kp * ctx.ut * ctx.ut * target.value);
    const vov = target.kind === 'vov' ? target.value : 2 / target.value;
    return (2 * id) / (ctx.kp * vov * vov * clm);
  },

  /** Every positive overdrive, gm/ID and IC has a size under the square law. */
  targetLimit(): undefined {
    return undefined;
  },
};
