/**
 * Sizing from design targets: every `auto` W of a template mirror is computed so the device
 * runs at the mirror's `design` target (overdrive, gm/ID or inversion coefficient) at its own
 * current, and `l: auto` is the shortest length that meets every output's `require.rout`.
 *
 * Currents a device is sized for:
 * - input-stack roles (ref, refc, in, bal): the input current, from the solve (so a resistor
 *   input is handled like an ideal one);
 * - the output device of the mirror pair (out; diode in a Wilson): require.ratio × iin;
 * - the other output-branch roles (outc; out of a Wilson): the output current of the solve;
 * - without require.ratio, every output-side device that shares its gate with an input-side
 *   device (out with ref, outc with refc, the balanced Wilson's out with bal) copies that
 *   device's W/L per finger instead: one unit cell per matched pair, the multiplier m carries
 *   the ratio, as with unit devices in a layout.
 * Length modulation is included: the model's closed form (DeviceModel.aspectForTarget) takes
 * (1 + λ·VDS) from the solved operating point, iterated to a fixed point, so with require.ratio
 * the computed sizes also cancel the VDS mismatch of the pair.
 * One length for all `l: auto` devices of a mirror (matching): found by search on the full
 * measurement (Rout ∝ L for a simple mirror, ∝ L² for cascodes at constant overdrive).
 * Results snap to process.grid (W to nearest, L up), else to 4 significant digits; W below
 * wmin is raised to wmin (lengthening L at the same W/L when L is auto too).
 */
import { isBipolarReport, isBipolarType } from '../device-types';
import type {
  DesignTarget, DeviceParams, DeviceSize, ResolvedSpec, SpecPath, TemplateMirror,
} from '../types';
import { measureMirror, solveAt, type MirrorContext } from '../analysis/index';
import { isBank } from '../circuit/templates';
import { KINDS } from '../kinds/index';
import { lambdaAt } from '../models/thermal';
import { MODELS, modelKindOf } from '../models/registry';
import { sizingContextOf } from '../models/device';
import { paramsOf } from '../flavours';
import type { DeviceModel, SizingContext } from '../models/model';
import { quantizeSize } from '../sizing/quantize';
import { formatSI } from '../text/format';
import { indexOf, mirrorAt, withMirrorAt } from '../mirror-at';

export interface SizedDevice {
  /** Index into spec.mirrors. */
  mirror: number;
  /** The device's own path: [...mirror path or output path, 'devices', role]. */
  path: SpecPath;
  role: string;
  /** Computed width / length (m), present for the dimensions that were `auto`. */
  w?: number;
  l?: number;
  /** Output index for a device of a bank output; absent for a reference device. */
  output?: number;
  /** DeviceReport.name of the device. */
  device?: string;
  target?: DesignTarget;
  /** A, the current the width was computed for. */
  id?: number;
  /** Why the target is not met exactly (wmin clamp, unreachable target or Rout). */
  note?: string;
}

const MAX_ROUNDS = 12;
const W_TOL = 1e-6;
const L_MAX = 1e-3;

interface Slot {
  role: string;
  output?: number;
  path: SpecPath;
  size: DeviceSize;
  /** A, the current this device is sized for. */
  planned: number;
  /** 1 + λ·VDS at the last solve. */
  clm: number;
  note?: string;
}

/** Fill every auto w/l from TemplateMirror.design (vov, gmid or ic) at the mirror's own
 *  currents (the relations of process.model's device model), snapped to process.grid;
 *  `l: auto` from require.rout. Returns the sized spec and what it computed. */
export function applyDesignTargets(spec: ResolvedSpec, only?: number): { spec: ResolvedSpec; sized: SizedDevice[] } {
  let current = spec;
  const sized: SizedDevice[] = [];
  for (const at of spec.mirrors) {
    const i = indexOf(at);
    if (only !== undefined && i !== only) continue;
    const m = mirrorAt(current, i);
    if (!m || m.kind === 'netlist' || m.design === undefined || !hasAuto(m)) continue;
    const r = sizeMirror(current, i, m, m.design);
    current = r.spec;
    sized.push(...r.sized);
  }
  return { spec: current, sized };
}

function hasAuto(m: TemplateMirror): boolean {
  const any = (d: Record<string, DeviceSize>): boolean => Object.values(d).some((s) => s.auto?.w === true || s.auto?.l === true);
  return any(m.devices) || m.outputs.some((o) => any(o.devices));
}

function sizeMirror(spec: ResolvedSpec, index: number, mirror: TemplateMirror, target: DesignTarget):
  { spec: ResolvedSpec; sized: SizedDevice[] } {
  const slots = collectSlots(mirror);
  // Design targets are read for MOSFET mirrors only (the spec reader refuses them on bipolar ones).
  if (isBipolarType(mirror.type)) throw new Error(`design targets size MOSFET mirrors; ${mirror.name} is ${mirror.type}`);
  const params = paramsOf(spec.process, mirror.type, mirror.device);
  const autoL = slots.filter((s) => s.size.auto?.l === true);
  const routOutputs = mirror.outputs
    .map((o, j) => ({ j, rout: o.require.rout ?? 0 }))
    .filter((o) => o.rout > 0);
  const lmin = params.lmin ?? 0;
  for (const s of autoL) s.size.l = Math.max(s.size.l, lmin);

  let trial: Trial;
  let lNote: string | undefined;
  if (autoL.length > 0 && routOutputs.length > 0) {
    const found = searchLength(spec, index, mirror, slots, target, routOutputs, params, spec.process.grid);
    trial = found.trial;
    lNote = found.note;
  } else {
    trial = { g: NaN, spec: sizeWidths(spec, index, mirror, slots, target), slots };
  }
  const bank = isBank(mirror);
  offTargetNotes(trial.spec, index, mirror, trial.slots, target, bank);
  const sized: SizedDevice[] = trial.slots
    .filter((s) => s.size.auto?.w === true || s.size.auto?.l === true)
    .map((s) => {
      const note = [s.note, s.size.auto?.l ? lNote : undefined].filter((x) => x !== undefined).join('; ');
      return {
        mirror: index, path: s.path, role: s.role,
        ...(s.size.auto?.w ? { w: s.size.w } : {}),
        ...(s.size.auto?.l ? { l: s.size.l } : {}),
        ...(s.output !== undefined ? { output: s.output } : {}),
        device: deviceName(mirror, bank, s),
        target, id: s.planned,
        ...(note ? { note } : {}),
      };
    });
  return { spec: trial.spec, sized };
}

/** A sizing trial: how well it meets Rout (min over outputs of rout/require), its spec, the
 *  slot states that produced it, and whether every output solved. */
interface Trial { g: number; spec: ResolvedSpec; slots: Slot[]; solved?: boolean }

/** DeviceReport.name of a slot's device (engine naming: role, or `<output>.<role>` in a bank). */
function deviceName(m: TemplateMirror, bank: boolean, s: { role: string; output?: number }): string {
  return s.output !== undefined && bank ? `${m.outputs[s.output]!.name}.${s.role}` : s.role;
}

function collectSlots(m: TemplateMirror): Slot[] {
  const slots: Slot[] = [];
  for (const [role, size] of Object.entries(m.devices)) {
    slots.push({ role, path: [...m.path, 'devices', role], size: { ...size }, planned: 0, clm: 1 });
  }
  m.outputs.forEach((o, j) => {
    for (const [role, size] of Object.entries(o.devices)) {
      slots.push({ role, output: j, path: [...o.path, 'devices', role], size: { ...size }, planned: 0, clm: 1 });
    }
  });
  return slots;
}

function copySlots(slots: Slot[]): Slot[] {
  return slots.map((s) => ({ ...s, size: { ...s.size, ...(s.size.auto ? { auto: { ...s.size.auto } } : {}) } }));
}

/** The spec with the mirror's sizes taken from the slots. */
function withSlots(spec: ResolvedSpec, index: number, m: TemplateMirror, slots: Slot[]): ResolvedSpec {
  const devices: Record<string, DeviceSize> = {};
  const outputs = m.outputs.map((o) => ({ ...o, devices: {} as Record<string, DeviceSize> }));
  for (const s of slots) {
    if (s.output === undefined) devices[s.role] = { ...s.size };
    else outputs[s.output]!.devices[s.role] = { ...s.size };
  }
  return withMirrorAt(spec, index, { ...m, devices, outputs });
}

function pairRatio(m: TemplateMirror, outputIndex: number, slots: Slot[]): number {
  const required = m.outputs[outputIndex]?.require.ratio;
  if (required !== undefined && required > 0) return required;
  const pair = KINDS[m.kind].pair;
  const find = (role: string): Slot | undefined =>
    slots.find((s) => s.role === role && (s.output === undefined || s.output === outputIndex));
  const ref = find(pair.ref), out = find(pair.out);
  if (!ref || !out) return 1;
  const auto = (s: Slot): boolean => s.size.auto?.w === true || s.size.auto?.l === true;
  if (auto(ref) || auto(out)) return out.size.m / ref.size.m;
  return (out.size.m * out.size.w / out.size.l) / (ref.size.m * ref.size.w / ref.size.l);
}

/** Widths of every auto-W slot at the slots' current lengths, iterated with the solve until
 *  currents and length-modulation factors settle. Mutates the slots; returns the sized spec. */
function sizeWidths(spec: ResolvedSpec, index: number, m: TemplateMirror, slots: Slot[], target: DesignTarget): ResolvedSpec {
  const proc = spec.process;
  if (isBipolarType(m.type)) throw new Error(`design targets size MOSFET mirrors; ${m.name} is ${m.type}`);
  const params = paramsOf(proc, m.type, m.device);
  const model = MODELS[modelKindOf(params, proc.model)];
  // A table device reads its target off its own table at its length, so the context is per slot.
  const ctxAt = (l: number): SizingContext => sizingContextOf(params, proc, l);
  const inputBranch = KINDS[m.kind].inputStack;
  const pairOut = KINDS[m.kind].pair.out;
  const bank = isBank(m);

  // Lengths first, so every width is computed for the length that will be written.
  for (const s of slots) if (s.size.auto?.l === true) s.size.l = quantizeSize(s.size.l, proc.grid, 'up');
  // First pass: ideal currents (the solve with provisional sizes gives iin for a resistor input).
  let iin = m.input.kind === 'current' ? m.input.i : solveAt(ctxOf(spec, index, 0), m.outputs[0].output.v).iin;
  const ratios = m.outputs.map((_, j) => pairRatio(m, j, slots));
  for (const s of slots) {
    const j = s.output ?? 0;
    s.planned = inputBranch.includes(s.role) ? iin : ratios[j] * iin;
    s.clm = 1;
  }
  // Without require.ratio every output-branch device copies the W/L per finger of the input-side
  // device whose gate it shares (one unit cell per matched pair, the multiplier m carries the
  // ratio, as with unit devices in a layout): ref for out, refc for outc, bal for the balanced
  // Wilson's out, in for the Wilson's diode. The input side meets the target at the input
  // current; its copies differ from the target only by their own current's error.
  const unitOf = unitCells(m.kind);
  const copiesRef = (s: Slot): Slot | undefined => {
    const source = unitOf.get(s.role);
    if (source === undefined || (m.outputs[s.output ?? 0]?.require.ratio ?? 0) > 0) return undefined;
    return slots.find((x) => x.role === source && (x.output === undefined || x.output === s.output));
  };
  // Copies last, so a copy sees this round's input-side width.
  const order = [...slots.filter((s) => !unitOf.has(s.role)), ...slots.filter((s) => unitOf.has(s.role))];
  let sized = spec;
  for (let round = 0; round < MAX_ROUNDS; round++) {
    let change = 0;
    for (const s of order) {
      if (s.size.auto?.w !== true) continue;
      const ref = copiesRef(s);
      if (ref) {
        const w = ref.size.w * (s.size.l / ref.size.l);
        change = Math.max(change, Math.abs(w - s.size.w) / w);
        s.size.w = w;
        s.note = ref.note;
        continue;
      }
      const ctxT = ctxAt(s.size.l);
      const aspect = model.aspectForTarget(ctxT, s.planned, target, s.clm);
      if (aspect === undefined) {
        s.note = unreachableNote(model, ctxT, target);
        continue;
      }
      let w = (aspect * s.size.l) / s.size.m;
      s.note = undefined;
      const wmin = params.wmin;
      if (wmin !== undefined && w < wmin) {
        if (s.size.auto?.l === true) {
          s.size.l = quantizeSize(s.size.l * (wmin / w), proc.grid, 'up');
          s.note = `L lengthened to keep W/L at the target with W at wmin`;
        } else {
          s.note = `W raised to wmin ${formatSI(wmin, 'm')}: the target needs ${formatSI(w, 'm')}`;
        }
        w = wmin;
      }
      change = Math.max(change, Math.abs(w - s.size.w) / w);
      s.size.w = w;
    }
    sized = withSlots(spec, index, m, slots);
    if (round > 0 && change < W_TOL) break;
    // Re-solve: actual currents and (1 + λ·VDS) for the next round.
    const ops = m.outputs.map((o, j) => solveAt(ctxOf(sized, index, j), o.output.v));
    if (!ops.every((op) => op.converged)) break;
    iin = ops[0].iin;
    for (const s of slots) {
      const j = s.output ?? 0;
      const name = deviceName(m, bank, s);
      const d = ops[j]!.devices.find((x) => x.name === name);
      if (!d || isBipolarReport(d)) continue;
      s.clm = 1 + lambdaAt(params, s.size.l) * d.vds;
      s.planned = inputBranch.includes(s.role) ? iin : s.role === pairOut && !copiesRef(s) ? ratios[j] * iin : d.id;
    }
  }
  for (const s of slots) {
    if (s.size.auto?.w === true) s.size.w = quantizeSize(s.size.w, proc.grid, 'nearest');
  }
  return withSlots(spec, index, m, slots);
}

/** Output-side role → the input-side role whose unit cell it copies: the pair's output device
 *  copies the pair's reference, and any other device copies the input-stack device whose gate
 *  node it shares (the matched pairs of the kind's template). */
function unitCells(kind: TemplateMirror['kind']): Map<string, string> {
  const spec = KINDS[kind];
  const cells = new Map<string, string>([[spec.pair.out, spec.pair.ref]]);
  for (const [role, c] of Object.entries(spec.output)) {
    if (cells.has(role)) continue;
    const twin = spec.inputStack.find((r) => spec.reference[r]?.g === c.g);
    if (twin !== undefined) cells.set(role, twin);
  }
  return cells;
}

/**
 * A sized device that ends out of saturation at its output's nominal voltage has not met the
 * target (its gm/ID and VDSsat are those of triode): say so, so design-unreachable reports it.
 */
function offTargetNotes(spec: ResolvedSpec, index: number, m: TemplateMirror, slots: Slot[], target: DesignTarget, bank: boolean): void {
  const ops = m.outputs.map((o, j) => solveAt(ctxOf(spec, index, j), o.output.v));
  for (const s of slots) {
    if (s.size.auto?.w !== true && s.size.auto?.l !== true) continue;
    const op = ops[s.output ?? 0];
    const d = op?.converged ? op.devices.find((x) => x.name === deviceName(m, bank, s)) : undefined;
    if (!d || isBipolarReport(d) || (d.region === 'saturation' && d.margin >= 0)) continue;
    const got = target.kind === 'gmid' ? `gm/ID ${d.gmId.toFixed(1)} /V against the target ${target.value} /V`
      : target.kind === 'ic' ? `IC ${d.ic.toPrecision(3)} against the target ${target.value}` : `VOV ${formatSI(d.vov, 'V')} against the target ${formatSI(target.value, 'V')}`;
    const note = `ends in ${d.region} at Vout = ${formatSI(m.outputs[s.output ?? 0]!.output.v, 'V')} (${got}): no width gives it the VDS it needs`;
    s.note = s.note ? `${s.note}; ${note}` : note;
  }
}

function ctxOf(spec: ResolvedSpec, index: number, outputIndex: number): MirrorContext {
  const mirror = mirrorAt(spec, index);
  if (!mirror) throw new Error(`no mirror at index ${index}`);  // sizeMirror is only called for one that exists
  return { spec, mirror, outputIndex };
}

function unreachableNote(model: DeviceModel, ctx: SizingContext, target: DesignTarget): string {
  const limit = model.targetLimit(ctx, target) ?? `design target ${target.kind} = ${target.value} cannot be reached`;
  return `${limit} (width left as given)`;
}

/** The shortest common L of the auto-L slots that meets every output's require.rout. */
function searchLength(
  spec: ResolvedSpec, index: number, m: TemplateMirror, start: Slot[], target: DesignTarget,
  routOutputs: { j: number; rout: number }[], params: DeviceParams, grid: number | undefined,
): { trial: Trial; note?: string } {
  const lo = Math.max(params.lmin ?? 0, grid ?? 0, 1e-9);
  const evaluate = (l: number): Trial => {
    const slots = copySlots(start);
    for (const s of slots) if (s.size.auto?.l === true) s.size.l = l;
    const sized = sizeWidths(spec, index, m, slots, target);
    let g = Infinity;
    let solved = true;
    for (const { j, rout } of routOutputs) {
      const r = measureMirror(ctxOf(sized, index, j));
      solved &&= r.converged;
      g = Math.min(g, r.converged && Number.isFinite(r.rout) ? r.rout / rout : 0);
    }
    return { g, spec: sized, slots, solved };
  };
  const l0 = Math.max(start.find((s) => s.size.auto?.l === true)!.size.l, lo);
  const first = evaluate(l0);
  // No working point to measure: searching lengths would only repeat failing solves.
  if (!first.solved) return { trial: first, note: 'L kept as given: the mirror has no solved operating point to measure Rout on' };
  if (params.lref === undefined) {
    const l = first.slots.find((s) => s.size.auto?.l)!.size.l;
    return first.g >= 1 ? { trial: first } : { trial: first, note: `L kept at ${formatSI(l, 'm')}: without process lref, λ does not fall with L, so length cannot raise Rout` };
  }
  // Bracket in log L: [a, b] with g(a) < 1 ≤ g(b).
  let b = l0;
  let tb = first;
  let a = b;
  if (tb.g >= 1) {
    while (a > lo) {
      a = Math.max(lo, a / 2);
      const ta = evaluate(a);
      if (ta.g < 1) break;
      b = a; tb = ta;
    }
    if (b <= lo) return { trial: tb };
  } else {
    while (tb.g < 1) {
      if (b >= L_MAX) return { trial: tb, note: `require.rout not reached even at L = ${formatSI(L_MAX, 'm')}` };
      a = b;
      b = Math.min(L_MAX, b * 2);
      tb = evaluate(b);
    }
  }
  for (let k = 0; k < 40 && b / a > 1.0005 && !(grid !== undefined && b - a < grid / 2); k++) {
    const mid = Math.sqrt(a * b);
    const t = evaluate(mid);
    if (t.g >= 1) { b = mid; tb = t; } else a = mid;
  }
  // Lengths snap up inside sizeWidths: the grid step below may still meet Rout, and a hair
  // short after snapping steps up.
  const step = grid ?? b * 1e-3;
  if (b - step >= lo) {
    const t = evaluate(b - step);
    if (t.g >= 1) return { trial: t };
  }
  for (let k = 0; k < 20 && tb.g < 1; k++) { b += step; tb = evaluate(b); }
  return { trial: tb };
}
