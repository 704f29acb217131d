/**
 * The MOSFET's stamp: its drain current into the nodal equations (residual and Jacobian), the
 * derivatives of that current with respect to its mismatch parameters (ΔVT, ln β) for the
 * small-signal analysis, its Pelgrom sigmas, its saturation margin for the compliance search,
 * and its report. The device equations themselves live in models/.
 */
import { BOLTZMANN, DEFAULTS, SOLVER } from '../../defaults';
import type { ChannelEval } from '../../models/core';
import { evalPrepared } from '../../models/evaluate';
import { evalFrame, evalTerminal } from '../../models/terminal';
import type { DeviceReport } from '../../types';
import type { Workspace } from '../workspace';
import type { MosElement } from './element';
import type { NoiseSources } from './noise';

/** Jacobian entries: rows d and s, columns d, g, b, s (this order: the slots follow it). */
export function mosPattern(m: MosElement, add: (row: number, col: number) => void): void {
  add(m.d, m.d); add(m.d, m.g); add(m.d, m.b); add(m.d, m.s);
  add(m.s, m.d); add(m.s, m.g); add(m.s, m.b); add(m.s, m.s);
}

/** Drain current (plus `gmin` across the channel) into F, its derivatives into G. */
export function loadMos(m: MosElement, ws: Workspace, gmin: number): void {
  const { v, F, G, absI, ch } = ws;
  const { d, g, s, b } = m;
  const vs = v[s]!;
  const vds = v[d]! - vs;
  evalTerminal(m.dev, v[g]! - vs, vds, v[b]! - vs, ch);
  const i = ch.id + gmin * vds;
  const gds = ch.gds + gmin;
  const gm = ch.gm, gmb = ch.gmb;
  const gss = gm + gds + gmb;
  if (ch.id !== 0 && ch.gds > 0 && ch.gds < ws.gdsFloor) ws.gdsFloor = ch.gds;
  F[d] = F[d]! + i; F[s] = F[s]! - i;
  const ai = Math.abs(i);
  absI[d] = absI[d]! + ai; absI[s] = absI[s]! + ai;
  const sl = ws.slots, k = m.slot;
  const dd = sl[k]!, dg = sl[k + 1]!, db = sl[k + 2]!, ds = sl[k + 3]!;
  const sd = sl[k + 4]!, sg = sl[k + 5]!, sb = sl[k + 6]!, ss = sl[k + 7]!;
  G[dd] = G[dd]! + gds; G[dg] = G[dg]! + gm; G[db] = G[db]! + gmb; G[ds] = G[ds]! - gss;
  G[sd] = G[sd]! - gds; G[sg] = G[sg]! - gm; G[sb] = G[sb]! - gmb; G[ss] = G[ss]! + gss;
}

/** Device-frame voltages (VGS, VDS, VBS; VSG, VSD, VSB for PMOS) at node voltages v. */
export function mosFrame(m: MosElement, v: Float64Array): [number, number, number] {
  const p = m.dev.sign;
  return [p * (v[m.g]! - v[m.s]!), p * (v[m.d]! - v[m.s]!), p * (v[m.b]! - v[m.s]!)];
}

/** ∂(drain current)/∂ΔVT (A/V, ΔVT added to the threshold magnitude) and ∂/∂ln β (A) at v;
 *  the current flows through the channel from the drain node to the source node. */
export function mosMismatchDerivatives(m: MosElement, v: Float64Array, ch: ChannelEval, out: Float64Array): void {
  const vs = v[m.s]!;
  evalTerminal(m.dev, v[m.g]! - vs, v[m.d]! - vs, v[m.b]! - vs, ch);
  // The threshold enters as VG − VT in the device frame: ∂I/∂VT = −sign·∂I/∂VG.
  out[0] = -m.dev.sign * ch.gm;
  out[1] = ch.id;
}

/** Per-device 1σ of ΔVT (V) and of Δβ/β (design §4: Pelgrom's pair coefficients over
 *  √(2·m·W·L)), or undefined when the process gives neither coefficient. */
export function mosSigmas(m: MosElement): [number, number] | undefined {
  const { avt, abeta } = m.params;
  if (avt === undefined && abeta === undefined) return undefined;
  const root = Math.sqrt(2 * m.size.m * m.size.w * m.size.l);
  if (!(root > 0)) return undefined;
  return [(avt ?? 0) / root, (abeta ?? 0) / root];
}

/** V, VDS − VDSsat; a device in cutoff counts with its (non-positive) overdrive, so it never
 *  passes as saturated. */
export function mosMargin(m: MosElement, v: Float64Array, ch: ChannelEval): number {
  const p = m.dev.sign;
  const vgs = p * (v[m.g]! - v[m.s]!), vds = p * (v[m.d]! - v[m.s]!);
  evalFrame(m.dev, vgs, vds, p * (v[m.b]! - v[m.s]!), ch);
  return ch.region === 0 ? vgs - ch.vth : vds - ch.vdsat;
}

/** The device's report at v. Voltages in the device's own polarity (VGS, VDS; VSG, VSD for
 *  PMOS); the body bias as the reverse-bias magnitude `vbs` = VSB (VBS for PMOS), so every
 *  voltage is positive in normal operation. */
export function mosReport(m: MosElement, v: Float64Array): DeviceReport {
  const p = m.dev.sign;
  const vgs = p * (v[m.g]! - v[m.s]!), vds = p * (v[m.d]! - v[m.s]!), vbs = p * (v[m.b]! - v[m.s]!);
  const e = evalPrepared(m.dev, vgs, vds, vbs);
  const r: DeviceReport = {
    name: m.name, role: m.role, type: m.type, w: m.size.w, l: m.size.l, m: m.size.m,
    id: e.id, vgs, vds, vbs: vbs === 0 ? 0 : -vbs, vth: e.vth, vov: vgs - e.vth, vdsat: e.vdsat, margin: vds - e.vdsat,
    region: e.region, inversion: e.inversion, ic: e.ic, gm: e.gm, gds: e.gds, gmb: e.gmb,
    ro: e.gds > 0 ? 1 / e.gds : 1 / SOLVER.gmin,
    gmId: e.id !== 0 ? e.gm / e.id : 0,
  };
  if (m.size.auto?.w || m.size.auto?.l) r.sized = true;
  if (m.params.table) r.table = m.params.table.file;
  return r;
}

/**
 * Its drain-current noise between drain and source (design §12): channel thermal noise
 * 4kT·γn·gm with the process's `gn`, and flicker noise in the input-referred form
 * kf/(Cox·W·L·f) (kf in V²·F, W·L the whole gate area m·W·L) carried to the drain by gm², so
 * the drain PSD is gm²·kf/(Cox·m·W·L·f). No flicker without both kf and cox.
 */
export function mosNoise(m: MosElement, v: Float64Array, ch: ChannelEval, temperature: number, out: NoiseSources): void {
  const vs = v[m.s]!;
  evalTerminal(m.dev, v[m.g]! - vs, v[m.d]! - vs, v[m.b]! - vs, ch);
  const gm = Math.abs(ch.gm);
  const { kf, cox } = m.params;
  const gn = m.params.gn ?? DEFAULTS.device.gn;
  const area = m.size.m * m.size.w * m.size.l;
  const flicker = kf !== undefined && cox !== undefined && area > 0 ? gm * gm * kf / (cox * area) : 0;
  out.add(m.name, m.d, m.s, 4 * BOLTZMANN * temperature * gn * gm, flicker);
}
