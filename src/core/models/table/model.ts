/**
 * The characterisation-table model (design §11): the designer's own simulated id(l, vgs, vds,
 * vsb[, temperature]) per metre of width, interpolated (slice.ts) and scaled by m·W.
 *
 * What a table does not hold is stated here:
 * - Saturation limit (common practice in gm/ID design): VDSsat ≈ max(2/(gm/ID), 4·U_T).
 * - The reported threshold is VGS − 2·ID/gm, so the reported overdrive is 2/(gm/ID): the
 *   square-law overdrive in strong inversion, where that reading is made.
 * - The inversion coefficient comes from gm/ID through the EKV interpolation
 *   gm·n·U_T/ID = 1/(0.5 + √(0.25 + IC)) (Binkley, "Tradeoffs and Optimization in Analog CMOS
 *   Design", 2008, §3.7, from memory), with the process's n: it names the region only.
 * - Mismatch: a Monte Carlo ΔVT shifts the gate (vt0 holds ΔVT), Δβ/β scales the current
 *   (beta holds m·W·(1 + Δβ/β)), so Pelgrom's coefficients act as on the other models.
 * - Design targets are read off the table's gm/ID curve at the device's length, vsb = 0 and
 *   the reference VDS (half the table's largest vds); gate drives for a current (initial
 *   guesses, VDSsat for a current) at the table's largest vds.
 */
import type { ChannelEval } from '../core';
import type { ModelDevice } from '../device';
import type { DeviceModel, SizingContext } from '../model';
import type { DesignTarget } from '../../types';
import { evalSlice, vgsNear, type SlicePoint, type TableSlice } from './slice';

const pt: SlicePoint = { id: 0, gm: 0, gds: 0, dvsb: 0 };

/** V, the VDS at which design targets are read: half the table's largest vds (where gm/ID
 *  tables are commonly read, mid-supply). */
function referenceVds(s: TableSlice): number {
  return 0.5 * s.vds.x[s.vds.x.length - 1]!;
}

/** V, the VDS of a gate drive "in saturation": the table's largest vds, so even a device at a
 *  large overdrive is saturated there. */
function saturatedVds(s: TableSlice): number {
  return s.vds.x[s.vds.x.length - 1]!;
}

/** The inversion coefficient named by gm/ID (see the file comment). */
function icOfGmId(gmid: number, n: number, ut: number): number {
  const g = gmid * n * ut;
  if (!(g > 0)) return 1e6;
  if (g >= 1) return 0;
  const a = 1 / g - 0.5;
  return Math.max(0, a * a - 0.25);
}

function sliceOf(dev: ModelDevice): TableSlice {
  if (!dev.table) throw new Error('a table device was prepared without its table');
  return dev.table;
}

/** gm/ID (1/V) of the slice at (vgs, vds, 0). */
function gmIdAt(s: TableSlice, vgs: number, vds: number): number {
  evalSlice(s, vgs, vds, 0, pt);
  return pt.id > 0 ? pt.gm / pt.id : 0;
}

/** VGS where the slice's gm/ID at the reference VDS equals g, or which end it lies beyond. */
function vgsForGmId(s: TableSlice, g: number): number | 'above' | 'below' {
  const x = s.vgs, vds = referenceVds(s);
  let lo = x[0]!, hi = x[x.length - 1]!;
  if (g > gmIdAt(s, lo, vds)) return 'above';
  if (g < gmIdAt(s, hi, vds)) return 'below';
  for (let k = 0; k < 100 && hi - lo > 1e-14; k++) {
    const mid = 0.5 * (lo + hi);
    if (gmIdAt(s, mid, vds) > g) lo = mid; else hi = mid;
  }
  return 0.5 * (lo + hi);
}

/** gm/ID of a target: VOV as 2/(gm/ID) and IC through the same interpolation the channel
 *  reports IC with, so a device sized for its own reported IC keeps its size. */
function gmIdTarget(ctx: SizingContext, target: DesignTarget): number {
  if (target.kind === 'gmid') return target.value;
  if (target.kind === 'vov') return 2 / target.value;
  return 1 / (ctx.n * ctx.ut * (0.5 + Math.sqrt(0.25 + target.value)));
}

export const TABLE: DeviceModel = {
  title: 'characterisation table',
  coversWeakInversion: true,

  channel(dev, vgs, vds, vbs, out: ChannelEval): void {
    const s = sliceOf(dev);
    const vg = vgs - dev.vt0;
    evalSlice(s, vg, vds, -vbs, pt);
    const k = dev.beta;
    out.id = k * pt.id;
    out.gm = k * pt.gm;
    out.gds = k * pt.gds;
    out.gmb = -k * pt.dvsb;
    const vov = pt.gm > 0 ? 2 * pt.id / pt.gm : 0;
    out.vth = vgs - vov;
    out.vdsat = Math.max(vov, 4 * dev.ut);
    out.ic = icOfGmId(pt.id > 0 ? pt.gm / pt.id : 0, dev.n, dev.ut);
    out.region = vds >= out.vdsat ? 2 : 1;
  },

  /** Newton on ln(id) along the table's own curve at its largest VDS, from the grid's own
   *  crossing (`vgsNear`) and kept inside a bracket (bisection when a step leaves it): a few
   *  evaluations where a 64-step bisection stood (the self-biased references' loop-current
   *  search calls this hundreds of times per analysis). Beyond the table's vgs range by more
   *  than 0.5 V the answer is that end. */
  gateDrive(dev, id, vsb): number {
    const s = sliceOf(dev);
    const x = s.vgs, vds = saturatedVds(s);
    let lo = x[0]! - 0.5, hi = x[x.length - 1]! + 0.5;
    if (!(id > 0) || !(dev.beta > 0)) return lo + dev.vt0;
    const goal = Math.log(id / dev.beta);
    let v = vgsNear(s, goal, vsb);
    for (let k = 0; k < 100; k++) {
      evalSlice(s, v, vds, vsb, pt);
      const r = pt.id > 0 ? Math.log(pt.id) - goal : -Infinity;
      if (r === 0) break;
      if (r < 0) lo = v; else hi = v;
      const slope = pt.id > 0 ? pt.gm / pt.id : 0;
      const dv = slope > 0 ? -r / slope : NaN;
      if (Math.abs(dv) < 1e-13) { v += dv; break; }
      v = v + dv > lo && v + dv < hi ? v + dv : 0.5 * (lo + hi);
      if (hi - lo < 1e-13) break;
    }
    return v + dev.vt0;
  },

  saturationVoltage(dev, id): number {
    const s = sliceOf(dev);
    const vgs = TABLE.gateDrive(dev, id, 0) - dev.vt0;
    const g = gmIdAt(s, vgs, saturatedVds(s));
    return Math.max(g > 0 ? 2 / g : 0, 4 * dev.ut);
  },

  /** 2/(gm/ID) follows the gate one for one in strong inversion, as the square law's VOV. */
  saturationShift(_dev, dvgs): number {
    return dvgs;
  },

  /** ID/W at the VGS where the table's gm/ID meets the target: m·W/L = ID/((ID/W)·L). The
   *  table carries length modulation itself, so `clm` is not applied. */
  aspectForTarget(ctx, id, target): number | undefined {
    const s = ctx.slice;
    if (!s || !(id > 0) || !(target.value > 0)) return undefined;
    const vgs = vgsForGmId(s, gmIdTarget(ctx, target));
    if (typeof vgs !== 'number') return undefined;
    evalSlice(s, vgs, referenceVds(s), 0, pt);
    return pt.id > 0 ? id / (pt.id * s.l) : undefined;
  },

  targetLimit(ctx, target): string | undefined {
    const s = ctx.slice;
    if (!s) return undefined;
    const g = gmIdTarget(ctx, target);
    const at = vgsForGmId(s, g);
    if (typeof at === 'number') return undefined;
    const x = s.vgs, vds = referenceVds(s);
    const edge = at === 'above' ? gmIdAt(s, x[0]!, vds) : gmIdAt(s, x[x.length - 1]!, vds);
    return `gm/ID ${g.toPrecision(3)} /V is ${at === 'above' ? 'above the largest' : 'below the smallest'} gm/ID of table ${s.table.file} at L = ${s.l} m (${edge.toPrecision(3)} /V), so no width reaches it`;
  },
};
