/**
 * The elaborated circuit the solver works on: nodes indexed with the unknown (free) nodes
 * first and the held (fixed) nodes after them, so the Jacobian's free block is contiguous;
 * the elements as a closed union (elements/element.ts), and the Jacobian's pattern with, for a
 * circuit solved sparse, its fill-reducing order — both computed once here.
 */
import { SOLVER } from '../defaults';
import type {
  BjtElement, CapacitorElement, CircuitElement, CurrentSourceElement, DeviceElement, MosElement, ResistorElement, VoltageSourceElement,
} from './elements/element';
import { hasSlots, patternOf } from './elements/stamp';
import { JacobianPattern } from './jacobian';
import { minimumDegree } from './ordering';
import type { ResistorLaw } from './resistance';

/** What a template or netlist says of a MOSFET; the builder adds its terminals. */
export type MosInstance = MosElement;
export type MosDescription = Omit<MosElement, 'kind' | 'd' | 'g' | 's' | 'b' | 'slot'>;
/** What a template or netlist says of a bipolar device; the builder adds its terminals. */
export type BjtDescription = Omit<BjtElement, 'kind' | 'c' | 'b' | 'e' | 'slot'>;

export interface Circuit {
  nodeNames: string[];
  /** Number of unknown node voltages (indices 0 … nFree−1). */
  nFree: number;
  /** Held voltages (V, absolute) at indices ≥ nFree; the free entries are unused. */
  fixedV: Float64Array;
  /** Every element, in the order they were added (a stamp order fixed per circuit). */
  elements: CircuitElement[];
  /** The transistors among them, in the same order: DeviceReport k is devices[k]. */
  devices: DeviceElement[];
  jacobian: JacobianPattern;
  /** Elimination order of the free block when it is solved sparse (more than
   *  SOLVER.denseMaxNodes unknowns); absent for the dense solve. */
  ordering?: Int32Array;
  /** Whether an independent current source drives the circuit (source stepping ramps the
   *  current sources; without any, it ramps the held voltages). */
  hasCurrentSources: boolean;
  /** Index of the held output node. */
  outNode: number;
  /** +1: iout is the current the output source delivers into the node (NMOS sinks it);
   *  −1: the current the circuit delivers into the source (PMOS). */
  outSign: 1 | -1;
  /** V, where gmin ties every free node (the rails' midpoint). */
  vmid: number;
  vss: number;
  /** Problems found while elaborating that make a solve meaningless. */
  problems: string[];
}

type NodeEntry = { fixed: false } | { fixed: true; v: number };

/** A pending element's node names, in the order its method creates them. */
function pendingNodes(p: Pending): readonly string[] {
  switch (p.kind) {
    case 'mos': case 'bjt': return p.nodes;
    case 'resistor': case 'capacitor': return [p.a, p.b];
    case 'current': return [p.from, p.to];
  }
}

/** A pending element again, with its own element object where the build writes node indices (a resistor's is the input resistor a caller may hold). */
function copyPending(p: Pending): Pending {
  switch (p.kind) {
    case 'mos': case 'bjt': return p;
    case 'resistor': return { ...p, e: { ...p.e } };
    case 'current': return { ...p, e: { ...p.e } };
    case 'capacitor': return { ...p, e: { ...p.e } };
  }
}

/** An element as added, with node names; built into a CircuitElement with node indices. */
type Pending =
  | { kind: 'mos'; m: MosDescription; nodes: [string, string, string, string] }
  | { kind: 'bjt'; q: BjtDescription; nodes: [string, string, string] }
  | { kind: 'resistor'; e: ResistorElement; a: string; b: string }
  | { kind: 'current'; e: CurrentSourceElement; from: string; to: string }
  | { kind: 'capacitor'; e: CapacitorElement; a: string; b: string };

/** A builder call as `CircuitBuilder.log` records it and `replay` makes it again. */
export type BuilderOp =
  | { op: 'node'; name: string }
  | { op: 'hold'; name: string; v: number }
  | { op: 'pending'; p: Pending };

/** Collects nodes by name and elements by node name, then numbers them (free nodes first). */
export class CircuitBuilder {
  private readonly nodes = new Map<string, NodeEntry>();
  private readonly order: string[] = [];
  private readonly pending: Pending[] = [];
  readonly problems: string[] = [];
  /** When set, every node, hold and element added, in order (a network re-check replays a
   *  member's calls instead of wiring it again: network/edited.ts). Problems are not logged:
   *  only a circuit without any is replayed. */
  log?: BuilderOp[];

  /** A free node (created on first use). */
  node(name: string): string {
    if (!this.nodes.has(name)) { this.nodes.set(name, { fixed: false }); this.order.push(name); this.log?.push({ op: 'node', name }); }
    return name;
  }

  /** A node held at v (V) by an ideal voltage source; holding a node twice keeps the later value. */
  hold(name: string, v: number): string {
    if (!this.nodes.has(name)) this.order.push(name);
    this.nodes.set(name, { fixed: true, v });
    this.log?.push({ op: 'hold', name, v });
    return name;
  }

  /** Make logged calls `ops[from … to)` again, as the methods that logged them would (each
   *  element's nodes first; the elements as new objects). */
  replay(ops: readonly BuilderOp[], from: number, to: number): void {
    for (let k = from; k < to; k++) {
      const o = ops[k]!;
      switch (o.op) {
        case 'node': this.node(o.name); break;
        case 'hold': this.hold(o.name, o.v); break;
        case 'pending':
          for (const n of pendingNodes(o.p)) this.node(n);
          this.add(copyPending(o.p));
          break;
      }
    }
  }

  private add(p: Pending): void {
    this.pending.push(p);
    this.log?.push({ op: 'pending', p });
  }

  isHeld(name: string): boolean { return this.nodes.get(name)?.fixed === true; }

  /** Elements added so far (each built in this order after the held nodes' sources). */
  get added(): number { return this.pending.length; }

  mos(m: MosDescription, d: string, g: string, s: string, b: string): void {
    this.node(d); this.node(g); this.node(s); this.node(b);
    this.add({ kind: 'mos', m, nodes: [d, g, s, b] });
  }

  bjt(q: BjtDescription, c: string, b: string, e: string): void {
    this.node(c); this.node(b); this.node(e);
    this.add({ kind: 'bjt', q, nodes: [c, b, e] });
  }

  current(name: string, from: string, to: string, i: number): void {
    this.node(from); this.node(to);
    this.add({ kind: 'current', e: { kind: 'current', name, from: 0, to: 0, i }, from, to });
  }

  /** A resistor of r Ω (`law`: r follows the temperature by it); the returned element gets its
   *  node indices when the circuit is built. */
  resistor(name: string, a: string, b: string, r: number, law?: ResistorLaw): ResistorElement {
    this.node(a); this.node(b);
    if (!(r > 0) || !Number.isFinite(r)) this.problems.push(`resistor ${name}: ${r} Ω is not a positive resistance`);
    const e: ResistorElement = { kind: 'resistor', name, a: 0, b: 0, g: r > 0 && Number.isFinite(r) ? 1 / r : 0, slot: 0 };
    if (law) e.law = law;
    this.add({ kind: 'resistor', e, a, b });
    return e;
  }

  /** A capacitor of c F (open at DC; seen by the noise analysis only). */
  capacitor(name: string, a: string, b: string, c: number): void {
    this.node(a); this.node(b);
    if (!(c > 0) || !Number.isFinite(c)) this.problems.push(`capacitor ${name}: ${c} F is not a positive capacitance`);
    this.add({ kind: 'capacitor', e: { kind: 'capacitor', name, a: 0, b: 0, c }, a, b });
  }

  build(out: string, outSign: 1 | -1, vss: number, vdd: number): Circuit {
    this.node(out);
    const free = this.order.filter((n) => !this.nodes.get(n)?.fixed);
    const held = this.order.filter((n) => this.nodes.get(n)?.fixed);
    const nodeNames = [...free, ...held];
    const index = new Map(nodeNames.map((n, i) => [n, i] as const));
    const at = (n: string): number => index.get(n) ?? 0;
    const fixedV = new Float64Array(nodeNames.length);
    const elements: CircuitElement[] = [];
    held.forEach((n, k) => {
      const e = this.nodes.get(n);
      fixedV[free.length + k] = e && e.fixed ? e.v : 0;
      const source: VoltageSourceElement = { kind: 'voltage', name: n, node: free.length + k };
      elements.push(source);
    });
    if (!this.isHeld(out)) this.problems.push(`output node ${out} is not held by a voltage`);
    const devices: DeviceElement[] = [];
    for (const p of this.pending) {
      switch (p.kind) {
        case 'mos': {
          const [d, g, s, b] = p.nodes;
          const m = p.m;
          // Field by field: an object spread here costs as much as a small solve.
          const e: MosElement = {
            kind: 'mos', name: m.name, role: m.role, type: m.type, size: m.size, params: m.params, dev: m.dev,
            measured: m.measured, d: at(d), g: at(g), s: at(s), b: at(b), slot: 0,
          };
          if (m.startup) e.startup = true;
          elements.push(e);
          devices.push(e);
          break;
        }
        case 'bjt': {
          const [c, b, e] = p.nodes;
          const q = p.q;
          const el: BjtElement = {
            kind: 'bjt', name: q.name, role: q.role, type: q.type, size: q.size, params: q.params, dev: q.dev,
            measured: q.measured, c: at(c), b: at(b), e: at(e), slot: 0,
          };
          if (q.startup) el.startup = true;
          elements.push(el);
          devices.push(el);
          break;
        }
        case 'resistor': p.e.a = at(p.a); p.e.b = at(p.b); elements.push(p.e); break;
        case 'current': p.e.from = at(p.from); p.e.to = at(p.to); elements.push(p.e); break;
        case 'capacitor': p.e.a = at(p.a); p.e.b = at(p.b); elements.push(p.e); break;
      }
    }
    let count = 0;
    for (const e of elements) patternOf(e, () => { count++; });
    const entries = new Int32Array(2 * count);
    let filled = 0;
    const add = (row: number, col: number): void => { entries[filled++] = row; entries[filled++] = col; };
    for (const e of elements) {
      if (hasSlots(e)) e.slot = filled >> 1;
      patternOf(e, add);
    }
    const n = free.length;
    const jacobian = new JacobianPattern(nodeNames.length, n, entries);
    let ordering: Int32Array | undefined;
    if (n > SOLVER.denseMaxNodes) {
      const o = minimumDegree(n, jacobian.colPtr, jacobian.rowIdx, jacobian.freeEnd, SOLVER.maxFactorWork);
      if (o && o.flops <= SOLVER.maxFactorWork) ordering = o.order;
      else this.problems.push(`the circuit is too densely connected to solve: eliminating its ${n} nodes would take more than ${SOLVER.maxFactorWork.toExponential(0)} operations per Newton iteration`);
    }
    return {
      nodeNames, nFree: n, fixedV, elements, devices, jacobian, ordering,
      hasCurrentSources: this.pending.some((p) => p.kind === 'current'),
      outNode: at(out),
      outSign,
      vmid: 0.5 * (vss + vdd),
      vss,
      problems: this.problems.slice(),
    };
  }
}
