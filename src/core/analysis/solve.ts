/**
 * Build a measured mirror's circuit and solve it; read node voltages, currents and device
 * reports from the solution. Everything here returns data, never throws on bad circuits.
 */
import { SOLVER } from '../defaults';
import { newChannelEval } from '../models/core';
import { evalPrepared } from '../models/evaluate';
import { evalFrame } from '../models/terminal';
import { buildNetlist } from '../circuit/netlistCircuit';
import { solveDc, type DcOptions, type DcResult } from '../circuit/newton';
import { buildTemplate, type PerturbationLike } from '../circuit/templates';
import type { MirrorCircuit } from '../circuit/mirrorCircuit';
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

/** Solve at the present held voltages. With `warm`, Newton starts from it and falls back to the
 *  topology guess with every retry; without, it starts from the topology guess. */
export function solveMirror(mc: MirrorCircuit, warm?: Float64Array, opts: DcOptions = {}): DcResult {
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
    r = solveDc(c, mc.ws, { clock: opts.clock, budgetMs: opts.budgetMs, maxIterations: opts.maxIterations, plainOnly: true });
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

/** A converged point far outside the supplies means the forced currents have no physical
 *  path (an input current no device can carry): report it as not converged. */
function sanity(mc: MirrorCircuit, r: DcResult): DcResult {
  const c = mc.circuit;
  const bound = 10 * Math.abs(mc.span) + 10;
  for (let k = 0; k < c.nFree; k++) {
    const v = mc.ws.v[k]!;
    if (!(Math.abs(v - c.vmid) <= bound)) {
      return { converged: false, iterations: r.iterations, residual: r.residual, note: `node ${c.nodeNames[k]} would sit at ${v.toPrecision(3)} V, far outside the supplies: no device can carry the forced current` };
    }
  }
  return r;
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

/** Reports of every device in circuit order (index k is circuit.mos[k]). */
export function deviceReports(mc: MirrorCircuit): DeviceReport[] {
  const v = mc.ws.v;
  return mc.circuit.mos.map((m) => {
    const p = m.dev.sign;
    const vgs = p * (v[m.g]! - v[m.s]!);
    const vds = p * (v[m.d]! - v[m.s]!);
    const vbs = p * (v[m.b]! - v[m.s]!);
    const e = evalPrepared(m.dev, vgs, vds, vbs);
    const r: DeviceReport = {
      name: m.name, role: m.role, type: m.type, w: m.size.w, l: m.size.l, m: m.size.m,
      id: e.id, vgs, vds, vbs, vth: e.vth, vov: vgs - e.vth, vdsat: e.vdsat, margin: vds - e.vdsat,
      region: e.region, inversion: e.inversion, ic: e.ic, gm: e.gm, gds: e.gds, gmb: e.gmb,
      ro: e.gds > 0 ? 1 / e.gds : 1 / SOLVER.gmin,
      gmId: e.id !== 0 ? e.gm / e.id : 0,
    };
    if (m.size.auto?.w || m.size.auto?.l) r.sized = true;
    return r;
  });
}

/** The devices a report shows: the shared reference and the measured output's devices (a
 *  bank's other outputs are in the circuit but belong to their own reports). */
export function shownDevices(mc: MirrorCircuit, all: DeviceReport[]): DeviceReport[] {
  return all.filter((_, k) => mc.circuit.mos[k]!.measured);
}

const scratch = newChannelEval();

/** V, the smallest saturation margin over the devices counted for compliance; a device in
 *  cutoff counts with its (non-positive) overdrive, so it never passes as saturated. With
 *  `each`, every device's margin is written there (NaN for devices not counted). */
export function worstMargin(mc: MirrorCircuit, each?: Float64Array): number {
  const v = mc.ws.v;
  let worst = Infinity;
  mc.circuit.mos.forEach((m, k) => {
    if (!m.measured) { if (each) each[k] = NaN; return; }
    const p = m.dev.sign;
    const vds = p * (v[m.d]! - v[m.s]!);
    evalFrame(m.dev, p * (v[m.g]! - v[m.s]!), vds, p * (v[m.b]! - v[m.s]!), scratch);
    const margin = scratch.region === 0 ? p * (v[m.g]! - v[m.s]!) - scratch.vth : vds - scratch.vdsat;
    if (each) each[k] = margin;
    if (margin < worst) worst = margin;
  });
  return worst;
}
