/**
 * Topology templates (design §2) for every kind in both polarities, wired from the kind's
 * connections (src/core/kinds/): node names are the kinds' own (simple `a`; cascode `a` `b` `c`;
 * wide-swing `a` `b` `c` `vbias`; wilson `x` `y`; wilson-balanced `x` `y` `z`), the output is
 * `out`. In a bias bank each output gets its own `<output>.c` and `<output>.out`, its devices are
 * named `<output>.<role>`, and every output other than the measured one is held at its own
 * nominal voltage. The starting guess for Newton is written per kind (`guessNodes`).
 */
import { gateDriveFor } from '../models/evaluate';
import { deviceProblem, prepareDevice } from '../models/device';
import { bipolarProblem, prepareBipolar, vbeFor } from '../models/bipolar';
import { paramsOf } from '../flavours';
import type { BipolarType, DeviceSize, MirrorOutput, Polarity, ResolvedSpec, TemplateMirror } from '../types';
import { assertNever } from '../assert-never';
import { isBipolarType, polaritySign } from '../device-types';
import { KINDS, type Connection } from '../kinds/index';
import { widlarRatio } from '../kinds/widlar';
import { thermalVoltage } from '../models/thermal';
import { CircuitBuilder, type Circuit, type MosDescription } from './circuit';
import type { DeviceElement } from './elements/element';
import { channelCurrent } from './elements/device';
import { resistanceOf, resistorLaw } from './resistance';
import { resistorCurrent } from './elements/resistor';
import { makeWorkspace, type MirrorCircuit } from './mirrorCircuit';
import type { Workspace } from './workspace';
import { shapedCircuit, shapeOf, type Shape } from './shapes';

/** Suffix of a filtered gate line's node (`a~f` is node a seen through the filter). */
const FILTERED = '~f';

export interface PerturbationLike { dvt: Record<string, number>; dbeta: Record<string, number> }

/** Whether the mirror reports bank-style names (it was written with `outputs:`). */
export function isBank(m: TemplateMirror): boolean {
  return m.outputs.length > 1 || (m.outputs[0] !== undefined && m.outputs[0].path.length > m.path.length);
}

/** What a device contributes to a mirror ratio: m·W/L, or area·m for a bipolar device. */
export function sizeWeight(s: DeviceSize): number { return s.area !== undefined ? s.area * s.m : s.m * s.w / s.l; }

/** Ideal ratio of the pair for output j. */
export function idealRatio(m: TemplateMirror, j: number): number | undefined {
  const { ref: a, out: b } = KINDS[m.kind].pair;
  const out = m.outputs[j];
  const sa = m.devices[a] ?? out?.devices[a];
  const sb = out?.devices[b] ?? m.devices[b];
  if (!sa || !sb) return undefined;
  const r = sizeWeight(sb) / sizeWeight(sa);
  return Number.isFinite(r) ? r : undefined;
}

/** The ratio output j is designed to give at input current `iin` and temperature T (K): the
 *  pair's geometric ratio, or for a degenerated pair (the Widlar) the Widlar law's with ideal
 *  devices — its emitter resistor sets the current by design. Undefined where it cannot be said. */
export function designRatio(m: TemplateMirror, j: number, iin: number, temperature: number): number | undefined {
  const n = idealRatio(m, j);
  if (n === undefined || KINDS[m.kind].degeneration === undefined) return n;
  return m.degeneration === undefined ? undefined : widlarRatio(n, iin, m.degeneration, thermalVoltage(temperature));
}

/** How one template mirror is wired into a builder that may hold other mirrors too (a linked
 *  network, src/core/network/): node and device names carry `ns` in front, and a linked input or
 *  output uses the shared node named by the network instead of an input source or a held voltage. */
export interface TemplateWiring {
  /** Prefix of every node and device name of this mirror ('' when it is alone). */
  ns: string;
  /** The measured output (its devices count for compliance and the report); −1: none. */
  outputIndex: number;
  /** V, held voltage of the measured output. */
  vout: number;
  vbias: number | undefined;
  perturb?: PerturbationLike;
  /** The network's node that is this mirror's input node (no input source is added then). */
  inputNode?: string;
  /** The network's free node an output drives (a linked output), else undefined: held at its v. */
  outNode?: (j: number) => string | undefined;
}

/** What wiring a mirror left in the builder, for the guess and the measurements. */
export interface WiredTemplate {
  /** Node names of each output, of each output's cascode node, and of the input. */
  outNodes: string[];
  cNodes: (string | undefined)[];
  inputNode: string;
  /** Local device names (without `ns`) in the order they were added, and their roles' indices
   *  (relative to the first device this mirror added). */
  deviceNames: string[];
  byRole: Record<string, number>;
  /** Each output's own devices, as indices like byRole's (Monte Carlo of a network counts them
   *  per output in one circuit). */
  outputDevices: number[][];
  /** The input resistor, when the input is one. */
  inputResistor?: ReturnType<CircuitBuilder['resistor']>;
}

/** Add mirror `m`'s devices (and its input source unless linked) to `b`; the rails are held
 *  by the caller. */
export function wireTemplate(b: CircuitBuilder, spec: ResolvedSpec, m: TemplateMirror, w: TemplateWiring): WiredTemplate {
  const { vdd, vss } = spec.supplies;
  const sign = polaritySign(m.type);
  const type = m.type;
  const bipolar = isBipolarType(type) ? spec.process[type] : undefined;
  if (isBipolarType(type) && !bipolar) throw new Error(`no ${type} parameters`);
  const proc = { model: spec.process.model, temperature: spec.process.temperature, tnom: spec.process.tnom };
  const bank = isBank(m);
  const kind = KINDS[m.kind];
  const ns = w.ns;
  const R = sign > 0 ? 'vss' : 'vdd';
  const vbiasName = `${ns}vbias`;
  if (kind.vbias) b.hold(vbiasName, w.vbias ?? 0.5 * (vdd + vss));

  const names: string[] = [];
  const byRole: Record<string, number> = {};
  const T = sign > 0 ? 'vdd' : 'vss';
  const add = (name: string, role: string, size: DeviceSize, conn: Connection, map: (n: string) => string, measured: boolean, startup = false): number => {
    const full = `${ns}${name}`;
    const d1 = w.perturb?.dvt[full] ?? 0, d2 = w.perturb?.dbeta[full] ?? 0;
    const d = map(conn.d), g = map(conn.g), s = map(conn.s);
    if (bipolar && isBipolarType(type) && !startup) {
      // Collector, base, emitter on the role's drain, gate and source nodes; a reference's
      // closing mirror is of the other polarity (a PNP mirror on an NPN cell).
      const t: BipolarType = conn.other ? (type === 'npn' ? 'pnp' : 'npn') : type;
      const params = (conn.other ? spec.process[t] : bipolar) ?? bipolar;
      if (conn.other && !spec.process[t]) b.problems.push(`device ${full}: no ${t} parameters`);
      const bsize = { area: size.area ?? 1, m: size.m };
      const problem = bipolarProblem(params, bsize);
      if (problem) b.problems.push(`device ${full}: ${problem}`);
      const dev = prepareBipolar(params, bsize, t, proc.temperature, proc.tnom, d1, d2);
      b.bjt({ name: full, role, type: t, size, params, dev, measured }, d, g, s);
    } else {
      // A reference's closing mirror is of the other polarity, its bulk on the other rail; the
      // start-up device of a bipolar reference is a MOSFET of the mirror's side.
      const own: Polarity = type === 'npn' ? 'nmos' : type === 'pnp' ? 'pmos' : type;
      const t: Polarity = conn.other ? (own === 'nmos' ? 'pmos' : 'nmos') : own;
      // A mirror's device flavour (`device:`) is of its own polarity; the other rail's devices use the process's.
      const params = paramsOf(spec.process, t, isBipolarType(type) ? undefined : m.device);
      const problem = deviceProblem(params, size);
      if (problem) b.problems.push(`device ${full}: ${problem}`);
      const dev = prepareDevice(params, size, t, proc, d1, d2);
      const desc: MosDescription = { name: full, role, type: t, size, params, dev, measured };
      if (startup) desc.startup = true;
      b.mos(desc, d, g, s, size.bulk === 'source' ? s : conn.other ? T : R);
    }
    names.push(name);
    return names.length - 1;
  };

  const input = kind.inputNode;
  const inputNode = w.inputNode ?? `${ns}${input}`;
  const refMap = (n: string): string => (n === 'R' ? R : n === 'T' ? T : n === 'vbias' ? vbiasName : n === input ? b.node(inputNode) : b.node(`${ns}${n}`));
  for (const [role, conn] of Object.entries(kind.reference)) {
    const size = m.devices[role] ?? m.outputs[0]?.devices[role];
    if (!size) { b.problems.push(`no size for role ${role}`); continue; }
    byRole[role] = add(role, role, size, conn, refMap, true);
  }

  // A gate filter: each reference node an output gate sits on reaches those gates through r,
  // with c from the filtered line to the mirror's own rail (no DC current flows in r).
  // Kind-local names of the reference nodes an output gate sits on (their filtered twins are
  // `<node>~f`, mapped like every other node).
  const filtered = new Set<string>();
  const outNodes: string[] = [];
  const cNodes: (string | undefined)[] = [];
  const outputDevices: number[][] = [];
  m.outputs.forEach((o: MirrorOutput, j) => {
    const own: number[] = [];
    outputDevices.push(own);
    const prefix = bank ? `${o.name}.` : '';
    const linked = w.outNode?.(j);
    const outName = linked ?? `${ns}${prefix}out`;
    if (linked !== undefined) b.node(linked);
    else b.hold(outName, j === w.outputIndex ? w.vout : o.output.v);
    outNodes.push(outName);
    cNodes.push(Object.values(kind.output).some((x) => x.d === 'C' || x.s === 'C') ? `${ns}${prefix}c` : undefined);
    const map = (n: string): string =>
      n === 'O' ? outName : n === 'C' ? b.node(`${ns}${prefix}c`) : refMap(n);
    for (const role of kind.outputRoles) {
      const conn = kind.output[role];
      const size = o.devices[role] ?? m.devices[role];
      if (!conn || !size) { b.problems.push(`output ${o.name}: no size for role ${role}`); continue; }
      const g = conn.g;
      const onLine = m.filter !== undefined && g !== 'O' && g !== 'C' && g !== 'R' && g !== 'vbias';
      if (onLine) filtered.add(g);
      const wired = onLine ? { ...conn, g: `${g}${FILTERED}` } : conn;
      const k = add(`${prefix}${role}`, role, size, wired, map, j === w.outputIndex);
      own.push(k);
      if (j === w.outputIndex) byRole[role] = k;
    }
    if (kind.degeneration !== undefined) {
      const r = m.degeneration;
      if (r === undefined) b.problems.push('no degeneration resistor');
      else b.resistor(`${ns}${prefix}degeneration`, map(kind.degeneration), R, r);
    }
  });

  if (m.filter) {
    const lines = [...filtered];
    for (const n of lines) {
      const name = `${ns}${lines.length === 1 ? 'filter' : `filter.${n}`}`;
      b.resistor(name, refMap(n), refMap(`${n}${FILTERED}`), m.filter.r);
      b.capacitor(`${name}.c`, refMap(`${n}${FILTERED}`), R, m.filter.c);
    }
  }
  const loop = kind.loop;
  if (loop) {
    const r = m.resistor ?? NaN;
    for (const [name, ends] of Object.entries(loop.resistors)) b.resistor(`${ns}${name}`, refMap(ends.a), refMap(ends.b), r);
    if (m.startup) add('startup', 'startup', m.startup, loop.startup, refMap, false, true);
  }

  const out: WiredTemplate = { outNodes, cNodes, inputNode, deviceNames: names, byRole, outputDevices };
  if (w.inputNode !== undefined || m.input.kind === 'self') return out;
  if (m.input.kind === 'current' || m.input.kind === 'link') {
    // A linked input measured alone is the current that arrives (network/ solves it).
    const i = m.input.i;
    if (!(i > 0) || !Number.isFinite(i)) b.problems.push(`input current ${i} A is not positive`);
    if (sign > 0) b.current(`${ns}input`, 'vdd', inputNode, i); else b.current(`${ns}input`, inputNode, 'vss', i);
  } else {
    const law = resistorLaw(m.input.r, m.input, spec.process);
    const ohms = resistanceOf(law, spec.process.temperature);
    out.inputResistor = sign > 0 ? b.resistor(`${ns}input`, 'vdd', inputNode, ohms, law) : b.resistor(`${ns}input`, inputNode, 'vss', ohms, law);
  }
  return out;
}

export function buildTemplate(
  spec: ResolvedSpec, m: TemplateMirror, outputIndex: number, vout: number,
  vbias: number | undefined, perturb?: PerturbationLike,
): MirrorCircuit {
  const kind = KINDS[m.kind];
  // A mirror of a shape seen before in this spec takes that circuit, copied (shapes.ts); the
  // second of a shape builds the kept one and takes a copy too, so nothing changes the kept one;
  // the first is built as any other (a spec of all-different mirrors copies nothing).
  const found = perturb ? undefined : shapeOf(spec, m, isBank(m), outputIndex, vbias);
  let shape = found && 'known' in found ? found.known : undefined;
  if (found && 'keep' in found) { shape = builtShape(spec, m, outputIndex, vout, vbias); found.keep(shape); }
  const { c, wired } = shape ? { c: shapedCircuit(shape, m, outputIndex, vout), wired: shape.wired } : builtShape(spec, m, outputIndex, vout, vbias, perturb);
  const mc = templateCircuit(spec, m, c, wired, wired.byRole);
  // Every output is wired and held alike whichever is measured (its own output.v), so another
  // output's circuit differs only in which devices are measured and the output node.
  if (!perturb && m.outputs.length > 1 && wired.outNodes[outputIndex] !== undefined) {
    const fixedV = c.fixedV.slice();
    const refRoles: Record<string, number> = {};
    for (const [role, k] of Object.entries(wired.byRole)) if (!kind.outputRoles.includes(role)) refRoles[role] = k;
    mc.forOutput = (j, ws) => {
      const own = wired.outputDevices[j];
      const node = c.nodeNames.indexOf(wired.outNodes[j] ?? '');
      if (!own || node < 0) return undefined;
      const byRole = { ...refRoles };
      const swap = new Map<DeviceElement, DeviceElement>();
      wired.outputDevices.forEach((devs, o) => {
        for (const k of devs) {
          const d = c.devices[k]!;
          if (o === j) byRole[d.role] = k;
          if (d.measured !== (o === j)) { const x = Object.assign({}, d); x.measured = o === j; swap.set(d, x); }
        }
      });
      const elements = c.elements.map((e) => (e.kind === 'mos' || e.kind === 'bjt' ? swap.get(e) ?? e : e));
      const devices = c.devices.map((d) => swap.get(d) ?? d);
      const variant: Circuit = Object.assign({}, c);
      variant.fixedV = fixedV.slice(); variant.elements = elements; variant.devices = devices; variant.outNode = node;
      return templateCircuit(spec, m, variant, wired, byRole, ws);
    };
  }
  return mc;
}

/** Mirror `m` wired alone into a circuit of its own (its rails held). */
function builtShape(spec: ResolvedSpec, m: TemplateMirror, outputIndex: number, vout: number, vbias: number | undefined, perturb?: PerturbationLike): Shape {
  const { vdd, vss } = spec.supplies;
  const b = new CircuitBuilder();
  b.hold('vdd', vdd);
  b.hold('vss', vss);
  const wired = wireTemplate(b, spec, m, { ns: '', outputIndex, vout, vbias, perturb });
  const measuredOut = wired.outNodes[outputIndex] ?? 'out';
  if (wired.outNodes[outputIndex] === undefined) b.problems.push(`output index ${outputIndex} does not exist`);
  const c = b.build(measuredOut, polaritySign(m.type), vss, vdd);
  return { c, wired, outIdx: wired.outNodes.map((n) => c.nodeNames.indexOf(n)) };
}

/** The mirror circuit of `c`, wired by `wired`, its measured output's devices by role `byRole`:
 *  the workspace, the starting guess, the input current. */
function templateCircuit(spec: ResolvedSpec, m: TemplateMirror, c: Circuit, wired: WiredTemplate, byRole: Record<string, number>, given?: Workspace): MirrorCircuit {
  const { vdd, vss } = spec.supplies;
  const sign = polaritySign(m.type);
  const rail = sign > 0 ? vss : vdd;
  const other = sign > 0 ? vdd : vss;
  const bank = isBank(m);
  const kind = KINDS[m.kind];
  const { outNodes, cNodes } = wired;
  const input = kind.inputNode;
  const res = wired.inputResistor;
  const loopRef = m.input.kind === 'self' ? byRole[kind.pair.ref] : undefined;
  const iin: (v: Float64Array) => number = res ? (v) => resistorCurrent(res, v)
    // A reference: the loop current of the device it is named after (the taps copy it).
    : loopRef !== undefined ? (v) => channelCurrent(c.devices[loopRef]!, v)
      : () => (m.input.kind === 'resistor' || m.input.kind === 'self' ? NaN : m.input.i);
  const ws = given ?? makeWorkspace(c);
  const index = (name: string): number => c.nodeNames.indexOf(name);
  const { ref: pa, out: pb } = kind.pair;

  // Everything the guess needs that does not change between solves, gathered at its first call
  // (a bank's output whose circuit takes its first's solve never guesses).
  const span = Math.abs(other - rail);
  const vbIdx = kind.vbias ? index('vbias') : -1;
  let known: { g: GuessContext; outIdx: number[]; freeNames: string[] } | undefined;
  const context = (): NonNullable<typeof known> => {
    const devByName = new Map(c.devices.map((x) => [x.name, x] as const));
    const outIdx = outNodes.map((n) => index(n));
    const ratios = m.outputs.map((_, j) => idealRatio(m, j) ?? 1);
    const g: GuessContext = { m, devByName, bank, ratios, uOuts: outIdx.map(() => 0), uVb: 0, cNodes, u: {}, span };
    return { g, outIdx, freeNames: c.nodeNames.slice(0, c.nFree) };
  };

  const guess = (): void => {
    const { g, outIdx, freeNames } = (known ??= context());
    // Node voltages in the polarity frame u = sign·(v − rail), then mapped back.
    for (let j = 0; j < outIdx.length; j++) g.uOuts[j] = sign * (c.fixedV[outIdx[j]!]! - rail);
    g.uVb = vbIdx >= 0 ? sign * (c.fixedV[vbIdx]! - rail) : 0;
    const solveFor = (i: number): number => { guessNodes(g, i); return g.u[input] ?? 0; };
    if (m.input.kind === 'self') {
      guessNodes(g, 0);   // a reference finds its own loop current
    } else if (m.input.kind === 'current' || m.input.kind === 'link') {
      solveFor(m.input.i);
    } else {
      // Bisection on the input current: I·R = span − u_in(I).
      const r = m.input.r;
      let lo = 0, hi = span / r;
      for (let k = 0; k < 40; k++) {
        const mid = 0.5 * (lo + hi);
        if (mid * r > span - solveFor(mid)) hi = mid; else lo = mid;
      }
      solveFor(0.5 * (lo + hi));
    }
    for (let k = 0; k < c.nFree; k++) {
      const name = freeNames[k]!;
      // A filtered gate line sits at its reference node (no DC current in the filter).
      const uk = g.u[name.endsWith(FILTERED) ? name.slice(0, -FILTERED.length) : name];
      ws.v[k] = rail + sign * (uk !== undefined && Number.isFinite(uk) ? uk : 0.5 * span);
    }
  };

  const pairRef = byRole[pa], pairOut = byRole[pb];
  return {
    circuit: c, ws, sign, rail, span: vdd - vss, guess,
    iin: () => iin(ws.v),
    pair: pairRef !== undefined && pairOut !== undefined ? { ref: pairRef, out: pairOut } : undefined,
    byRole,
    vbiasNode: kind.vbias ? index('vbias') : undefined,
  };
}

export interface GuessContext {
  m: TemplateMirror;
  devByName: Map<string, DeviceElement>;
  bank: boolean;
  ratios: number[];
  /** Polarity-frame voltages of every output node and of vbias. */
  uOuts: number[];
  uVb: number;
  cNodes: (string | undefined)[];
  /** Result: polarity-frame voltage per node name. */
  u: Record<string, number>;
  /** V, the supply span (the other rail in the polarity frame); references need it. */
  span?: number;
}

/** A, the loop current of a reference with every device saturated, by bisection on the loop's
 *  own equation (body effect and the model included): beta multiplier VGS_ref − VGS_wide(VSB =
 *  I·R) = I·R (PTAT: VBE_ref − VBE_wide = I·R); VGS (VBE) over a resistor VGS_ref = I·R. */
function loopCurrent(g: GuessContext, span: number, r: number): number {
  const dev = (name: string): DeviceElement | undefined => g.devByName.get(name);
  const ref = dev('ref');
  if (!(r > 0) || !ref) return 0;
  const excess = (i: number): number => {
    const vr = i * r;
    if (g.m.kind === 'beta-multiplier' || g.m.kind === 'ptat') {
      const wide = dev('wide');
      return diodeDrive(ref, i, 0) - drive(wide, i, wide?.size.bulk === 'rail' ? vr : 0, span / 2) - vr;
    }
    return diodeDrive(ref, i, 0) - vr;
  };
  let lo = 0, hi = span / r;
  for (let k = 0; k < 50; k++) {
    const mid = 0.5 * (lo + hi);
    if (excess(mid) > 0) lo = mid; else hi = mid;
  }
  return 0.5 * (lo + hi);
}

/** Gate drive for current i with length modulation at the given VDS: (1 + λ·VDS) lowers it;
 *  for a bipolar device its VBE at VCE = vds. */
function drive(x: DeviceElement | undefined, i: number, vsb: number, vds: number): number {
  if (!x) return 0;
  if (x.kind === 'bjt') return vbeFor(x.dev, i, Math.max(vds, 0));
  return gateDriveFor(x.dev, i / (1 + x.dev.lambda * Math.max(vds, 0)), vsb);
}

/** A diode-connected device (VDS = VGS): two fixed-point steps on the length modulation. */
function diodeDrive(x: DeviceElement | undefined, i: number, vsb: number): number {
  let v = drive(x, i, vsb, 0);
  v = drive(x, i, vsb, v);
  return drive(x, i, vsb, v);
}

/** Solve x = uGate − VGS(I, VSB(x)) for a cascode's source node by a few fixed-point steps. */
function sourceBelow(x: DeviceElement | undefined, i: number, uGate: number, uDrain: number, lo: number, hi: number): number {
  if (!x) return lo;
  const bodyToRail = x.kind === 'mos' && x.size.bulk === 'rail';
  let v = uGate - drive(x, i, 0, uDrain - uGate);
  for (let k = 0; k < 4; k++) v = uGate - drive(x, i, bodyToRail ? Math.max(v, 0) : 0, uDrain - v);
  return Math.min(Math.max(v, lo), Math.max(hi, lo));
}

/** Polarity-frame node voltages assuming every device saturated. */
export function guessNodes(g: GuessContext, i: number): void {
  const { m, devByName, ratios, uOuts, uVb, cNodes, u } = g;
  const dev = (name: string): DeviceElement | undefined => devByName.get(name);
  const prefix = (j: number): string => (g.bank ? `${m.outputs[j]!.name}.` : '');
  const vsbOf = (x: DeviceElement | undefined, us: number): number => (x && x.kind === 'mos' && x.size.bulk === 'rail' ? us : 0);
  switch (m.kind) {
    case 'simple':
      u.a = diodeDrive(dev('ref'), i, 0);
      break;
    case 'cascode': {
      u.a = diodeDrive(dev('ref'), i, 0);
      const refc = dev('refc');
      u.b = u.a + diodeDrive(refc, i, vsbOf(refc, u.a));
      for (let j = 0; j < m.outputs.length; j++) {
        const cn = cNodes[j];
        if (cn) u[cn] = sourceBelow(dev(`${prefix(j)}outc`), i * ratios[j]!, u.b, uOuts[j]!, 0, uOuts[j]!);
      }
      break;
    }
    case 'wide-swing': {
      u.b = drive(dev('ref'), i, 0, 0);
      u.a = sourceBelow(dev('refc'), i, uVb, u.b, 0, u.b);
      u.b = drive(dev('ref'), i, 0, u.a);
      for (let j = 0; j < m.outputs.length; j++) {
        const cn = cNodes[j];
        if (cn) u[cn] = sourceBelow(dev(`${prefix(j)}outc`), i * ratios[j]!, uVb, uOuts[j]!, 0, uOuts[j]!);
      }
      break;
    }
    case 'wilson':
    case 'wilson-balanced': {
      let total = 0;
      for (const r of ratios) total += r * i;
      u.y = diodeDrive(dev('diode'), total, 0);
      const out = dev(`${prefix(0)}out`);
      const io = i * (ratios[0] ?? 1);
      u.x = u.y + drive(out, io, vsbOf(out, u.y), (uOuts[0] ?? 0) - u.y);
      if (m.kind === 'wilson-balanced') {
        u.z = sourceBelow(dev('bal'), i, u.x, u.x, 0, u.x);
      }
      break;
    }
    case 'beta-helper': {
      u.b = drive(dev('ref'), i, 0, 0);
      let total = 1;
      for (const r of ratios) total += r;
      const helper = dev('helper');
      const beta = helper && helper.kind === 'bjt' ? helper.dev.bf : 100;
      u.a = u.b + drive(helper, (total * i) / beta, 0, 0);
      u.b = drive(dev('ref'), i, 0, u.a);
      break;
    }
    case 'widlar': {
      u.a = diodeDrive(dev('ref'), i, 0);
      const out = dev('out');
      const r = m.degeneration ?? 0;
      // IOUT·R + VBE_out(IOUT) = VBE_ref: bisection on IOUT (the left side rises with it).
      let lo = 0, hi = i * (ratios[0] ?? 1) * 2;
      for (let k = 0; k < 60; k++) {
        const mid = 0.5 * (lo + hi);
        if (mid * r + drive(out, mid, 0, (uOuts[0] ?? 0) - mid * r) > u.a) hi = mid; else lo = mid;
      }
      u.e = 0.5 * (lo + hi) * r;
      break;
    }
    case 'beta-multiplier':
    case 'vgs-resistor':
    case 'ptat':
    case 'vbe-resistor': {
      // A reference sets its own current: `i` is not used.
      const span = g.span ?? 0;
      const r = m.resistor ?? 0;
      const loop = loopCurrent(g, span, r);
      if (m.kind === 'beta-multiplier' || m.kind === 'ptat') {
        u.x = diodeDrive(dev('ref'), loop, 0);
        u.s = loop * r;
      } else {
        u.a = loop * r;
        const follow = dev('follow');
        u.b = u.a + drive(follow, loop, vsbOf(follow, u.a), span / 2);
      }
      u.y = span - diodeDrive(dev('topd'), loop, 0);
      break;
    }
    default:
      assertNever(m.kind);
  }
}
