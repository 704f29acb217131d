/**
 * Wide-swing cascode gate voltage. When the spec leaves `vbias` out, qpoint picks the value
 * that puts `ref` at VDS = VDSsat + limits.margin: Newton on vbias with the slope from the
 * linearized circuit, each step a full solve warm-started from the previous one. An `out` device
 * sees a slightly different VDS (its cascode sits at its own Vout, so length modulation moves
 * VGS_outc): when one falls short of the margin there, the pick aims at the worst of them instead,
 * as long as no cascode device loses margin it had. One value serves every output of a bank
 * (every output is in the circuit, at its nominal voltage); it is cached per (spec, mirror).
 */
import { gateDriveFor } from '../models/evaluate';
import type { ResolvedSpec, TemplateMirror } from '../types';
import { newChannelEval } from '../models/core';
import { evalFrame } from '../models/terminal';
import type { MirrorCircuit } from '../circuit/mirrorCircuit';
import { heldNodeResponse } from '../circuit/smallSignal';
import { takesVbias } from '../kinds/index';
import { buildMirror, nominalVout, solveMirror, type MirrorTarget } from './solve';

export interface VbiasChoice {
  /** V, absolute. */
  vbias: number;
  picked: boolean;
  /** Whether the margin target was met (within 1 µV). */
  met: boolean;
}

const cache = new WeakMap<TemplateMirror, { spec: ResolvedSpec; choice: VbiasChoice }>();
const scratch = newChannelEval();

/** V, VDS − VDSsat − margin of `ref` at the present solution. */
function refExcess(mc: MirrorCircuit, margin: number): number {
  const k = mc.byRole.ref;
  return k === undefined ? NaN : excess(mc, k, margin);
}

/** V, VDS − VDSsat − margin of device k at the present solution. */
function excess(mc: MirrorCircuit, k: number, margin: number): number {
  const m = mc.circuit.devices[k]!;
  if (m.kind !== 'mos') return NaN;   // vbias is a MOSFET kind's
  const v = mc.ws.v, p = m.dev.sign;
  const vds = p * (v[m.d]! - v[m.s]!);
  evalFrame(m.dev, p * (v[m.g]! - v[m.s]!), vds, p * (v[m.b]! - v[m.s]!), scratch);
  return vds - scratch.vdsat - margin;
}

/** The explicit vbias, or a pick cached for this (spec, mirror); undefined when a pick is due. */
export function knownVbias(spec: ResolvedSpec, mirror: TemplateMirror): VbiasChoice | undefined {
  if (mirror.vbias !== undefined) return { vbias: mirror.vbias, picked: false, met: true };
  const hit = cache.get(mirror);
  return hit && hit.spec === spec ? hit.choice : undefined;
}

function resolveVbias(spec: ResolvedSpec, mirror: TemplateMirror): VbiasChoice {
  const known = knownVbias(spec, mirror);
  if (known) return known;
  const target = { spec, mirror, outputIndex: 0 };
  const mc = buildMirror(target, nominalVout(target), 0.5 * (spec.supplies.vdd + spec.supplies.vss));
  return pickVbiasOn(spec, mirror, mc);
}

/** Pick vbias on a built circuit of any output of the mirror (the pick depends on the
 *  reference branch only) and cache it. Leaves mc held at the pick and solved there when the
 *  pick converged, so the caller's nominal solve can start from ws.v. */
export function pickVbiasOn(spec: ResolvedSpec, mirror: TemplateMirror, mc: MirrorCircuit): VbiasChoice {
  const choice = pick(spec, mc);
  cache.set(mirror, { spec, choice });
  return choice;
}

function pick(spec: ResolvedSpec, mc: MirrorCircuit): VbiasChoice {
  const margin = spec.limits.margin;
  const mid = 0.5 * (spec.supplies.vdd + spec.supplies.vss);
  const node = mc.vbiasNode;
  const kRef = mc.byRole.ref, kRefc = mc.byRole.refc;
  if (node === undefined || kRef === undefined || kRefc === undefined || mc.circuit.problems.length > 0) {
    return { vbias: mid, picked: true, met: false };
  }
  const { sign, rail } = mc;
  const span = Math.abs(mc.span);
  const ref = mc.circuit.devices[kRef]!, refc = mc.circuit.devices[kRefc]!;
  if (ref.kind !== 'mos' || refc.kind !== 'mos') return { vbias: mid, picked: true, met: false };
  // Start from the hand estimate: u_vbias = VDSsat_ref + margin + VGS_refc(VSB).
  mc.guess();
  const i = Math.abs(mc.iin());
  const refModel = ref.dev.model;
  const uA = refModel.saturationVoltage(ref.dev, i) + margin;
  let u0 = uA + gateDriveFor(refc.dev, i, refc.size.bulk === 'rail' ? uA : 0);
  if (!Number.isFinite(u0)) u0 = 0.5 * span;
  u0 = clamp(u0, 0, span);

  const fixed = mc.circuit.fixedV;
  const a = ref.d, b = ref.g;
  let warm: Float64Array | undefined;
  let bestX: Float64Array | undefined;
  /** g(u) and its slope dg/du from the linearized circuit: d(VDS_ref)/du − d(VDSsat_ref)/du,
   *  where VDSsat follows the gate as the model says (saturationShift). */
  const evalAt = (u: number): { g: number; slope: number } => {
    fixed[node] = rail + sign * u;
    const r = solveMirror(mc, warm, { polish: false });
    if (!r.converged) return { g: NaN, slope: NaN };
    warm = mc.ws.v.slice();
    const dx = heldNodeResponse(mc.ws, node);
    const dA = dx && a < mc.circuit.nFree ? dx[a]! : NaN;
    const dB = dx && b < mc.circuit.nFree ? dx[b]! : NaN;
    return { g: refExcess(mc, margin), slope: dA - refModel.saturationShift(ref.dev, dB) };
  };

  let u = u0;
  let e = evalAt(u);
  let best = { u, g: e.g };
  bestX = warm;
  if (!Number.isFinite(best.g)) return { vbias: rail + sign * u0, picked: true, met: false };
  let prev: { u: number; g: number } | undefined;
  for (let k = 0; k < 30; k++) {
    if (Math.abs(e.g) < 1e-7) break;
    // Newton with the linearized slope; the secant when the slope is unusable.
    let slope = e.slope;
    if (!(slope > 1e-3) && prev) slope = (e.g - prev.g) / (u - prev.u);
    if (!(slope > 1e-3)) slope = 1;
    const next = clamp(u - e.g / slope, 0, span);
    if (Math.abs(next - u) < 1e-12) break;
    prev = { u, g: e.g };
    u = next;
    e = evalAt(u);
    if (!Number.isFinite(e.g)) break;
    if (Math.abs(e.g) < Math.abs(best.g)) { best = { u, g: e.g }; bestX = warm; }
  }
  fixed[node] = rail + sign * best.u;
  if (bestX) mc.ws.v.set(bestX);
  const met = Math.abs(best.g) < 1e-6;
  if (met) {
    const raised = raiseForOutputs(mc, node, best.u, margin, span);
    if (raised !== undefined) return { vbias: rail + sign * raised, picked: true, met };
  }
  return { vbias: rail + sign * best.u, picked: true, met };
}

/**
 * With vbias at u (ref at the margin, mc solved there): when an `out` device is short of the
 * margin, the u (above) that puts the worst `out` at it — secant steps on full solves — if every
 * `ref`/`out` then has the margin and no `refc`/`outc` falls below min(margin, what it had).
 * Undefined when nothing is short or no such u exists (mc is left solved at u then).
 */
function raiseForOutputs(mc: MirrorCircuit, node: number, u0: number, margin: number, span: number): number | undefined {
  const mos = mc.circuit.devices;
  const outs = mos.flatMap((m, k) => (m.role === 'out' ? [k] : []));
  const bottom = mos.flatMap((m, k) => (m.role === 'out' || m.role === 'ref' ? [k] : []));
  const cascodes = mos.flatMap((m, k) => (m.role === 'outc' || m.role === 'refc' ? [k] : []));
  const worstOut = () => Math.min(...outs.map((k) => excess(mc, k, margin)));
  const g0 = worstOut();
  if (!(g0 < -1e-7)) return undefined;
  const x0 = mc.ws.v.slice();
  const floor = cascodes.map((k) => Math.min(0, excess(mc, k, margin)));
  const fixed = mc.circuit.fixedV;
  const at = (u: number): number => {
    fixed[node] = mc.rail + mc.sign * u;
    return solveMirror(mc, mc.ws.v.slice()).converged ? worstOut() : NaN;
  };
  // VDS of `out` follows vbias about one to one (strong inversion): start there, then secant.
  let u = u0, g = g0, ok = false;
  let next = Math.min(u0 - g0, span);
  for (let i = 0; i < 20; i++) {
    const gn = at(next);
    if (!Number.isFinite(gn)) break;
    if (Math.abs(gn) < 1e-7) { u = next; ok = true; break; }
    const slope = (gn - g) / (next - u);
    u = next; g = gn;
    if (!(slope > 1e-3)) break;
    next = Math.min(Math.max(u - g / slope, 0), span);
  }
  const fine = ok && bottom.every((k) => excess(mc, k, margin) >= -1e-6) &&
    cascodes.every((k, i) => excess(mc, k, margin) >= floor[i]! - 1e-6);
  if (fine) return u;
  fixed[node] = mc.rail + mc.sign * u0;
  mc.ws.v.set(x0);
  return undefined;
}

function clamp(x: number, lo: number, hi: number): number { return Math.min(Math.max(x, lo), hi); }

/** The vbias of a target's mirror (its own, or the one picked for it), if it takes one. */
export function vbiasFor(t: MirrorTarget): VbiasChoice | undefined {
  return takesVbias(t.mirror) ? resolveVbias(t.spec, t.mirror) : undefined;
}
