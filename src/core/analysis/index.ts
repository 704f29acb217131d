/**
 * Public API of the circuit engine: solve one mirror's DC point, measure every figure of
 * design §4, sweep the output voltage, analyse a whole spec. None of these throws: a circuit
 * that cannot be solved comes back with converged: false and a note saying what was tried.
 *
 * Conventions (the choices design §4 leaves open):
 * - Device names: the role (`ref`, `out`, …) for a mirror without `outputs:`; in a bias bank
 *   the shared reference devices keep their role as name and each output's devices are
 *   `<output>.<role>` (role stays `out`, `outc`). A bank's report lists the reference devices
 *   and the measured output's devices; the other outputs sit in the circuit, held at their own
 *   nominal voltages. Netlist devices keep their own names. Perturbations use these names.
 * - Not converged: iin, iout, ratio, nodes and devices describe the best iterate (for the
 *   finding's message only); rout and compliance are NaN, error, errorSplit, sigma absent.
 *   A converged point with a node outside the rails is not an operating point: not converged,
 *   with `beyondRails` (solve.ts).
 * - compliance: when no output voltage within the supplies saturates every device (a reference
 *   device in triode), the far rail (NMOS vdd, PMOS vss): "nothing works", with `noCompliance`
 *   naming the device that is out of saturation at every Vout (front ends show that, not a figure). A device within
 *   1 µV of the edge counts as saturated (compliance.ts).
 * - sigma: present when any device's type has avt or abeta; a missing coefficient counts 0.
 * - errorSplit: see errorSplit.ts (geometry, body, vds as successive model evaluations).
 * - routApprox: gmb counts 0 for a device whose bulk is tied to its source.
 * - curve points that do not converge carry NaN iout/rout and converged: false.
 * - Wide-swing without `vbias`: the pick (vbias.ts) is cached per (spec, mirror object), and
 *   solveAt with a perturbation keeps the nominal pick (the bias comes from elsewhere).
 */
import type { CurvePoint, DeviceReport, MirrorReport, ResolvedMirror, ResolvedSpec } from '../types';
import { failedReport, measure, memberJoint, measureParts, type MeasureOptions } from './measure';
import { vbiasFor } from './vbias';
import { buildMirror, deviceReports, nodeVoltages, nominalVout, outputCurrent, shownDevices, solveMirror } from './solve';
import { RepeatedMirrors, type MemberMeasure, type SolvedUnits } from './repeats';
import { sweepCircuit } from './sweep';

export interface MirrorContext { spec: ResolvedSpec; mirror: ResolvedMirror; outputIndex: number }
/** Per-device random deviations for Monte Carlo: keyed by DeviceReport.name. */
export interface Perturbation { dvt: Record<string, number>; dbeta: Record<string, number> } // V, relative
export interface OperatingPoint {
  converged: boolean; iterations: number; residual: number; solveNote?: string;
  iin: number; iout: number; nodes: Record<string, number>; devices: DeviceReport[];
}

function message(err: unknown): string { return err instanceof Error ? err.message : String(err); }

/** Solve the DC point with the output node held at vout (absolute V). Never throws.
 *  ΔVT (V) adds to a device's threshold magnitude, Δβ/β scales its β. A wide-swing mirror
 *  without `vbias` uses the nominal (unperturbed) pick: the bias comes from elsewhere. */
export function solveAt(ctx: MirrorContext, vout: number, perturb?: Perturbation): OperatingPoint {
  try {
    const mc = buildMirror(ctx, vout, vbiasFor(ctx)?.vbias, perturb);
    const r = solveMirror(mc);
    const op: OperatingPoint = {
      converged: r.converged, iterations: r.iterations, residual: r.residual,
      iin: mc.iin(), iout: outputCurrent(mc), nodes: nodeVoltages(mc), devices: shownDevices(mc, deviceReports(mc)),
    };
    if (r.note) op.solveNote = r.note;
    return op;
  } catch (err) {
    return { converged: false, iterations: 0, residual: NaN, solveNote: `internal error: ${message(err)}`, iin: NaN, iout: NaN, nodes: {}, devices: [] };
  }
}

/** Every figure of design §4 at the nominal output voltage; curve when opts.curve. Never throws. */
export function measureMirror(ctx: MirrorContext, opts?: MeasureOptions): MirrorReport {
  try {
    return measure(ctx, opts);
  } catch (err) {
    return failedReport(ctx, `internal error: ${message(err)}`);
  }
}

/** measureMirror in parts for a network member, and its own drift and noise alone for a member
 *  alike (repeats.ts). Never throws. */
function memberMeasure(ctx: MirrorContext, opts: MeasureOptions): MemberMeasure {
  return {
    parts: () => {
      try { return measureParts(ctx, opts); } catch (err) { return { report: failedReport(ctx, `internal error: ${message(err)}`) }; }
    },
    joint: () => {
      try { return memberJoint(ctx, opts); } catch { return undefined; }
    },
  };
}

/** Iout and Rout (linearized) at each vout; warm-starts neighbouring solves. */
export function sweepVout(ctx: MirrorContext, vouts: number[]): CurvePoint[] {
  try {
    const vNom = nominalVout(ctx);
    const mc = buildMirror(ctx, vNom, vbiasFor(ctx)?.vbias);
    const r = solveMirror(mc);
    return sweepCircuit(mc, vouts, vNom, r.converged ? mc.ws.v.slice() : undefined);
  } catch {
    return vouts.map((vout) => ({ vout, iout: NaN, rout: NaN, converged: false }));
  }
}

/** All mirrors and all outputs of a spec, in order. Identical mirrors are solved once
 *  (repeats.ts) unless opts.repeats is false (the engine benchmark); with `units`, a mirror
 *  solved by an earlier analysis in the same context is not solved again. */
export function analyzeSpec(spec: ResolvedSpec, opts?: { curve?: boolean; repeats?: boolean; units?: SolvedUnits }): MirrorReport[] {
  const reports: MirrorReport[] = [];
  // The settings a report is computed with join its key in the store (every option but the store's own).
  const { units, repeats: _, ...settings } = opts ?? {};
  const repeats = opts?.repeats === false ? undefined : new RepeatedMirrors(opts?.curve === true, spec, units, settings);
  for (const mirror of spec.mirrors ?? []) {
    const outputs = mirror.kind === 'netlist' ? undefined : mirror.outputs;
    // Defensive: a malformed mirror (a defect upstream) has no input to read; measureMirror reports it.
    const linked = mirror.kind !== 'netlist' && (mirror.input as { kind?: string } | undefined)?.kind === 'link';
    const n = Array.isArray(outputs) ? Math.max(1, outputs.length) : 1;
    for (let j = 0; j < n; j++) {
      const ctx: MirrorContext = { spec, mirror, outputIndex: j };
      const mo: MeasureOptions = { curve: opts?.curve };
      reports.push(repeats ? repeats.report(ctx, () => measureMirror(ctx, mo), linked ? memberMeasure(ctx, mo) : undefined) : measureMirror(ctx, mo));
    }
  }
  return reports;
}
