/**
 * Source/drain symmetry and polarity around the forward-frame models: a device with VDS < 0
 * is evaluated with drain and source swapped, and a PMOS with every voltage negated.
 */
import type { ChannelEval } from './core';
import type { ModelDevice } from './device';

/** Device-frame evaluation (voltages in the device's own polarity, any sign of VDS). On return
 *  `out.id` is the drain-to-source current in the device frame and gm/gds/gmb its derivatives
 *  with respect to the device-frame VGS/VDS/VBS; vth, vdsat, ic, region describe the channel
 *  in whichever orientation conducts. Returns true when drain and source were swapped. */
export function evalFrame(dev: ModelDevice, vgs: number, vds: number, vbs: number, out: ChannelEval): boolean {
  const model = dev.model;
  if (vds >= 0) {
    model.channel(dev, vgs, vds, vbs, out);
    return false;
  }
  // Swapped: the terminal called drain acts as source. I = −f(VGD, VSD, VBD).
  model.channel(dev, vgs - vds, -vds, vbs - vds, out);
  const gm = out.gm, gds = out.gds, gmb = out.gmb;
  out.id = -out.id;
  out.gm = -gm;
  out.gmb = -gmb;
  out.gds = gm + gds + gmb;
  return true;
}

/** Terminal evaluation for the nodal solver: voltages are plain node differences (VG − VS,
 *  VD − VS, VB − VS). `out.id` is the current entering the drain terminal and leaving the
 *  source; gm/gds/gmb are its derivatives with respect to those differences (the polarity
 *  sign cancels in the chain rule, so they are the device-frame values). */
export function evalTerminal(dev: ModelDevice, vgs: number, vds: number, vbs: number, out: ChannelEval): void {
  const s = dev.sign;
  evalFrame(dev, s * vgs, s * vds, s * vbs, out);
  if (s < 0) out.id = -out.id;
}
