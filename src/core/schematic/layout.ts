/**
 * Places a circuit with ELK's layered algorithm (elkjs; the front end hands in its pure-JS
 * build, which runs without a worker, so only the commands that draw load it) and orthogonal wire routing, current flowing down: parts whose bottom pin feeds a node sit
 * above it, parts fed at their top or gate below it. Each rail pin gets its own rail symbol,
 * as on paper; a node of two or more pins becomes a junction, dotted when three or more meet.
 * Labels are part of the boxes ELK places (a part's text beside its symbol, a node's voltage
 * on one of its wires), so ELK keeps them apart. Deterministic: the same circuit gives the same
 * drawing (fixed seed, model order kept).
 */
import type { ElkExtendedEdge, ElkLabel, ElkNode, ElkPort } from 'elkjs/lib/elk-api';
import type { Circuit, CircuitPart, PinSide, SI } from './circuit';
import type { Box, Point, Schematic, SchematicLabel, SchematicPart, SchematicWire, SymbolKind } from './model';
import { SYMBOLS, TEXT, textBox } from './symbols';

const OPTIONS: Record<string, string> = {
  'elk.algorithm': 'layered',
  'elk.direction': 'DOWN',
  'elk.edgeRouting': 'ORTHOGONAL',
  'elk.randomSeed': '1',
  'elk.padding': '[top=8,left=8,bottom=8,right=8]',
  'elk.spacing.nodeNode': '22',
  'elk.layered.spacing.nodeNodeBetweenLayers': '22',
  'elk.spacing.edgeNode': '12',
  'elk.spacing.edgeEdge': '10',
  'elk.layered.spacing.edgeNodeBetweenLayers': '12',
  'elk.spacing.edgeLabel': '3',
  'elk.edgeLabels.placement': 'CENTER',
  'elk.layered.nodePlacement.strategy': 'NETWORK_SIMPLEX',
  'elk.layered.considerModelOrder.strategy': 'NODES_AND_EDGES',
};

const P_TYPE = new Set<SymbolKind>(['pmos', 'pnp']);

const SIDE: Record<PinSide, string> = { top: 'NORTH', bottom: 'SOUTH', ctl: 'WEST' };

interface Placed { kind: 'part' | 'rail' | 'held' | 'junction'; symbol?: SymbolKind; part?: CircuitPart; lines: string[]; device?: string }

/** One part's ELK node: its symbol with its text to the right, pins fixed on the symbol. */
function partNode(id: string, symbol: SymbolKind, lines: string[]): ElkNode {
  const s = SYMBOLS[symbol];
  const t = textBox(lines);
  const h = Math.max(s.h, t.h);
  const ports: ElkPort[] = Object.entries(s.pins).map(([side, p]) => ({
    id: `${id}#${side}`, x: p.x, y: side === 'bottom' ? h : p.y, width: 0, height: 0,
    layoutOptions: { 'elk.port.side': SIDE[side as PinSide] },
  }));
  return { id, width: s.w + (lines.length ? TEXT.gap + t.w : 0), height: h, ports, layoutOptions: { 'elk.portConstraints': 'FIXED_POS' } };
}

function netLabel(id: string, lines: string[]): ElkLabel {
  const t = textBox(lines);
  return { id, text: lines.join('\n'), width: t.w, height: t.h };
}

/** The circuit as ELK's graph, with what each node stands for. */
function graphOf(c: Circuit, si: SI): { graph: ElkNode; placed: Map<string, Placed> } {
  const children: ElkNode[] = [];
  const edges: ElkExtendedEdge[] = [];
  const placed = new Map<string, Placed>();
  const add = (id: string, symbol: SymbolKind, lines: string[], p: Omit<Placed, 'symbol' | 'lines'>): void => {
    children.push(partNode(id, symbol, lines));
    placed.set(id, { ...p, symbol, lines });
  };
  let edgeCount = 0;
  const edge = (from: string, to: string, label?: string[]): void => {
    const id = `e${edgeCount++}`;
    edges.push({ id, sources: [from], targets: [to], ...(label ? { labels: [netLabel(`${id}:label`, label)] } : {}) });
  };
  for (const p of c.parts) add(p.id, p.symbol, p.lines, { kind: 'part', part: p, ...(p.device ? { device: p.device.name } : {}) });
  // Pins per node, rails aside.
  const pinsOf = new Map<string, { part: string; side: PinSide }[]>();
  let railCount = 0;
  for (const p of c.parts) {
    for (const pin of p.pins) {
      const net = c.nets.get(pin.net);
      if (net?.rail) {
        const id = `rail${railCount++}`;
        const lines = [`${net.rail}${net.v !== undefined ? ` ${si(net.v, 'V')}` : ''}`];
        if (pin.side === 'bottom') { add(id, 'rail-bottom', lines, { kind: 'rail' }); edge(`${p.id}#bottom`, `${id}#top`); }
        else { add(id, 'rail-top', lines, { kind: 'rail' }); edge(`${id}#bottom`, `${p.id}#${pin.side}`); }
        continue;
      }
      const list = pinsOf.get(pin.net) ?? [];
      list.push({ part: p.id, side: pin.side });
      pinsOf.set(pin.net, list);
    }
  }
  for (const [name, pins] of pinsOf) {
    const net = c.nets.get(name);
    const j = `node:${name}`;
    children.push({ id: j, width: 2, height: 2 });
    placed.set(j, { kind: 'junction', lines: [] });
    const volts = net?.v !== undefined ? si(net.v, 'V') : '';
    let label: string[] | undefined = net?.held ? undefined : [`${name} ${volts}`.trim()];
    // Bottom pins feed the node from above, top pins hang below it. A gate or base sits beside
    // the device whose current sets it: an n-type's gate node is above the device (a diode's
    // drain), a p-type's below it.
    const above = (pin: { part: string; side: PinSide }): boolean =>
      pin.side === 'bottom' || (pin.side === 'ctl' && P_TYPE.has(placed.get(pin.part)?.symbol ?? 'nmos'));
    if (net?.held) {
      // The holding terminal sits on the free side: below a node only fed from above.
      const h = `held:${name}`;
      // A linked output is not held by a source: its node is the fed mirror's input.
      const lines = net.link !== undefined
        ? [`${name} ${volts}`.trim(), `to ${net.link}`, ...(net.note ? [net.note] : [])]
        : [`${name} ${volts} held`.trim(), ...(net.note ? [net.note] : [])];
      const [topSym, bottomSym] = net.link !== undefined ? ['link-top', 'link-bottom'] as const : ['held-top', 'held-bottom'] as const;
      if (pins.every(above)) { add(h, bottomSym, lines, { kind: 'held' }); edge(j, `${h}#top`); }
      else { add(h, topSym, lines, { kind: 'held' }); edge(`${h}#bottom`, j); }
    }
    for (const pin of [...pins].sort((a, b) => Number(!above(a)) - Number(!above(b)))) {
      if (above(pin)) edge(`${pin.part}#${pin.side}`, j, label);
      else edge(j, `${pin.part}#${pin.side}`, label);
      label = undefined;
    }
  }
  // Devices hang from their own rail: n-type ones sink to the bottom (vss), p-type ones rise
  // to the top (vdd), whatever else is longer on the other side.
  const pType = c.parts.filter((p) => P_TYPE.has(p.symbol)).length * 2 > c.parts.filter((p) => p.device).length;
  const layering = { 'elk.layered.layering.strategy': pType ? 'LONGEST_PATH_SOURCE' : 'LONGEST_PATH' };
  return { graph: { id: 'root', layoutOptions: { ...OPTIONS, ...layering }, children, edges }, placed };
}

/** What layout needs of ELK: `new ELK()` of `elkjs/lib/elk.bundled.js`. */
export interface LayoutEngine { layout(graph: ElkNode): Promise<ElkNode> }

/** Lays the circuit out: the drawing model, in px. */
export async function layoutCircuit(engine: LayoutEngine, name: string, c: Circuit, si: SI): Promise<Schematic> {
  const { graph, placed } = graphOf(c, si);
  const out = await engine.layout(graph);
  const parts: SchematicPart[] = [];
  const labels: SchematicLabel[] = [];
  for (const n of out.children ?? []) {
    const p = placed.get(n.id);
    if (!p) continue;
    const x = n.x ?? 0, y = n.y ?? 0;
    if (p.kind === 'junction') continue;
    const s = SYMBOLS[p.symbol!];
    const h = n.height ?? s.h;
    // A symbol taller than its text fills the node; a shorter one (a held terminal, a rail)
    // keeps its pin on the node's edge.
    const box: Box = { x, y: p.symbol!.endsWith('-bottom') ? y : y + h - s.h, w: s.w, h: s.h };
    const part = p.part;
    parts.push({ id: n.id, symbol: p.symbol!, box, ...(p.device ? { device: p.device } : {}),
      ...(part?.short ? { short: part.short } : {}), ...(part?.tip ? { tip: part.tip } : {}) });
    if (p.lines.length) {
      const t = textBox(p.lines);
      const tone = p.kind === 'rail' ? 'rail' : p.kind === 'held' ? 'net' : p.device ? 'device' : 'source';
      labels.push({ x: x + s.w + TEXT.gap, y: y + (h - t.h) / 2, w: t.w, h: t.h, lines: p.lines, tone, ...(p.device ? { device: p.device } : {}) });
    }
  }
  const centres = new Map((out.children ?? []).filter((n) => n.id.startsWith('node:')).map((n) => [n.id, { x: (n.x ?? 0) + 1, y: (n.y ?? 0) + 1 }]));
  const wires: SchematicWire[] = [];
  for (const e of out.edges ?? []) {
    const from = e.sources[0] ?? '', to = e.targets[0] ?? '';
    const net = (from.startsWith('node:') ? from : to).replace(/^node:/, '');
    for (const s of e.sections ?? []) {
      const points = [s.startPoint, ...(s.bendPoints ?? []), s.endPoint].map(round);
      // Wires meet at the junction's centre, not on its edge.
      const a = centres.get(from), b = centres.get(to);
      if (a) snap(points, 0, 1, a);
      if (b) snap(points, points.length - 1, points.length - 2, b);
      wires.push({ net, points });
    }
    for (const l of e.labels ?? []) {
      labels.push({ x: l.x ?? 0, y: l.y ?? 0, w: l.width ?? 0, h: l.height ?? 0, lines: (l.text ?? '').split('\n'), tone: 'net' });
    }
  }
  const dots = junctionDots(wires);
  return { name, width: Math.ceil(out.width ?? 0), height: Math.ceil(out.height ?? 0), parts, wires, dots, labels };
}

/** Dots where wires of one node branch: every point with wire going three or four ways. */
function junctionDots(wires: readonly SchematicWire[]): Point[] {
  const byNet = new Map<string, [Point, Point][]>();
  for (const w of wires) {
    const segs = byNet.get(w.net) ?? [];
    for (let k = 1; k < w.points.length; k++) segs.push([w.points[k - 1]!, w.points[k]!]);
    byNet.set(w.net, segs);
  }
  const dots = new Map<string, Point>();
  for (const segs of byNet.values()) {
    for (const [a, b] of segs) {
      for (const p of [a, b]) {
        const ways = new Set<string>();
        for (const [c, d] of segs) {
          if (!onSegment(p, c, d)) continue;
          for (const q of [c, d]) if (q.x !== p.x || q.y !== p.y) ways.add(q.x < p.x ? 'W' : q.x > p.x ? 'E' : q.y < p.y ? 'N' : 'S');
        }
        if (ways.size >= 3) dots.set(`${p.x},${p.y}`, p);
      }
    }
  }
  return [...dots.values()];
}

function onSegment(p: Point, a: Point, b: Point): boolean {
  const eps = 0.6;
  return Math.abs(a.x - b.x) < eps
    ? Math.abs(p.x - a.x) < eps && p.y >= Math.min(a.y, b.y) - eps && p.y <= Math.max(a.y, b.y) + eps
    : Math.abs(p.y - a.y) < eps && p.x >= Math.min(a.x, b.x) - eps && p.x <= Math.max(a.x, b.x) + eps;
}

/** Moves the wire's end `i` onto `c`, and its neighbour `j` with it so the wire stays orthogonal. */
function snap(points: Point[], i: number, j: number, c: Point): void {
  const p = points[i], q = points[j];
  if (!p || !q) return;
  if (p.x === q.x) q.x = c.x; else q.y = c.y;
  p.x = c.x; p.y = c.y;
}

function round(p: Point): Point {
  return { x: Math.round(p.x * 10) / 10, y: Math.round(p.y * 10) / 10 };
}
