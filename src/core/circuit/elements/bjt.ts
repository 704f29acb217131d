/**
 * The bipolar transistor's stamp: collector and base currents into the nodal equations, the
 * derivatives of its terminal currents with respect to its mismatch parameters (ln IS, ln βF),
 * its area-law sigmas, its forward-active margin and its report. The equations live in
 * models/bipolar.ts.
 */
import { ELEMENTARY_CHARGE, SOLVER } from '../../defaults';
import { CUTOFF_IS, evalBipolar, newBipolarEval } from '../../models/bipolar';
import type { BipolarDeviceReport, Region } from '../../types';
import type { Workspace } from '../workspace';
import type { BjtElement } from './element';
import type { NoiseSources } from './noise';

const ev = newBipolarEval();

/** Jacobian entries: rows c, b, e by columns c, b, e (this order: the slots follow it). */
export function bjtPattern(q: BjtElement, add: (row: number, col: number) => void): void {
  add(q.c, q.c); add(q.c, q.b); add(q.c, q.e);
  add(q.b, q.c); add(q.b, q.b); add(q.b, q.e);
  add(q.e, q.c); add(q.e, q.b); add(q.e, q.e);
}

/** Device-frame VBE and VBC at node voltages v (VEB, VCB for a PNP). */
export function bjtFrame(q: BjtElement, v: Float64Array): [number, number] {
  const p = q.dev.sign;
  return [p * (v[q.b]! - v[q.e]!), p * (v[q.b]! - v[q.c]!)];
}

/** Collector and base currents (plus gmin across every junction) into F, derivatives into G.
 *  The device-frame currents times the sign are the node-frame ones, and the frame voltages
 *  carry the same sign, so the conductances need none. */
export function loadBjt(q: BjtElement, ws: Workspace, gmin: number): void {
  const { v, F, G, absI } = ws;
  const { c, b, e } = q;
  const p = q.dev.sign;
  const vbe = p * (v[b]! - v[e]!), vbc = p * (v[b]! - v[c]!);
  evalBipolar(q.dev, vbe, vbc, ev);
  const go = -ev.dicVbc;
  if (ev.ic > 0 && go > 0 && go < ws.gdsFloor) ws.gdsFloor = go;
  // gmin across b–e, b–c and c–e, in the node frame.
  const vbeN = v[b]! - v[e]!, vbcN = v[b]! - v[c]!, vceN = v[c]! - v[e]!;
  const ic = p * ev.ic + gmin * (vceN - vbcN);
  const ib = p * ev.ib + gmin * (vbeN + vbcN);
  F[c] = F[c]! + ic; F[b] = F[b]! + ib; F[e] = F[e]! - ic - ib;
  const aic = Math.abs(ic), aib = Math.abs(ib);
  absI[c] = absI[c]! + aic; absI[b] = absI[b]! + aib; absI[e] = absI[e]! + aic + aib;
  // ∂/∂vb = ∂/∂VBE + ∂/∂VBC; ∂/∂ve = −∂/∂VBE; ∂/∂vc = −∂/∂VBC (node frame, sign cancelled).
  const cc = -ev.dicVbc + 2 * gmin, cb = ev.dicVbe + ev.dicVbc - gmin, ce = -ev.dicVbe - gmin;
  const bc = -ev.dibVbc - gmin, bb = ev.dibVbe + ev.dibVbc + 2 * gmin, be = -ev.dibVbe - gmin;
  const sl = ws.slots, k = q.slot;
  G[sl[k]!] = G[sl[k]!]! + cc; G[sl[k + 1]!] = G[sl[k + 1]!]! + cb; G[sl[k + 2]!] = G[sl[k + 2]!]! + ce;
  G[sl[k + 3]!] = G[sl[k + 3]!]! + bc; G[sl[k + 4]!] = G[sl[k + 4]!]! + bb; G[sl[k + 5]!] = G[sl[k + 5]!]! + be;
  G[sl[k + 6]!] = G[sl[k + 6]!]! - cc - bc; G[sl[k + 7]!] = G[sl[k + 7]!]! - cb - bb; G[sl[k + 8]!] = G[sl[k + 8]!]! - ce - be;
}

/** Derivatives of the currents leaving each terminal's node through the device (node frame)
 *  with respect to ln IS (out[·][0]) and ln βF (out[·][1]): emitted per terminal. */
export function bjtMismatchCurrents(q: BjtElement, v: Float64Array, emit: (node: number, d1: number, d2: number) => void): void {
  const [vbe, vbc] = bjtFrame(q, v);
  evalBipolar(q.dev, vbe, vbc, ev);
  const p = q.dev.sign;
  // Every term of IC and IB is proportional to IS; only the forward base current to 1/βF.
  emit(q.c, p * ev.ic, 0);
  emit(q.b, p * ev.ib, -p * ev.ibf);
  emit(q.e, -p * (ev.ic + ev.ib), p * ev.ibf);
}

/** Per-device 1σ of ΔIS/IS and Δβ/β: the pair coefficients over √(2·A), A = area·m (design
 *  §10, the area law as MOSFETs carry avt/√(2·W·L)); undefined without ais and abf. */
export function bjtSigmas(q: BjtElement): [number, number] | undefined {
  const { ais, abf } = q.params;
  if (ais === undefined && abf === undefined) return undefined;
  const root = Math.sqrt(2 * (q.size.area ?? 1) * q.size.m);
  if (!(root > 0)) return undefined;
  return [(ais ?? 0) / root, (abf ?? 0) / root];
}

/** Cutoff by the one bipolar off rule (CUTOFF_IS, models/bipolar.ts), else by VCE. */
function regionOf(q: BjtElement, ic: number, vce: number): Region {
  if (ic <= CUTOFF_IS * q.dev.is) return 'cutoff';
  return vce >= q.dev.vcesat ? 'forward-active' : 'saturation';
}

/** V, VCE − vcesat; a device in cutoff never passes as forward-active (at most −1 mV). */
export function bjtMargin(q: BjtElement, v: Float64Array): number {
  const [vbe, vbc] = bjtFrame(q, v);
  evalBipolar(q.dev, vbe, vbc, ev);
  const vce = vbe - vbc;
  const m = vce - q.dev.vcesat;
  return ev.ic <= CUTOFF_IS * q.dev.is ? Math.min(m, -1e-3) : m;
}

/** The device's report at v: voltages as magnitudes in its own polarity (VEB, VEC for a PNP);
 *  small-signal values at constant VCE (gm, rπ) and constant VBE (ro). */
export function bjtReport(q: BjtElement, v: Float64Array): BipolarDeviceReport {
  const [vbe, vbc] = bjtFrame(q, v);
  evalBipolar(q.dev, vbe, vbc, ev);
  const vce = vbe - vbc;
  const gm = ev.dicVbe + ev.dicVbc;
  const gpi = ev.dibVbe + ev.dibVbc;
  const go = -ev.dicVbc;
  return {
    name: q.name, role: q.role, type: q.type, area: q.size.area ?? 1, m: q.size.m,
    ic: ev.ic, ib: ev.ib, vbe, vce, vcesat: q.dev.vcesat, margin: vce - q.dev.vcesat,
    region: regionOf(q, ev.ic, vce),
    gm, rpi: gpi > 0 ? 1 / gpi : 1 / SOLVER.gmin, ro: go > 0 ? 1 / go : 1 / SOLVER.gmin, gds: go,
    beta: ev.ib !== 0 ? ev.ic / ev.ib : 0,
  };
}

/**
 * Its shot noise (design §12): 2q·IC between collector and emitter and 2q·IB between base and
 * emitter, uncorrelated (the two currents cross different junctions; Gray, Hurst, Lewis and
 * Meyer, Analysis and Design of Analog Integrated Circuits, 5th ed., §11.2, from memory). No
 * flicker noise: the contract leaves bipolar flicker optional and the model has no constant for it.
 */
export function bjtNoise(q: BjtElement, v: Float64Array, out: NoiseSources): void {
  const [vbe, vbc] = bjtFrame(q, v);
  evalBipolar(q.dev, vbe, vbc, ev);
  const twoQ = 2 * ELEMENTARY_CHARGE;
  out.add(q.name, q.c, q.e, twoQ * Math.abs(ev.ic), 0);
  out.add(q.name, q.b, q.e, twoQ * Math.abs(ev.ib), 0);
}
