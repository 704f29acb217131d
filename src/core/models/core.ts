/**
 * The record a model fills for one channel in the forward frame (VDS ≥ 0, device polarity),
 * design §3. It is caller-owned and reused, so the Newton loop allocates nothing.
 */

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
