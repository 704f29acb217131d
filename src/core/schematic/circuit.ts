/**
 * One mirror output as a circuit to draw: parts with pins on nets, read from the report and
 * its kind's template (kinds/), or from a netlist's own wiring. No geometry here: layout.ts
 * places it. A kind needs nothing drawing-specific: its connections say everything.
 */
import { KINDS, isTemplateKind } from '../kinds';
import type { Connection } from '../kinds';
import { DEFAULTS } from '../defaults';
import { formatPlain } from '../text/format';
import type { DeviceReport, FileReport, MirrorReport } from '../types';
import type { SymbolKind } from './model';

/** Where a pin sits on its symbol: `top` and `bottom` carry the branch current, `ctl` is the
 *  gate or base (on the left). */
export type PinSide = 'top' | 'bottom' | 'ctl';

export interface CircuitPin { side: PinSide; net: string }

export interface CircuitPart {
  id: string;
  symbol: SymbolKind;
  pins: CircuitPin[];
  /** Text beside the symbol, first line the name. */
  lines: string[];
  device?: DeviceReport;
  short?: 'margin' | 'region';
  tip?: string;
}

export interface CircuitNet {
  name: string;
  /** Node voltage (V), when known. */
  v?: number;
  /** Held by an ideal source: the output, vbias, a netlist's voltage source. */
  held?: string;
  rail?: 'vdd' | 'vss';
  /** More words for a held node (the output's current). */
  note?: string;
  /** The node is a link to another mirror of the network (it feeds that mirror's input). */
  link?: string;
}

export interface Circuit { parts: CircuitPart[]; nets: Map<string, CircuitNet> }

/** A device's polarity as a symbol: MOSFETs by type, bipolar devices (npn/pnp) as they come. */
function symbolOf(d: { type: string }): SymbolKind {
  const t = d.type;
  if (t === 'npn' || t === 'pnp' || t === 'pmos') return t;
  return 'nmos';
}

const P_TYPES: ReadonlySet<string> = new Set(['pmos', 'pnp']);

function isBipolar(s: SymbolKind): boolean {
  return s === 'npn' || s === 'pnp';
}

/** Pins of a transistor symbol from its d/g/s (c/b/e) nets: the current enters at the top for
 *  NMOS and NPN, leaves at the top for PMOS and PNP. */
function transistorPins(symbol: SymbolKind, conn: Connection): CircuitPin[] {
  const sourceOnTop = symbol === 'pmos' || symbol === 'pnp';
  return [
    { side: 'top', net: sourceOnTop ? conn.s : conn.d },
    { side: 'ctl', net: conn.g },
    { side: 'bottom', net: sourceOnTop ? conn.d : conn.s },
  ];
}

export type SI = (v: number, unit: string, digits?: number) => string;

/** A device's figures, MOSFET or bipolar: the bipolar report names them ic, vbe, vce, vcesat
 *  and area where a MOSFET's are id, vgs, vds, vdsat and w/l (its `ic` is then the inversion
 *  coefficient, never a current), so each is read by the device's own names. */
interface Figures { i: number; vc: number; vo: number; vsat: number; size: string; good: string; goodWord: string; names: [string, string, string, string] }

function figuresOf(d: DeviceReport, si: SI): Figures {
  const x = d as unknown as Partial<Record<'id' | 'ic' | 'vgs' | 'vbe' | 'vds' | 'vce' | 'vdsat' | 'vcesat' | 'w' | 'l' | 'area', number>>;
  const num = (v: number | undefined): number => v ?? NaN;
  if (isBipolar(symbolOf(d))) {
    // The emitter area is a multiple of the process's unit device (design §10), as area·m.
    const size = x.area !== undefined ? `${formatPlain(x.area)}·${d.m}` : `·${d.m}`;
    return { i: num(x.ic), vc: num(x.vbe), vo: num(x.vce), vsat: num(x.vcesat), size, good: 'forward-active', goodWord: 'forward-active', names: ['IC', 'VBE', 'VCE', 'VCEsat'] };
  }
  return { i: num(x.id), vc: num(x.vgs), vo: num(x.vds), vsat: num(x.vdsat), size: `${si(num(x.w), 'm')}/${si(num(x.l), 'm')}·${d.m}`,
    good: 'saturation', goodWord: 'saturated', names: ['ID', 'VGS', 'VDS', 'VDSsat'] };
}

function deviceLines(d: DeviceReport, f: Figures, si: SI, short: CircuitPart['short']): string[] {
  // In words (no symbol glyphs: a font without them would draw something else).
  const state = short === 'region' ? `${d.region}, not ${f.goodWord}` : short === 'margin' ? `short: margin ${si(d.margin, 'V')}` : d.region;
  return [d.name, f.size, `${f.names[0]} ${si(f.i, 'A')}`, state];
}

function deviceTip(d: DeviceReport, f: Figures, si: SI): string {
  const [i, vc, vo, vsat] = f.names;
  return [`${d.name} (${d.role}), ${d.region}`, `${i} ${si(f.i, 'A')}`, `${vc} ${si(f.vc, 'V')}`, `${vo} ${si(f.vo, 'V')}`,
    `${vsat} ${si(f.vsat, 'V')}`, `margin ${si(d.margin, 'V')}`, `gm ${si(d.gm, 'S')}`, `ro ${si(d.ro, 'Ω')}`].join('\n');
}

/** Out of its working region (saturation for a MOSFET, forward-active for a bipolar device), or
 *  in it within limits.margin of the edge. */
function shortOf(d: DeviceReport, f: Figures, margin: number): CircuitPart['short'] {
  if (d.region !== f.good) return 'region';
  return d.margin < margin ? 'margin' : undefined;
}

/** The circuit of one output: its template kind's devices and input, or its netlist. */
export function circuitOf(report: FileReport, m: MirrorReport, si: SI): Circuit {
  const wiring = report.wiring?.find((w) => w.mirrorIndex === m.mirrorIndex);
  const margin = report.limits?.margin ?? DEFAULTS.margin;
  const nets = new Map<string, CircuitNet>();
  const net = (name: string): string => {
    if (!nets.has(name)) {
      const rail = name === 'vdd' ? 'vdd' : name === 'vss' || name === 'gnd' || name === '0' ? 'vss' : undefined;
      const v = m.nodes[name] ?? (rail ? m.nodes[rail] : undefined);
      nets.set(name, { name, ...(v !== undefined ? { v } : {}), ...(rail ? { rail } : {}) });
    }
    return name;
  };
  const parts: CircuitPart[] = [];
  const addDevice = (d: DeviceReport, conn: Connection): void => {
    const symbol = symbolOf(d);
    const f = figuresOf(d, si);
    const short = shortOf(d, f, margin);
    const c = { d: net(conn.d), g: net(conn.g), s: net(conn.s) };
    parts.push({ id: `dev:${d.name}`, symbol, pins: transistorPins(symbol, c), lines: deviceLines(d, f, si, short), device: d,
      tip: deviceTip(d, f, si), ...(short ? { short } : {}) });
  };
  // The mirror's own rail: vdd for p-type (PMOS, PNP) mirrors, vss for n-type ones.
  const pType = P_TYPES.has(m.type);
  const top = pType ? 'vdd' : 'vss';
  const far = top === 'vdd' ? 'vss' : 'vdd';
  if (isTemplateKind(m.kind)) {
    const kind = KINDS[m.kind];
    const prefix = m.output !== undefined && m.name.endsWith(`.${m.output}`) && m.devices.some((d) => d.name.startsWith(`${m.output}.`)) ? `${m.output}.` : '';
    // `T` names the opposite supply in kinds that reach it (a helper's collector, a reference's
    // closing mirror).
    const map = (n: string): string => (n === 'R' ? top : n === 'T' ? far : n === 'O' ? `${prefix}out` : n === 'C' ? `${prefix}c` : n);
    for (const d of m.devices) {
      const conn = kind.reference[d.role] ?? kind.output[d.role] ?? (d.role === 'startup' ? kind.loop?.startup : undefined);
      if (conn) addDevice(d, { d: map(conn.d), g: map(conn.g), s: map(conn.s) });
    }
    if (kind.degeneration !== undefined && wiring?.degeneration !== undefined) {
      // The emitter resistor hangs between its node and the mirror's rail, the rail at the bottom
      // for n-type mirrors.
      const e = net(map(kind.degeneration));
      const [hi, lo] = pType ? [net(top), e] : [e, net(top)];
      parts.push({ id: 'res:degeneration', symbol: 'res', pins: [{ side: 'top', net: hi }, { side: 'bottom', net: lo }], lines: ['RE', si(wiring.degeneration, 'Ω')] });
    }
    // A reference's loop resistors, drawn between their nodes, higher voltage on top.
    for (const [name, ends] of Object.entries(kind.loop?.resistors ?? {})) {
      const [a, b] = [map(ends.a), map(ends.b)];
      const va = m.nodes[a] ?? (a === 'vdd' ? m.nodes.vdd : 0) ?? 0;
      const vb = m.nodes[b] ?? (b === 'vdd' ? m.nodes.vdd : 0) ?? 0;
      const [hi, lo] = va >= vb ? [a, b] : [b, a];
      const r = wiring?.loopResistor;
      parts.push({ id: `res:${name}`, symbol: 'res', pins: [{ side: 'top', net: net(hi) }, { side: 'bottom', net: net(lo) }],
        lines: r !== undefined ? [name, si(r, 'Ω')] : [name] });
    }
    const vb = nets.get('vbias');
    if (vb) { vb.held = 'vbias'; if (m.vbias !== undefined) vb.v = m.vbias; }
    const input = wiring?.input;
    const node = net(map(kind.inputNode));
    // The input hangs from the far rail: current flows down through it into the stack.
    const [hi, lo] = pType ? [node, net(far)] : [net(far), node];
    const pins: CircuitPin[] = [{ side: 'top', net: hi }, { side: 'bottom', net: lo }];
    const iin = m.iin;
    if (iin === undefined || kind.loop !== undefined) {
      // A self-biased reference has no input: its current is set by its own loop.
    } else if (m.fedBy !== undefined || input?.kind === 'link') {
      // Fed by another mirror's output: the input node is that output's node, drawn as a link.
      const from = m.fedBy ?? (input?.kind === 'link' ? input.from : '');
      parts.push({ id: 'input', symbol: pType ? 'link-bottom' : 'link-top', pins: [{ side: pType ? 'top' : 'bottom', net: node }],
        lines: [`from ${from}`, `Iin ${si(iin, 'A')}`] });
    } else if (input?.kind === 'resistor') parts.push({ id: 'input', symbol: 'res', pins, lines: ['Rin', si(input.r, 'Ω'), `Iin ${si(iin, 'A')}`] });
    else parts.push({ id: 'input', symbol: 'isrc', pins, lines: ['Iin', si(iin, 'A')] });
    const out = nets.get(net(map('O')))!;
    out.held = 'out';
    out.note = `Iout ${si(m.iout, 'A')}`;
    if (m.feeds !== undefined) {
      out.link = m.feeds;
      if (m.linkV !== undefined) out.v = m.linkV;
    }
  } else if (wiring?.netlist) {
    const nl = wiring.netlist;
    for (const d of m.devices) {
      const w = nl.devices.find((x) => x.name === d.name);
      if (w) addDevice(d, w);
    }
    for (const c of nl.currents) {
      const lines = [c.name, si(c.i, 'A')];
      // A current source draws its arrow down: the pin it takes current from on top.
      parts.push({ id: `src:${c.name}`, symbol: 'isrc', pins: [{ side: 'top', net: net(c.from) }, { side: 'bottom', net: net(c.to) }], lines });
    }
    for (const r of nl.resistors) {
      const [a, b] = (m.nodes[r.a] ?? 0) >= (m.nodes[r.b] ?? 0) ? [r.a, r.b] : [r.b, r.a];
      parts.push({ id: `res:${r.name}`, symbol: 'res', pins: [{ side: 'top', net: net(a) }, { side: 'bottom', net: net(b) }], lines: [r.name, si(r.r, 'Ω')] });
    }
    for (const s of nl.voltages) { const n = nets.get(net(s.node))!; n.held = s.name; n.v = s.v; }
    const out = nets.get(net(nl.output));
    if (out) { out.held ??= 'out'; out.note = `Iout ${si(m.iout, 'A')}`; }
  }
  return { parts, nets };
}
