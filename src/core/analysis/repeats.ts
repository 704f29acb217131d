/**
 * Identical mirrors are solved once per spec. A bias network repeats itself: the same tail
 * source in every channel, the same cascode load in every column. Two mirrors that differ only
 * in their name and place in the file have the same circuit and, within one spec (one process,
 * supply and temperature), the same figures, so the second gets a copy of the first's report
 * with its own identity. A bank's output names stay in the key: they name its devices.
 * The copy shares the first report's devices, nodes and curve: reports are values that nothing
 * changes after analysis.
 *
 * The same holds from one analysis to the next (the editor analyses the file on every
 * keystroke): a `SolvedUnits` store, kept by the caller, holds each solve unit's report under
 * its circuit and everything its solve reads besides (process, supplies, limits: `solveContext`),
 * so an unchanged mirror is not solved again (one whose solve needed a fallback is: its time
 * budget, not its circuit, may have decided the result). Entries an analysis did not use are dropped after it (`sweep`), so the store
 * holds one file's worth.
 */
import { isBank } from '../circuit/templates';
import type { MirrorReport, ResolvedMirror, ResolvedSpec } from '../types';
import { reportIdentity, type ReportIdentity } from './measure';
import type { MirrorContext } from './index';

/** The mirror without what says where it is (paths, its name; an output's name outside a bank). */
function circuitKey(mirror: ResolvedMirror, outputIndex: number, curve: boolean): string {
  const what: Record<string, unknown> = { ...mirror, name: undefined, path: undefined };
  if (mirror.kind !== 'netlist' && Array.isArray(mirror.outputs)) {
    const bank = isBank(mirror);
    what.outputs = mirror.outputs.map((o) => ({ ...o, path: undefined, name: bank ? o.name : undefined }));
  }
  return `${outputIndex}|${curve ? 1 : 0}|${JSON.stringify(what)}`;
}

/**
 * What a mirror's solve reads besides the mirror itself (analysis/, circuit/ and models/ read
 * nothing else of the spec): two mirrors with one circuit and one context have one report.
 */
export function solveContext(spec: ResolvedSpec): string {
  return JSON.stringify([spec.process, spec.supplies, spec.limits]);
}

/** Solved reports kept across analyses of one file, by solve unit (see above). */
export class SolvedUnits {
  private readonly solved = new Map<string, { report: MirrorReport; used: number }>();
  private generation = 0;
  /** Of the last analysis: reports solved, and reports read back. */
  solvedNow = 0;
  reusedNow = 0;

  /** Starts an analysis: what it does not use is dropped by the next `sweep`. */
  begin(): void {
    this.generation++;
    this.solvedNow = 0;
    this.reusedNow = 0;
  }

  get(key: string): MirrorReport | undefined {
    const e = this.solved.get(key);
    if (!e) return undefined;
    e.used = this.generation;
    this.reusedNow++;
    return e.report;
  }

  set(key: string, report: MirrorReport): void {
    this.solvedNow++;
    this.solved.set(key, { report, used: this.generation });
  }

  /** Drops every report the last analysis did not use. */
  sweep(): void {
    for (const [k, e] of this.solved) if (e.used !== this.generation) this.solved.delete(k);
  }

  get size(): number {
    return this.solved.size;
  }
}

export class RepeatedMirrors {
  private readonly solved: Map<string, MirrorReport> | SolvedUnits;
  private readonly context: string;

  /** `units`: the store kept across analyses (the spec's solve context joins each key). */
  constructor(private readonly curve: boolean, spec?: ResolvedSpec, units?: SolvedUnits) {
    this.solved = units ?? new Map<string, MirrorReport>();
    this.context = units && spec ? `${solveContext(spec)}|` : '';
  }

  /** The report of ctx: measured by `measure` the first time its circuit is seen, copied after. */
  report(ctx: MirrorContext, measure: () => MirrorReport): MirrorReport {
    const key = this.context + circuitKey(ctx.mirror, ctx.outputIndex, this.curve);
    const known = this.solved.get(key);
    if (!known) {
      const r = measure();
      if (!(this.solved instanceof SolvedUnits)) {
        this.solved.set(key, r);
        return r;
      }
      // Kept for later analyses only when its clock could not matter (`clockFree`). The stored
      // report is never handed out itself: the next analysis copies it.
      if (clockFree(r)) this.solved.set(key, r);
      return withIdentity({ ...r }, reportIdentity(ctx));
    }
    return withIdentity({ ...known }, reportIdentity(ctx));
  }
}

/**
 * True when the report's operating point came from the plain Newton solve, which ends by its
 * iteration count alone. The fallbacks after it (source and gmin stepping) run against the solve's
 * time budget (circuit/newton.ts): what they give depends on the clock, so it is not kept for
 * another analysis (which would then differ from a fresh one).
 */
export function clockFree(r: MirrorReport): boolean {
  return r.converged && r.solveNote === undefined;
}

function withIdentity(r: MirrorReport, id: ReportIdentity): MirrorReport {
  r.name = id.name;
  r.mirror = id.mirror;
  r.path = id.path;
  r.mirrorIndex = id.mirrorIndex;
  r.outputIndex = id.outputIndex;
  if (id.output !== undefined) r.output = id.output;
  else delete r.output;
  return r;
}

