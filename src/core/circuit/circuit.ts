/**
 * The elaborated circuit the solver works on: nodes indexed with the unknown (free) nodes
 * first and the held (fixed) nodes after them, so the Jacobian's free block is contiguous.
 */
import type { DeviceParams, DeviceSize, Polarity } from '../types';
import type { ModelDevice } from '../models/device';

export interface MosInstance {
  /** DeviceReport.name. */
  name: string;
  role: string;
  type: Polarity;
  size: DeviceSize;
  params: DeviceParams;
  dev: ModelDevice;
  d: number; g: number; s: number; b: number;
  /** Counted for the measured output's compliance (its own and the shared reference devices). */
  measured: boolean;
}

/** Ideal current `i` (A) flowing from node `from` through the source into node `to`. */
export interface CurrentSourceInstance { name: string; from: number; to: number; i: number }

/** Conductance g (S) between nodes a and b. */
export interface ResistorInstance { name: string; a: number; b: number; g: number }

export interface Circuit {
  nodeNames: string[];
  /** Number of unknown node voltages (indices 0 … nFree−1). */
  nFree: number;
  /** Held voltages (V, absolute) at indices ≥ nFree; the free entries are unused. */
  fixedV: Float64Array;
  mos: MosInstance[];
  isrc: CurrentSourceInstance[];
  res: ResistorInstance[];
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

/** Collects nodes by name and elements by node name, then numbers them (free nodes first). */
export class CircuitBuilder {
  private readonly nodes = new Map<string, NodeEntry>();
  private readonly order: string[] = [];
  private readonly mosList: MosInstance[] = [];
  private readonly mosTerminals: string[] = [];
  private readonly isrcList: { name: string; from: string; to: string; i: number }[] = [];
  private readonly resList: { name: string; a: string; b: string; g: number }[] = [];
  readonly problems: string[] = [];

  /** A free node (created on first use). */
  node(name: string): string {
    if (!this.nodes.has(name)) { this.nodes.set(name, { fixed: false }); this.order.push(name); }
    return name;
  }

  /** A node held at v (V); holding a node twice keeps the later value. */
  hold(name: string, v: number): string {
    if (!this.nodes.has(name)) this.order.push(name);
    this.nodes.set(name, { fixed: true, v });
    return name;
  }

  isHeld(name: string): boolean { return this.nodes.get(name)?.fixed === true; }

  mos(m: Omit<MosInstance, 'd' | 'g' | 's' | 'b'>, d: string, g: string, s: string, b: string): void {
    this.node(d); this.node(g); this.node(s); this.node(b);
    this.mosList.push({
      name: m.name, role: m.role, type: m.type, size: m.size, params: m.params, dev: m.dev, measured: m.measured,
      d: 0, g: 0, s: 0, b: 0,
    });
    this.mosTerminals.push(d, g, s, b);
  }

  current(name: string, from: string, to: string, i: number): void {
    this.node(from); this.node(to);
    this.isrcList.push({ name, from, to, i });
  }

  resistor(name: string, a: string, b: string, r: number): void {
    this.node(a); this.node(b);
    if (!(r > 0) || !Number.isFinite(r)) this.problems.push(`resistor ${name}: ${r} Ω is not a positive resistance`);
    this.resList.push({ name, a, b, g: r > 0 && Number.isFinite(r) ? 1 / r : 0 });
  }

  build(out: string, outSign: 1 | -1, vss: number, vdd: number): Circuit {
    this.node(out);
    const free = this.order.filter((n) => !this.nodes.get(n)?.fixed);
    const held = this.order.filter((n) => this.nodes.get(n)?.fixed);
    const nodeNames = [...free, ...held];
    const index = new Map(nodeNames.map((n, i) => [n, i] as const));
    const at = (n: string): number => index.get(n) ?? 0;
    const fixedV = new Float64Array(nodeNames.length);
    held.forEach((n, k) => {
      const e = this.nodes.get(n);
      fixedV[free.length + k] = e && e.fixed ? e.v : 0;
    });
    if (!this.isHeld(out)) this.problems.push(`output node ${out} is not held by a voltage`);
    return {
      nodeNames,
      nFree: free.length,
      fixedV,
      mos: this.mosList.map((m, k) => {
        const t = this.mosTerminals;
        m.d = at(t[4 * k]!); m.g = at(t[4 * k + 1]!); m.s = at(t[4 * k + 2]!); m.b = at(t[4 * k + 3]!);
        return m;
      }),
      isrc: this.isrcList.map((c) => ({ name: c.name, from: at(c.from), to: at(c.to), i: c.i })),
      res: this.resList.map((r) => ({ name: r.name, a: at(r.a), b: at(r.b), g: r.g })),
      outNode: at(out),
      outSign,
      vmid: 0.5 * (vss + vdd),
      vss,
      problems: this.problems.slice(),
    };
  }
}
