/**
 * Wide-swing cascode gate voltage. When the spec leaves `vbias` out, qpoint picks the value
 * that puts `ref` at VDS = VDSsat + limits.margin: a secant root-find on vbias, each step a
 * full solve warm-started from the previous one. The pick depends only on the reference
 * branch, so one value serves every output of a bank; it is cached per (spec, mirror).
 */
import { gateDriveFor } from '../models/evaluate';
import type { ResolvedSpec, TemplateMirror } from '../types';
import { newChannelEval } from '../models/core';
import { evalFrame } from '../models/terminal';
import type { MirrorCircuit } from '../circuit/mirrorCircuit';
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
  const m = mc.circuit.mos[k]!;
  const v = mc.ws.v, p = m.dev.sign;
  const vds = p * (v[m.d]! - v[m.s]!);
  evalFrame(m.dev, p * (v[m.g]! - v[m.s]!), vds, p * (v[m.b]! - v[m.s]!), scratch);
  return vds - scratch.vdsat - margin;
}

export function resolveVbias(spec: ResolvedSpec, mirror: TemplateMirror): VbiasChoice {
  if (mirror.vbias !== undefined) return { vbias: mirror.vbias, picked: false, met: true };
  const hit = cache.get(mirror);
  if (hit && hit.spec === spec) return hit.choice;
  const choice = pickVbias(spec, mirror);
  cache.set(mirror, { spec, choice });
  return choice;
}

function pickVbias(spec: ResolvedSpec, mirror: TemplateMirror): VbiasChoice {
  const target = { spec, mirror, outputIndex: 0 };
  const margin = spec.limits.margin;
  const mid = 0.5 * (spec.supplies.vdd + spec.supplies.vss);
  const mc = buildMirror(target, nominalVout(target), mid);
  const node = mc.vbiasNode;
  const kRef = mc.byRole.ref, kRefc = mc.byRole.refc;
  if (node === undefined || kRef === undefined || kRefc === undefined || mc.circuit.problems.length > 0) {
    return { vbias: mid, picked: true, met: false };
  }
  const { sign, rail } = mc;
  const span = Math.abs(mc.span);
  const ref = mc.circuit.mos[kRef]!, refc = mc.circuit.mos[kRefc]!;
  // Start from the hand estimate: u_vbias = VDSsat_ref + margin + VGS_refc(VSB).
  mc.guess();
  const i = Math.abs(mc.iin());
  const vdsat = ref.dev.model === 'ekv'
    ? (() => { const is = 2 * ref.dev.n * ref.dev.beta * ref.dev.ut ** 2; const ic = is > 0 ? i / is : 0; return 2 * ref.dev.ut * Math.sqrt(ic + 0.25) + 3 * ref.dev.ut; })()
    : gateDriveFor(ref.dev, i, 0) - gateDriveFor(ref.dev, 0, 0);
  const uA = vdsat + margin;
  let u0 = uA + gateDriveFor(refc.dev, i, refc.size.bulk === 'rail' ? uA : 0);
  if (!Number.isFinite(u0)) u0 = 0.5 * span;
  u0 = clamp(u0, 0, span);

  const fixed = mc.circuit.fixedV;
  let warm: Float64Array | undefined;
  const evalAt = (u: number): number => {
    fixed[node] = rail + sign * u;
    const r = solveMirror(mc, warm);
    if (!r.converged) return NaN;
    warm = mc.ws.v.slice();
    return refExcess(mc, margin);
  };

  let best = { u: u0, g: evalAt(u0) };
  if (!Number.isFinite(best.g)) return { vbias: rail + sign * u0, picked: true, met: false };
  let prev = best;
  // The ref's VDS follows vbias with slope ≈ 1/(1 + η): take 1 for the first step.
  let u = clamp(u0 - best.g, 0, span);
  for (let k = 0; k < 30; k++) {
    const g = evalAt(u);
    if (!Number.isFinite(g)) break;
    if (Math.abs(g) < Math.abs(best.g)) best = { u, g };
    if (Math.abs(g) < 1e-7) break;
    const slope = (g - prev.g) / (u - prev.u);
    prev = { u, g };
    const next = clamp(Number.isFinite(slope) && slope > 1e-3 ? u - g / slope : u - g, 0, span);
    if (Math.abs(next - u) < 1e-12) break;
    u = next;
  }
  return { vbias: rail + sign * best.u, picked: true, met: Math.abs(best.g) < 1e-6 };
}

function clamp(x: number, lo: number, hi: number): number { return Math.min(Math.max(x, lo), hi); }
