/**
 * Build a measured mirror's circuit and solve it; read node voltages, currents and device
 * reports from the solution. Everything here returns data, never throws on bad circuits.
 */
import { newChannelEval } from '../models/core';
import { controlNode, currentNodes, deviceMargin, deviceReport } from '../circuit/elements/device';
import { buildNetlist } from '../circuit/netlistCircuit';
import { solveDc, type DcOptions, type DcResult } from '../circuit/newton';
import { buildTemplate, type PerturbationLike } from '../circuit/templates';
import type { MirrorCircuit } from '../circuit/mirrorCircuit';
import type { DeviceElement } from '../circuit/elements/element';
import type { DeviceReport, ResolvedMirror, ResolvedSpec } from '../types';

export interface MirrorTarget { spec: ResolvedSpec; mirror: ResolvedMirror; outputIndex: number }

/** Nominal output voltage (absolute V) of the measured output. */
export function nominalVout(t: MirrorTarget): number {
  const m = t.mirror;
  if (m.kind === 'netlist') return m.output.v;
  return (m.outputs[t.outputIndex] ?? m.outputs[0])?.output.v ?? 0.5 * (t.spec.supplies.vdd + t.spec.supplies.vss);
}

export function buildMirror(t: MirrorTarget, vout: number, vbias: number | undefined, perturb?: PerturbationLike): MirrorCircuit {
  return t.mirror.kind === 'netlist'
    ? buildNetlist(t.spec, t.mirror, vout, perturb)
    : buildTemplate(t.spec, t.mirror, t.outputIndex, vout, vbias, perturb);
}

/** Solver limits for the many solves of a search or sweep: a point that does not converge
 *  quickly is reported as such instead of holding up the others. */
export const TRIAL: DcOptions = { budgetMs: 5, maxIterations: 100 };

/** Set the held output voltage (V, absolute). */
export function setVout(mc: MirrorCircuit, vout: number): void {
  mc.circuit.fixedV[mc.circuit.outNode] = vout;
}

/** A solve's outcome: the solver's result, and when a node lies outside the held voltages, where. */
export interface MirrorSolve extends DcResult { beyond?: RailExcess }

/**
 * A node the solve put outside every held voltage (rails, held sources, the output): MOSFETs and
 * resistors cannot take a node there, only a forced current with no device able to carry it, so
 * the point is not a valid operating point. `stack` is the chain of channels from the mirror's
 * own rail to that node, `need` the voltage that chain takes (V).
 */
export interface RailExcess { node: string; v: number; rail: 'vdd' | 'vss'; stack: string[]; need: number }

/** V: a node this far past a held voltage is outside the rails (far above gmin's offsets). */
const RAIL_TOL = 1e-3;

/** Solve at the present held voltages. With `warm`, Newton starts from it and falls back to the
 *  topology guess with every retry; without, it starts from the topology guess. A converged
 *  point with a node outside the rails comes back as not converged, with `beyond`. */
export function solveMirror(mc: MirrorCircuit, warm?: Float64Array, opts: DcOptions = {}): MirrorSolve {
  const c = mc.circuit;
  if (c.problems.length > 0) {
    mc.guess();
    for (let k = c.nFree; k < mc.ws.nt; k++) mc.ws.v[k] = c.fixedV[k]!;
    return { converged: false, iterations: 0, residual: NaN, note: `not solved: ${c.problems.join('; ')}` };
  }
  let r: DcResult | undefined;
  let iterations = 0;
  if (warm) {
    mc.ws.v.set(warm);
    r = solveDc(c, mc.ws, { clock: opts.clock, budgetMs: opts.budgetMs, maxIterations: opts.maxIterations, polish: opts.polish, plainOnly: true });
    iterations = r.iterations;
  }
  // A warm plain-only solve is a continuation step: its caller halves the step instead.
  if ((!r || !r.converged) && !(warm && opts.plainOnly)) {
    mc.guess();
    r = solveDc(c, mc.ws, opts);
    r.iterations += iterations;
  }
  return r!.converged ? sanity(mc, r!) : r!;
}

/** A converged point with a node outside the rails means the forced currents have no physical
 *  path (an input current the stack cannot carry within the supply): report it as not converged. */
function sanity(mc: MirrorCircuit, r: DcResult): MirrorSolve {
  const c = mc.circuit;
  let lo = Infinity, hi = -Infinity;
  for (let k = c.nFree; k < c.nodeNames.length; k++) { lo = Math.min(lo, c.fixedV[k]!); hi = Math.max(hi, c.fixedV[k]!); }
  let worst = -1, excess = RAIL_TOL;
  for (let k = 0; k < c.nFree; k++) {
    const v = mc.ws.v[k]!;
    const out = Number.isFinite(v) ? Math.max(lo - v, v - hi) : Infinity;
    if (out > excess) { excess = out; worst = k; }
  }
  if (worst < 0) return r;
  const v = mc.ws.v[worst]!;
  const node = c.nodeNames[worst]!;
  const rail = v < lo ? 'vss' : 'vdd';
  const stack = stackHolding(mc, worst);
  const need = Math.abs(v - mc.rail);
  const where = excess > 10 * Math.abs(mc.span) + 10 ? 'far outside the supplies' : rail === 'vss' ? 'below vss' : 'above vdd';
  const note = `node ${node} would sit at ${v.toPrecision(3)} V, ${where}: no device can carry the forced current within the supply`;
  return { converged: false, iterations: r.iterations, residual: r.residual, note, beyond: { node, v, rail, stack, need } };
}

/**
 * The devices whose drops hold node `to` away from the mirror's own rail, rail side first: the
 * chain of channels from the rail to it, unless the device of that chain on the node is driven
 * from another free node (the Wilson's `in`, its gate on the diode node): it then passes what
 * that node sets, the node sits where the gates on it need it, and the chain of control-to-source
 * drops down to the rail is named instead (the Wilson's `diode` + `out`). A device on the node
 * driven from a held voltage (a cascode's gate on vbias) limits what the chain can carry: the
 * chain of channels stays.
 */
function stackHolding(mc: MirrorCircuit, to: number): string[] {
  const c = mc.circuit;
  const channels = channelPath(mc, to);
  const last = channels[channels.length - 1];
  const control = last === undefined ? to : controlNode(c.devices[last]!);
  const drops = control === to || control >= c.nFree ? [] : dropPath(mc, to);
  return (drops.length > 0 ? drops : channels).map((k) => c.devices[k]!.name);
}

/** The mirror's own rail among the held nodes, or -1. */
function ownRail(mc: MirrorCircuit): number {
  const c = mc.circuit;
  return c.nodeNames.findIndex((n, k) => k >= c.nFree && c.fixedV[k] === mc.rail && (n === 'vss' || n === 'vdd'));
}

/** Devices (indices) on the shortest chain of control-to-source drops (gate to source, base to
 *  emitter) from node `to` down to the mirror's own rail, rail side first; at each node a
 *  diode-connected device before another one of the same drop; empty when no such chain exists. */
function dropPath(mc: MirrorCircuit, to: number): number[] {
  const c = mc.circuit;
  const rail = ownRail(mc);
  const chain = rail < 0 ? undefined : shortestChain(c, to, rail, (n) => {
    const on = c.devices.map((d, k) => k).filter((k) => controlNode(c.devices[k]!) === n);
    on.sort((a, b) => Number(currentNodes(c.devices[b]!)[0] === n) - Number(currentNodes(c.devices[a]!)[0] === n));
    return on.map((k) => [k, currentNodes(c.devices[k]!)[1]] as const);
  });
  // Listed from the rail back: rail side first already.
  return chain ?? [];
}

/** Devices (indices) on the shortest chain of channels (drain–source) from the mirror's own rail
 *  to node `to`, rail side first; empty when no such chain exists. */
function channelPath(mc: MirrorCircuit, to: number): number[] {
  const c = mc.circuit;
  const rail = ownRail(mc);
  const chain = rail < 0 ? undefined : shortestChain(c, rail, to, (n) => {
    const steps: (readonly [number, number])[] = [];
    c.devices.forEach((dev, k) => {
      const [a, b] = currentNodes(dev);
      const next = a === n ? b : b === n ? a : -1;
      if (next >= 0) steps.push([k, next]);
    });
    return steps;
  });
  return chain ? chain.reverse() : [];
}

/** The devices (indices) of the shortest chain from node `start` to node `goal`, each link one of
 *  `steps(n)` ([device, next node]) and through free nodes only — a held node but `goal` ends a
 *  chain (another rail, the output) —, listed from `goal` back to `start`; undefined if none. */
function shortestChain(c: MirrorCircuit['circuit'], start: number, goal: number, steps: (n: number) => readonly (readonly [number, number])[]): number[] | undefined {
  const via = new Map<number, { from: number; dev: number }>([[start, { from: -1, dev: -1 }]]);
  const queue = [start];
  while (queue.length > 0 && !via.has(goal)) {
    const n = queue.shift()!;
    for (const [dev, next] of steps(n)) {
      if (via.has(next) || (next >= c.nFree && next !== goal)) continue;
      via.set(next, { from: n, dev });
      queue.push(next);
    }
  }
  if (!via.has(goal)) return undefined;
  const devs: number[] = [];
  for (let n = goal; n !== start;) { const e = via.get(n)!; devs.push(e.dev); n = e.from; }
  return devs;
}

/** A, the output current (positive for a working mirror) at the assembled solution. */
export function outputCurrent(mc: MirrorCircuit): number {
  return mc.circuit.outSign * mc.ws.F[mc.circuit.outNode]!;
}

export function nodeVoltages(mc: MirrorCircuit): Record<string, number> {
  const out: Record<string, number> = {};
  mc.circuit.nodeNames.forEach((n, k) => { out[n] = mc.ws.v[k]!; });
  return out;
}

/** Reports of every device in circuit order (index k is circuit.devices[k]). */
export function deviceReports(mc: MirrorCircuit): DeviceReport[] {
  const v = mc.ws.v;
  return mc.circuit.devices.map((d) => deviceReport(d, v));
}

/** Reports of the devices a report shows (shownDevices'), each at its circuit index, the others
 *  left out: a bank's other outputs' devices belong to their own reports, and a template
 *  mirror's measurement reads none of them (a reference's loop reads every device: not for it).
 *  `same`: reports made at these very node voltages, by circuit index with the devices they
 *  are of — a device that is the very same element takes its report from there. */
export function shownReports(mc: MirrorCircuit, same?: ShownAt): DeviceReport[] {
  const v = mc.ws.v;
  const out: DeviceReport[] = [];
  mc.circuit.devices.forEach((d, k) => {
    if (d.measured || d.startup === true) out[k] = (same?.devices[k] === d ? same.reports[k] : undefined) ?? deviceReport(d, v);
  });
  return out;
}

/** What a report shows of one solution: its node voltages and device reports (by circuit index,
 *  with the circuit's devices). */
export interface ShownAt {
  nodes: Record<string, number>;
  devices: readonly DeviceElement[];
  reports: readonly (DeviceReport | undefined)[];
}

/** The devices a report shows: the shared reference and the measured output's devices (a
 *  bank's other outputs are in the circuit but belong to their own reports). */
export function shownDevices(mc: MirrorCircuit, all: DeviceReport[]): DeviceReport[] {
  return all.filter((_, k) => { const d = mc.circuit.devices[k]!; return d.measured || d.startup === true; });
}

const scratch = newChannelEval();

/** V, the smallest saturation margin over the devices counted for compliance; a device in
 *  cutoff counts with its (non-positive) overdrive, so it never passes as saturated. With
 *  `each`, every device's margin is written there (NaN for devices not counted). */
export function worstMargin(mc: MirrorCircuit, each?: Float64Array): number {
  const v = mc.ws.v;
  let worst = Infinity;
  mc.circuit.devices.forEach((d, k) => {
    if (!d.measured) { if (each) each[k] = NaN; return; }
    const margin = deviceMargin(d, v, scratch);
    if (each) each[k] = margin;
    if (margin < worst) worst = margin;
  });
  return worst;
}
