/**
 * Wide-swing cascode gate voltage. When the spec leaves `vbias` out, qpoint picks the value
 * that puts `ref` at VDS = VDSsat + limits.margin: Newton on vbias with the slope from the
 * linearized circuit, each step a full solve warm-started from the previous one. The pick depends only on the reference
 * branch, so one value serves every output of a bank; it is cached per (spec, mirror).
 */
import { gateDriveFor } from '../models/evaluate';
import type { ResolvedSpec, TemplateMirror } from '../types';
import { newChannelEval } from '../models/core';
import { evalFrame } from '../models/terminal';
import type { MirrorCircuit } from '../circuit/mirrorCircuit';
import { heldNodeResponse } from '../circuit/smallSignal';
import { buildMirror, nominalVout, solveMirror } from './solve';

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
  if (k === undefined) return NaN;
  const m = mc.circuit.devices[k]!;
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

export function resolveVbias(spec: ResolvedSpec, mirror: TemplateMirror): VbiasChoice {
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
  return { vbias: rail + sign * best.u, picked: true, met: Math.abs(best.g) < 1e-6 };
}

function clamp(x: number, lo: number, hi: number): number { return Math.min(Math.max(x, lo), hi); }
