/**
 * Every figure of design §4 for one measured output, from one nominal solve, its linearization,
 * the compliance search and (on request) the curve.
 */
import { outputAdjoint, outputConductance, outputSensitivities } from '../circuit/smallSignal';
import { designRatio, idealRatio, isBank } from '../circuit/templates';
import { KINDS, takesVbias } from '../kinds/index';
import type { MirrorCircuit } from '../circuit/mirrorCircuit';
import type { MirrorReport, ResolvedMirror } from '../types';
import { indexOf } from '../mirror-at';
import { findCompliance } from './compliance';
import { boxCoefficient, driftCurve, mirrorRebuild, supplySensitivity, temperatureCoefficient } from './drift';
import { DEFAULT_ANALYSIS, outputNoise } from './noise';
import { heldProbe, probeRow, type Probed } from './probe';
import { jointDrift, type JointDrift } from '../network/drift';
import { referenceReport } from './reference';
import { splitBipolarError, splitError } from './errorSplit';
import { sizeWeight } from '../circuit/templates';
import { isBipolarReport } from '../device-types';
import { outputSigma } from './mismatch';
import { routApprox, type SmallSignal } from './routApprox';
import {
  buildMirror, deviceReports, nodeVoltages, nominalVout, outputCurrent, shownDevices, shownReports, solveMirror,
  type MirrorSolve, type MirrorTarget, type ShownAt,
} from './solve';
import { clockedSolveCount } from '../circuit/newton';
import type { Workspace, WorkspaceState } from '../circuit/workspace';
import { linspace, sweepCircuit } from './sweep';
import { tableCurve } from '../models/table/curve';
import { knownVbias, pickVbiasOn } from './vbias';

export interface MeasureOptions {
  curve?: boolean; curvePoints?: number;
  /** false: leave out supply sensitivity, tc, tcBox and noise (a corner's table shows none);
   *  'required': the linearized figures and noise, but tcBox (eleven re-solves) only for an
   *  output that requires a tc — what a fix search needs; 'requirements': any of them only for
   *  an output that requires one — all a fix's re-check reads (its quick rules compare no
   *  other). */
  drift?: boolean | 'required' | 'requirements';
}

/** Which output a report is about: what differs between reports of identical mirrors. */
export interface ReportIdentity {
  name: string; mirror: string; output?: string; path: MirrorReport['path']; mirrorIndex: number; outputIndex: number;
}

export function reportIdentity(t: MirrorTarget): ReportIdentity {
  const m = t.mirror;
  const id: ReportIdentity = { name: m.name, mirror: m.name, path: m.path, mirrorIndex: indexOf(m), outputIndex: m.kind === 'netlist' ? 0 : t.outputIndex };
  if (m.kind !== 'netlist') {
    // Defensive: this also labels the report of a malformed mirror that made the solve throw.
    const o = Array.isArray(m.outputs) ? m.outputs[t.outputIndex] : undefined;
    if (o) id.path = o.path;
    if (o && isBank(m)) { id.name = `${m.name}.${o.name}`; id.output = o.name; }
  }
  return id;
}

/** A report with the measured output's identity (name, output, path) and empty figures.
 *  Built field by field: an object spread here costs more than the whole solve. */
function blankReport(t: MirrorTarget, vout: number): MirrorReport {
  const id = reportIdentity(t);
  const m = t.mirror;
  const r: MirrorReport = {
    name: id.name, mirror: id.mirror, kind: m.kind, type: m.type, converged: false, iterations: 0, residual: NaN,
    vout, iin: NaN, iout: NaN, ratio: NaN, rout: NaN, compliance: NaN, nodes: {}, devices: [], path: id.path,
    mirrorIndex: id.mirrorIndex, outputIndex: id.outputIndex,
  };
  if (id.output !== undefined) r.output = id.output;
  if (m.kind === 'netlist' && m.input === undefined) { delete r.iin; delete r.ratio; }
  return r;
}


/** The pair's geometric ratio (m·W/L or area·m, out over ref): what the error split reads. */
function geometricRatioOf(t: MirrorTarget, mc: MirrorCircuit): number | undefined {
  if (t.mirror.kind !== 'netlist') return idealRatio(t.mirror, t.outputIndex);
  if (!mc.pair) return undefined;
  const r = sizeWeight(mc.circuit.devices[mc.pair.out]!.size) / sizeWeight(mc.circuit.devices[mc.pair.ref]!.size);
  return Number.isFinite(r) ? r : undefined;
}

export function failedReport(t: MirrorTarget, note: string): MirrorReport {
  const r = blankReport(t, safeNominal(t));
  r.solveNote = note;
  return r;
}

function safeNominal(t: MirrorTarget): number {
  try { return nominalVout(t); } catch { return NaN; }
}

/** A bank's circuit as built for one of its outputs, by mirror (the spec it was built in): the
 *  next output's circuit is made from it (MirrorCircuit.forOutput) rather than built again.
 *  `solved`: that circuit's solve and the workspace it left, where another output's own solve
 *  would be the same one (below). */
interface Bank {
  spec: MirrorTarget['spec']; forOutput: NonNullable<MirrorCircuit['forOutput']>;
  /** `ws`: the first output's workspace, which the next output's circuit takes over (restored
   *  whole from `state` first), its measurement being done by then. */
  solved?: {
    sol: MirrorSolve; state: WorkspaceState; ws: Workspace;
    /** What the first output's report shows at that solve (its node voltages and device
     *  reports): an output that takes the solve shares them — the reference's devices are the
     *  very elements there — rather than holding copies of the same numbers (every object a
     *  report holds lives as long as the analysis, copied by each young-generation collection
     *  until it is promoted). */
    shown?: ShownAt;
  };
}
const banks = new WeakMap<ResolvedMirror, Bank>();

/** Output t's circuit made from the first's, with the first's solve where it stands for its own. */
function otherOutput(t: MirrorTarget): { mc: MirrorCircuit; solved?: Bank['solved'] } | undefined {
  const m = t.mirror;
  const known = banks.get(m);
  if (!known || known.spec !== t.spec) return undefined;
  // The last output of the bank: nothing after it needs the first circuit.
  if (m.kind !== 'netlist' && t.outputIndex === m.outputs.length - 1) banks.delete(m);
  const mc = known.forOutput(t.outputIndex, known.solved?.ws);
  return mc && { mc, solved: known.solved };
}

/** Solve a bank's circuit for one output from its guess, or take the solve of the same circuit
 *  for another output: every output is held at its own voltage whichever is measured
 *  (templates.ts forOutput), and the solve reads neither which devices are measured nor which
 *  node is the output, so from the same fresh workspace and the same guess it is the same
 *  solve, step for step — its result and every bit it leaves in the workspace. Taken only
 *  from a solve no clock could end (newton.ts clockedSolveCount), so its iterations and outcome
 *  depend on the equations alone. */
function solveBank(mc: MirrorCircuit, solved: Bank['solved'], bank: Bank | undefined): { sol: MirrorSolve; taken?: Bank['solved'] } {
  if (solved && mc.ws.restore(solved.state)) return { sol: copySolve(solved.sol), taken: solved };
  const clocked = clockedSolveCount();
  const sol = solveMirror(mc);
  const state = bank && clockedSolveCount() === clocked ? mc.ws.snapshot() : undefined;
  if (bank && state) bank.solved = { sol: copySolve(sol), state, ws: mc.ws };
  return { sol };
}

function copySolve(s: MirrorSolve): MirrorSolve {
  const c: MirrorSolve = { ...s };
  if (s.beyond) c.beyond = { ...s.beyond, stack: s.beyond.stack.slice() };
  return c;
}

/** A report, and the part of it a network member's joint circuit gave (its drift and noise
 *  through everything above it): what a member alike in all else does not share. */
export interface Measured { report: MirrorReport; joint?: JointDrift }

export function measure(t: MirrorTarget, opts: MeasureOptions = {}): MirrorReport {
  return measureParts(t, opts).report;
}

/** Which drift figures a measurement with `opts` makes for output t, and the tc box among them. */
function driftPlan(t: MirrorTarget, opts: MeasureOptions): { drifts: boolean; box: boolean } {
  const m = t.mirror;
  const req = m.kind === 'netlist' ? m.require : m.outputs[t.outputIndex]?.require;
  // A re-check of a network member without such a requirement then skips its joint circuit's
  // drift (two more builds of the whole group).
  const drifts = opts.drift === 'requirements'
    ? req?.tc !== undefined || req?.noise !== undefined || req?.supplySensitivity !== undefined
    : opts.drift !== false;
  const box = t.spec.process.trange !== undefined && drifts && (opts.drift === undefined || opts.drift === true || req?.tc !== undefined);
  return { drifts, box };
}

/** A network member's drift and noise through its joint circuit, as `opts` asks. */
function jointOf(t: MirrorTarget, opts: MeasureOptions, plan: { drifts: boolean; box: boolean }): JointDrift | undefined {
  return plan.drifts ? jointDrift(t.spec, indexOf(t.mirror), t.outputIndex, { box: plan.box, curve: opts.curve === true }) : undefined;
}

/** Output t's drift and noise through its network's joint circuit, as a measurement with `opts`
 *  makes them: what a network member alike in all else does not share (repeats.ts). */
export function memberJoint(t: MirrorTarget, opts: MeasureOptions = {}): JointDrift | undefined {
  return jointOf(t, opts, driftPlan(t, opts));
}

export function measureParts(t: MirrorTarget, opts: MeasureOptions = {}): Measured {
  const vout = nominalVout(t);
  // A wide-swing pick still due is made on this very circuit; its last solve is the nominal
  // point, so the nominal solve below starts there.
  const m = t.mirror;
  let vb = takesVbias(m) ? knownVbias(t.spec, m) : undefined;
  const other = otherOutput(t);
  const mc = other?.mc ?? buildMirror(t, vout, vb?.vbias);
  let bank: Bank | undefined;
  if (m.kind !== 'netlist' && !takesVbias(m) && mc.forOutput) {
    bank = { spec: t.spec, forOutput: mc.forOutput };
    banks.set(m, bank);
  }
  let warm: Float64Array | undefined;
  if (takesVbias(m) && !vb) {
    vb = pickVbiasOn(t.spec, m, mc);
    warm = mc.ws.v.slice();
  }
  // A bank (no vbias to pick: no warm start) solves once for all its outputs.
  const banked = warm ? undefined : solveBank(mc, other?.solved, bank);
  const sol = banked ? banked.sol : solveMirror(mc, warm);
  // The first output's, where this output's node voltages are that very solve's (restored whole).
  const shown = banked?.taken?.shown;
  // Every device's report for a netlist or a reference (its loop reads them all), else the shown ones'.
  const devices = m.kind === 'netlist' || KINDS[m.kind].loop !== undefined ? deviceReports(mc) : shownReports(mc, shown);
  // A self-biased netlist has no input: no iin, ratio or error (design §14).
  const noInput = m.kind === 'netlist' && m.input === undefined;
  const iin = mc.iin();
  const iout = outputCurrent(mc);
  const ratio = iin !== 0 ? iout / iin : NaN;
  const base = blankReport(t, vout);
  base.converged = sol.converged; base.iterations = sol.iterations; base.residual = sol.residual;
  base.iout = iout;
  if (noInput) { delete base.iin; delete base.ratio; } else { base.iin = iin; base.ratio = ratio; }
  base.nodes = shown ? shown.nodes : nodeVoltages(mc); base.devices = shownDevices(mc, devices);
  if (bank?.solved && !banked?.taken) bank.solved.shown = { nodes: base.nodes, devices: mc.circuit.devices, reports: devices };
  if (sol.note) base.solveNote = sol.note;
  if (sol.beyond) base.beyondRails = sol.beyond;
  if (vb) { base.vbias = vb.vbias; base.vbiasPicked = vb.picked; }
  // The ratio the mirror is designed to give: its geometry's, or a Widlar's law's at this input.
  const geometric = geometricRatioOf(t, mc);
  const ideal = m.kind === 'netlist' ? geometric : designRatio(m, t.outputIndex, iin, t.spec.process.temperature);
  if (ideal !== undefined) base.ratioIdeal = ideal;
  const reference = referenceReport(m, mc, devices, sol.converged);
  if (reference) base.reference = reference;
  if (!sol.converged) return { report: base };

  if (ideal !== undefined && !noInput && Number.isFinite(ratio)) {
    base.error = ratio / ideal - 1;
    // The split explains a departure from the geometric ratio; a degenerated pair (the Widlar)
    // departs from it by design, so its error against the law is left unsplit.
    const split = m.kind === 'netlist' || KINDS[m.kind].degeneration === undefined ? geometric : undefined;
    const a = mc.pair && mc.circuit.devices[mc.pair.ref], b = mc.pair && mc.circuit.devices[mc.pair.out];
    if (split !== undefined && a && b && a.kind === 'mos' && b.kind === 'mos') base.errorSplit = splitError(a, b, split, mc.ws.v);
    else if (split !== undefined && a && b && a.kind === 'bjt' && b.kind === 'bjt') base.errorSplit = splitBipolarError(a, b, split, ratio, mc.ws.v);
  }
  const lam = outputAdjoint(mc.circuit, mc.ws);
  if (lam) {
    const g = outputConductance(mc.circuit, mc.ws, lam);
    base.rout = g !== 0 ? 1 / g : Infinity;
    const sigma = outputSigma(mc.circuit.devices, outputSensitivities(mc.circuit, mc.ws, lam), iout);
    if (sigma !== undefined) base.sigma = sigma;
  }
  const trange = t.spec.process.trange;
  const plan = driftPlan(t, opts);
  const { drifts, box } = plan;
  // A network member drifts and carries noise with everything above it: its joint circuit.
  const joint = jointOf(t, opts, plan);
  if (joint) Object.assign(base, joint);
  else if (lam && drifts) {
    const pr: Probed = { probe: heldProbe(mc.circuit), row: probeRow(mc.ws, heldProbe(mc.circuit)), lam };
    const s = supplySensitivity(mc.circuit, mc.ws, pr, iout, t.spec.supplies.vdd);
    if (s !== undefined && Number.isFinite(s)) base.supplySensitivity = s;
    const rebuild = mirrorRebuild(mc, { t, vout, vbias: vb?.vbias });
    const tc = temperatureCoefficient(mc.circuit, mc.ws, pr, iout, t.spec.process.temperature, rebuild);
    if (tc !== undefined) base.tc = tc;
    const noise = outputNoise(mc.circuit, mc.ws, pr, t.spec.process.temperature, t.spec.analysis ?? DEFAULT_ANALYSIS, opts.curve === true);
    if (noise) base.noise = noise;
  }
  const byRole: Record<string, SmallSignal | undefined> = {};
  for (const role in mc.byRole) {
    const k = mc.byRole[role]!, d = devices[k]!, m = mc.circuit.devices[k]!;
    byRole[role] = isBipolarReport(d) ? { gm: d.gm, gds: d.gds, gmb: 0, rpi: d.rpi, beta: d.beta }
      : { gm: d.gm, gds: d.gds, gmb: m.kind === 'mos' && m.b === m.s ? 0 : d.gmb };
  }
  const approx = routApprox(t.mirror.kind, t.mirror.type, byRole, t.mirror.kind !== 'netlist' && t.mirror.degeneration !== undefined ? { degeneration: t.mirror.degeneration } : {});
  if (approx !== undefined) base.routApprox = approx;

  const xNom = mc.ws.v.slice();
  const uNom = mc.sign * (vout - mc.rail);
  if (trange && box && !joint) {
    const drift = driftCurve(mc, { t, vout, vbias: vb?.vbias }, trange, xNom);
    if (opts.curve) base.drift = drift;
    const box = boxCoefficient(drift, iout);
    if (box !== undefined) base.tcBox = box;
  }
  const comp = findCompliance(mc, uNom, xNom);
  base.compliance = comp.compliance;
  if (!comp.found && comp.limiter !== undefined) base.noCompliance = { device: mc.circuit.devices[comp.limiter]!.name };

  if (opts.curve) {
    const { vdd, vss } = t.spec.supplies;
    base.curve = sweepCircuit(mc, linspace(vss, vdd, opts.curvePoints ?? 61), vout, xNom);
    // A table device's gm/ID view at its operating point (the solve's own device, so the
    // operating point lies on the curve).
    mc.circuit.devices.forEach((x, k) => {
      const r = devices[k];
      if (x.kind !== 'mos' || !x.dev.table || !r || isBipolarReport(r) || !base.devices.includes(r)) return;
      const curve = tableCurve(x.dev, Math.abs(r.vds), Math.max(0, -r.vbs), r.m * r.w);
      if (curve) r.tableCurve = curve;
    });
  }
  return joint ? { report: base, joint } : { report: base };
}
