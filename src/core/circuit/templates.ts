/**
 * Topology templates (design §2) for every kind in both polarities. Node names follow the
 * design's table: simple `a`; cascode `a` `b` `c`; wide-swing `a` `b` `c` `vbias`; wilson `x`
 * `y`; wilson-balanced `x` `y` `z`; the output `out`. In a bias bank each output gets its own
 * `<output>.c` and `<output>.out`, its devices are named `<output>.<role>`, and every output
 * other than the measured one is held at its own nominal voltage.
 */
import { gateDriveFor } from '../models/evaluate';
import { deviceProblem, prepareDevice, type ModelDevice } from '../models/device';
import type { DeviceSize, MirrorOutput, ResolvedSpec, TemplateKind, TemplateMirror } from '../types';
import { OUTPUT_ROLES } from '../types';
import { CircuitBuilder } from './circuit';
import { makeWorkspace, type MirrorCircuit } from './mirrorCircuit';

export interface PerturbationLike { dvt: Record<string, number>; dbeta: Record<string, number> }

interface Conn { d: string; g: string; s: string }

/** Reference-side connections per kind; R is the mirror's own rail. */
const REFERENCE: Record<TemplateKind, Record<string, Conn>> = {
  simple: { ref: { d: 'a', g: 'a', s: 'R' } },
  cascode: { ref: { d: 'a', g: 'a', s: 'R' }, refc: { d: 'b', g: 'b', s: 'a' } },
  'wide-swing': { refc: { d: 'b', g: 'vbias', s: 'a' }, ref: { d: 'a', g: 'b', s: 'R' } },
  wilson: { in: { d: 'x', g: 'y', s: 'R' }, diode: { d: 'y', g: 'y', s: 'R' } },
  'wilson-balanced': { in: { d: 'z', g: 'y', s: 'R' }, diode: { d: 'y', g: 'y', s: 'R' }, bal: { d: 'x', g: 'x', s: 'z' } },
};

/** Output-side connections; O is the output node, C the output's internal cascode node. */
const OUTPUT: Record<TemplateKind, Record<string, Conn>> = {
  simple: { out: { d: 'O', g: 'a', s: 'R' } },
  cascode: { out: { d: 'C', g: 'a', s: 'R' }, outc: { d: 'O', g: 'b', s: 'C' } },
  'wide-swing': { out: { d: 'C', g: 'b', s: 'R' }, outc: { d: 'O', g: 'vbias', s: 'C' } },
  wilson: { out: { d: 'O', g: 'x', s: 'y' } },
  'wilson-balanced': { out: { d: 'O', g: 'x', s: 'y' } },
};

const INPUT_NODE: Record<TemplateKind, string> = {
  simple: 'a', cascode: 'b', 'wide-swing': 'b', wilson: 'x', 'wilson-balanced': 'x',
};

/** The pair whose m·W/L ratio is the ideal mirror ratio: [reference, output]. */
const PAIR: Record<TemplateKind, [string, string]> = {
  simple: ['ref', 'out'], cascode: ['ref', 'out'], 'wide-swing': ['ref', 'out'],
  wilson: ['in', 'diode'], 'wilson-balanced': ['in', 'diode'],
};

/** Whether the mirror reports bank-style names (it was written with `outputs:`). */
export function isBank(m: TemplateMirror): boolean {
  return m.outputs.length > 1 || (m.outputs[0] !== undefined && m.outputs[0].path.length > m.path.length);
}

function area(s: DeviceSize): number { return s.m * s.w / s.l; }

/** Ideal ratio of the pair for output j. */
export function idealRatio(m: TemplateMirror, j: number): number | undefined {
  const [a, b] = PAIR[m.kind];
  const out = m.outputs[j];
  const sa = m.devices[a] ?? out?.devices[a];
  const sb = out?.devices[b] ?? m.devices[b];
  if (!sa || !sb) return undefined;
  const r = area(sb) / area(sa);
  return Number.isFinite(r) ? r : undefined;
}

export function buildTemplate(
  spec: ResolvedSpec, m: TemplateMirror, outputIndex: number, vout: number,
  vbias: number | undefined, perturb?: PerturbationLike,
): MirrorCircuit {
  const { vdd, vss } = spec.supplies;
  const sign: 1 | -1 = m.type === 'pmos' ? -1 : 1;
  const rail = sign > 0 ? vss : vdd;
  const other = sign > 0 ? vdd : vss;
  const params = m.type === 'pmos' ? spec.process.pmos : spec.process.nmos;
  const proc = { model: spec.process.model, temperature: spec.process.temperature, tnom: spec.process.tnom };
  const bank = isBank(m);
  const b = new CircuitBuilder();
  b.hold('vdd', vdd);
  b.hold('vss', vss);
  const R = sign > 0 ? 'vss' : 'vdd';
  if (m.kind === 'wide-swing') b.hold('vbias', vbias ?? 0.5 * (vdd + vss));

  const devs: ModelDevice[] = [];
  const byRole: Record<string, number> = {};
  const add = (name: string, role: string, size: DeviceSize, conn: Conn, map: (n: string) => string, measured: boolean): number => {
    const problem = deviceProblem(params, size);
    if (problem) b.problems.push(`device ${name}: ${problem}`);
    const dev = prepareDevice(params, size, m.type, proc, perturb?.dvt[name] ?? 0, perturb?.dbeta[name] ?? 0);
    const d = map(conn.d), g = map(conn.g), s = map(conn.s);
    b.mos({ name, role, type: m.type, size, params, dev, measured }, d, g, s, size.bulk === 'source' ? s : R);
    devs.push(dev);
    return devs.length - 1;
  };

  const refMap = (n: string): string => (n === 'R' ? R : n === 'vbias' ? 'vbias' : b.node(n));
  for (const [role, conn] of Object.entries(REFERENCE[m.kind])) {
    const size = m.devices[role] ?? m.outputs[0]?.devices[role];
    if (!size) { b.problems.push(`no size for role ${role}`); continue; }
    byRole[role] = add(role, role, size, conn, refMap, true);
  }

  const outNodes: string[] = [];
  const cNodes: (string | undefined)[] = [];
  m.outputs.forEach((o: MirrorOutput, j) => {
    const prefix = bank ? `${o.name}.` : '';
    const outName = `${prefix}out`;
    b.hold(outName, j === outputIndex ? vout : o.output.v);
    outNodes.push(outName);
    cNodes.push(OUTPUT[m.kind].outc ? `${prefix}c` : undefined);
    const map = (n: string): string =>
      n === 'O' ? outName : n === 'C' ? b.node(`${prefix}c`) : refMap(n);
    for (const role of OUTPUT_ROLES[m.kind]) {
      const conn = OUTPUT[m.kind][role];
      const size = o.devices[role] ?? m.devices[role];
      if (!conn || !size) { b.problems.push(`output ${o.name}: no size for role ${role}`); continue; }
      const k = add(`${prefix}${role}`, role, size, conn, map, j === outputIndex);
      if (j === outputIndex) byRole[role] = k;
    }
  });

  const input = INPUT_NODE[m.kind];
  let iin: (v: Float64Array) => number;
  let resistorIndex = -1;
  if (m.input.kind === 'current') {
    const i = m.input.i;
    if (!(i > 0) || !Number.isFinite(i)) b.problems.push(`input current ${i} A is not positive`);
    if (sign > 0) b.current('input', 'vdd', input, i); else b.current('input', input, 'vss', i);
    iin = () => i;
  } else {
    if (sign > 0) b.resistor('input', 'vdd', input, m.input.r); else b.resistor('input', input, 'vss', m.input.r);
    resistorIndex = 0;
    iin = (v) => { const r = c.res[resistorIndex]!; return r.g * (v[r.a]! - v[r.b]!); };
  }
  const measuredOut = outNodes[outputIndex] ?? 'out';
  if (outNodes[outputIndex] === undefined) b.problems.push(`output index ${outputIndex} does not exist`);
  const c = b.build(measuredOut, sign, vss, vdd);
  const ws = makeWorkspace(c);
  const index = (name: string): number => c.nodeNames.indexOf(name);
  const [pa, pb] = PAIR[m.kind];

  const guess = (): void => {
    // Node voltages in the polarity frame u = sign·(v − rail), then mapped back.
    const span = Math.abs(other - rail);
    const uOuts = outNodes.map((n) => sign * (c.fixedV[index(n)]! - rail));
    const uVb = m.kind === 'wide-swing' ? sign * (c.fixedV[index('vbias')]! - rail) : 0;
    const ratios = m.outputs.map((_, j) => idealRatio(m, j) ?? 1);
    const u: Record<string, number> = {};
    const solveFor = (i: number): number => {
      guessNodes(m, c.mos.map((x) => x.dev), c.mos.map((x) => x.name), bank, i, ratios, uOuts, uVb, cNodes, u);
      return u[input] ?? 0;
    };
    if (m.input.kind === 'current') {
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
      const name = c.nodeNames[k]!;
      const uk = u[name];
      ws.v[k] = rail + sign * (uk !== undefined && Number.isFinite(uk) ? uk : 0.5 * span);
    }
  };

  const pairRef = byRole[pa], pairOut = byRole[pb];
  return {
    circuit: c, ws, sign, rail, span: vdd - vss, guess,
    iin: () => iin(ws.v),
    pair: pairRef !== undefined && pairOut !== undefined ? { ref: pairRef, out: pairOut } : undefined,
    byRole,
    vbiasNode: m.kind === 'wide-swing' ? index('vbias') : undefined,
  };
}

/** Solve x = uGate − VGS(I, VSB(x)) for a cascode's source node by a few fixed-point steps. */
function sourceBelow(dev: ModelDevice, i: number, uGate: number, bodyToRail: boolean, lo: number, hi: number): number {
  let x = uGate - gateDriveFor(dev, i, 0);
  for (let k = 0; k < 4 && bodyToRail; k++) x = uGate - gateDriveFor(dev, i, Math.max(x, 0));
  return Math.min(Math.max(x, lo), Math.max(hi, lo));
}

/** Polarity-frame node voltages assuming every device saturated and λ = 0. */
function guessNodes(
  m: TemplateMirror, devs: ModelDevice[], names: string[], bank: boolean, i: number, ratios: number[],
  uOuts: number[], uVb: number, cNodes: (string | undefined)[], u: Record<string, number>,
): void {
  const dev = (name: string): ModelDevice | undefined => { const k = names.indexOf(name); return k >= 0 ? devs[k] : undefined; };
  const vgs = (name: string, id: number, vsb: number): number => { const d = dev(name); return d ? gateDriveFor(d, id, vsb) : 0; };
  const railBulk = (role: string, j?: number): boolean => {
    const o = j !== undefined ? m.outputs[j] : undefined;
    return ((o?.devices[role] ?? m.devices[role])?.bulk ?? 'rail') === 'rail';
  };
  const prefix = (j: number): string => (bank ? `${m.outputs[j]!.name}.` : '');
  const totalOut = ratios.reduce((s, r) => s + r, 0) * i;
  switch (m.kind) {
    case 'simple':
      u.a = vgs('ref', i, 0);
      break;
    case 'cascode': {
      u.a = vgs('ref', i, 0);
      u.b = u.a + vgs('refc', i, railBulk('refc') ? u.a : 0);
      m.outputs.forEach((_, j) => {
        const io = i * ratios[j]!;
        const d = dev(`${prefix(j)}outc`);
        const cn = cNodes[j];
        if (d && cn) u[cn] = sourceBelow(d, io, u.b!, railBulk('outc', j), 0, uOuts[j]!);
      });
      break;
    }
    case 'wide-swing': {
      u.b = vgs('ref', i, 0);
      const rc = dev('refc');
      u.a = rc ? sourceBelow(rc, i, uVb, railBulk('refc'), 0, u.b) : 0;
      m.outputs.forEach((_, j) => {
        const io = i * ratios[j]!;
        const d = dev(`${prefix(j)}outc`);
        const cn = cNodes[j];
        if (d && cn) u[cn] = sourceBelow(d, io, uVb, railBulk('outc', j), 0, uOuts[j]!);
      });
      break;
    }
    case 'wilson':
    case 'wilson-balanced': {
      u.y = vgs('diode', totalOut, 0);
      const io = i * (ratios[0] ?? 1);
      u.x = u.y + vgs(`${prefix(0)}out`, io, railBulk('out', 0) ? u.y : 0);
      if (m.kind === 'wilson-balanced') {
        const bal = dev('bal');
        u.z = bal ? sourceBelow(bal, i, u.x, railBulk('bal'), 0, u.x) : 0;
      }
      break;
    }
  }
}
