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
 * keystroke): a `SolvedUnits` store, kept by the caller, holds each solve unit's report under a
 * key of everything it was computed from, each part serialised whole (canonical.ts), so a field
 * the spec gains later is in the key without an edit here: the mirror's circuit, the resolved
 * spec but its mirrors (process with its flavours and tables, supplies, limits, params, corners
 * and whatever else it holds: `solveContext`), the analysis settings, and for a linked mirror
 * every member of its network and the joint solution (`linkedInputs`). An unchanged mirror is not
 * solved again (one whose solve needed a fallback is: its time budget, not its circuit, may have
 * decided the result). Entries an analysis did not use are dropped after it (`sweep`), so the
 * store holds one file's worth.
 */
import { isBank } from '../circuit/templates';
import { clockedSolveCount } from '../circuit/newton';
import { canonicalJson, digest } from '../canonical';
import { indexOf, mirrorAt } from '../mirror-at';
import { SweptMap } from '../swept-map';
import type { MirrorReport, ResolvedMirror, ResolvedSpec, TemplateMirror } from '../types';
import { reportIdentity, type Measured, type ReportIdentity } from './measure';
import { takesVbias } from '../kinds/index';
import type { JointDrift } from '../network/drift';
import type { MirrorContext } from './index';

/** The mirror without what says where it is (paths, its name; an output's name outside a bank),
 *  as a digest: serialised once per mirror object (a resolved mirror is a value nothing changes
 *  after it is read, and the editor's next parse hands on the unedited mirrors' objects:
 *  spec/incremental.ts), so an analysis that solves one mirror keys the others without writing
 *  them out again. */
function circuitKey(mirror: ResolvedMirror, outputIndex: number, curve: boolean): string {
  let known = circuitKeys.get(mirror);
  if (known === undefined) {
    const what: Record<string, unknown> = { ...mirror, name: undefined, path: undefined };
    if (mirror.kind !== 'netlist' && Array.isArray(mirror.outputs)) {
      const bank = isBank(mirror);
      what.outputs = mirror.outputs.map((o) => ({ ...o, path: undefined, name: bank ? o.name : undefined }));
    }
    known = digest(canonicalJson(what));
    circuitKeys.set(mirror, known);
  }
  return `${outputIndex}|${curve ? 1 : 0}|${known}`;
}
const circuitKeys = new WeakMap<ResolvedMirror, string>();

/**
 * A linked member's circuit key without the output that feeds it and the mirrors it feeds (its
 * input kept as the current that arrives, its outputs at their node voltages: network/index.ts
 * handedOn), so that members alike in all else share their own figures
 * (`alikeReport`): a bank feeding identical blocks hands each the same current and holds each at
 * the same voltage. Undefined for any other mirror, and for a member with a `vbias` picked from
 * the spec around it (vbias.ts).
 */
function memberKey(mirror: ResolvedMirror, outputIndex: number, curve: boolean): string | undefined {
  if (mirror.kind === 'netlist' || takesVbias(mirror)) return undefined;
  const m: TemplateMirror = mirror;
  if (m.input.kind !== 'link') return undefined;
  let known = memberKeys.get(mirror);
  if (known === undefined) {
    // JSON.stringify rather than canonical.ts (a network's members cost a thousand keys a run):
    // members are read and handed on by one code path, so alike ones list their fields in one
    // order (another order only misses a share). It writes NaN, ±Infinity and -0 as others, so a
    // member with such a voltage or current is not shared.
    const plain = (x: number | undefined): boolean => x === undefined || (Number.isFinite(x) && !Object.is(x, -0));
    if (!plain(m.input.i) || !m.outputs.every((o) => plain(o.output.v))) return undefined;
    const bank = isBank(m);
    // Which mirror an output feeds is left out too (not whether it feeds one).
    const outputs = m.outputs.map((o) => ({ ...o, path: undefined, name: bank ? o.name : undefined, feeds: o.feeds === undefined ? undefined : -1 }));
    known = digest(JSON.stringify({ ...m, name: undefined, path: undefined, input: { kind: m.input.kind, i: m.input.i }, outputs }));
    memberKeys.set(mirror, known);
  }
  return `${outputIndex}|${curve ? 1 : 0}|${known}`;
}
const memberKeys = new WeakMap<ResolvedMirror, string>();

/** How to measure a network member in parts, and its own drift and noise alone (measure.ts). */
export interface MemberMeasure { parts: () => Measured; joint: () => JointDrift | undefined }

/**
 * A member's report from `like`, a member's measured with the same options whose mirror is its
 * own but for its name, place and the output feeding it (`memberKey`): the same circuit at the
 * same input current and node voltages has the same figures, bit for bit, but its drift and
 * noise, which come through everything above it — those are its own (`joint`). Every field in
 * `like`'s order, so the two read alike. Undefined when either has no joint part or the two
 * differ in which figures it holds.
 */
function alikeReport(like: Measured, joint: () => JointDrift | undefined, id: ReportIdentity): MirrorReport | undefined {
  if (!like.joint) return undefined;
  const own = joint() as Record<string, unknown> | undefined;
  if (!own) return undefined;
  const theirs = like.joint as Record<string, unknown>;
  const keys = Object.keys(own);
  if (keys.length !== Object.keys(theirs).length || keys.some((k) => !(k in theirs))) return undefined;
  // Written key by key (a spread copies every number into a box of its own, which cost more).
  const from = like.report as unknown as Record<string, unknown>;
  const r: Record<string, unknown> = {};
  for (const k in from) r[k] = k in own ? own[k] : from[k];
  return withIdentity(r as unknown as MirrorReport, id);
}
/** Each mirror's last store keys by output (`RepeatedMirrors.keyOf`), with what they were made with. */
const keysOf = new WeakMap<ResolvedMirror, { prefix: string; curve: boolean; keys: string[] }>();

/**
 * A cheap part of circuitKey: equal keys have equal prints, so a mirror whose print no other
 * mirror of the spec has had is solved without its key being written (a linked mirror's is its
 * own: one output feeds one input). Undefined: no print, the key is written.
 */
function circuitPrint(mirror: ResolvedMirror, outputIndex: number): string | undefined {
  if (mirror.kind === 'netlist') return undefined;
  // Defensive: a malformed mirror (a defect upstream) is keyed whole, as it always was.
  const i: typeof mirror.input | undefined = mirror.input;
  if (typeof i !== 'object' || i === null) return undefined;
  return `${outputIndex}|${mirror.kind}|${i.kind === 'link' ? `${i.mirror}:${i.output}` : i.kind}`;
}

/**
 * What a mirror's solve may read besides the mirror itself, as one digest: the resolved spec
 * without its mirrors (each its own unit) and networks (`linkedInputs`), and the settings the
 * analysis was asked for. Two mirrors with one circuit and one context have one report.
 */
function solveContext(spec: ResolvedSpec, settings: object = {}): string {
  return digest(canonicalJson([{ ...spec, mirrors: undefined, networks: undefined }, settings]));
}

/**
 * For each linked mirror (by file index), the digest of its network as solved: every member as
 * resolved and the joint solution. A member's report reads what the joint solve handed it; the
 * whole group is keyed so that an edit of any member solves its network's members again.
 * Computed once per spec.
 */
export function linkedInputs(spec: ResolvedSpec): ReadonlyMap<number, string> {
  let known = linkedBySpec.get(spec);
  if (known) return known;
  known = new Map();
  for (const n of spec.networks ?? []) {
    const d = digest(canonicalJson([n, n.members.map((i) => mirrorAt(spec, i) ?? null)]));
    for (const i of n.members) known.set(i, d);
  }
  linkedBySpec.set(spec, known);
  return known;
}
const linkedBySpec = new WeakMap<ResolvedSpec, Map<number, string>>();

/** A kept report, and the copies of it handed out (`SolvedUnits.read`), each with the last
 *  analysis (generation) that handed it out. */
interface Unit { report: MirrorReport; copies: { report: MirrorReport; used: number }[] }

/** Solved reports kept across analyses of one file, by solve unit (see above). */
export class SolvedUnits {
  private readonly solved = new SweptMap<string, Unit>();
  /** Of the last analysis: reports solved, and reports read back. */
  solvedNow = 0;
  reusedNow = 0;

  /** Starts an analysis: what it does not use is dropped by the next `sweep`. */
  begin(): void {
    this.solved.begin();
    this.solvedNow = 0;
    this.reusedNow = 0;
  }

  /**
   * The kept report of `key` with identity `id`, or undefined. Read back with an identity it had
   * in this analysis or the last, a mirror gets the very copy handed out then (a report is a
   * value nothing changes after the analysis; the analysis copies its reports before adding to
   * them), so a keystroke does not copy 500 reports for each spec it solves.
   */
  read(key: string, id: ReportIdentity): MirrorReport | undefined {
    const u = this.solved.get(key);
    if (!u) return undefined;
    this.reusedNow++;
    const generation = this.solved.generation;
    for (const c of u.copies) {
      if (c.used >= generation - 1 && sameIdentity(c.report, id)) {
        c.used = generation;
        return c.report;
      }
    }
    if (u.copies.length >= 4) u.copies = u.copies.filter((c) => c.used >= generation - 1);
    const report = withIdentity({ ...u.report }, id);
    u.copies.push({ report, used: generation });
    return report;
  }

  set(key: string, report: MirrorReport): void {
    this.solvedNow++;
    this.solved.set(key, { report, copies: [] });
  }

  /** Drops every report the last analysis did not use. */
  sweep(): void {
    this.solved.sweep();
  }

  get size(): number {
    return this.solved.size;
  }
}

export class RepeatedMirrors {
  private readonly solved: Map<string, MirrorReport> | SolvedUnits;
  /** Within one spec (no store): the first mirror of each print, keyed only once a second
   *  mirror has the same print. */
  private readonly printed = new Map<string, { ctx?: MirrorContext; report: MirrorReport }>();
  private readonly context: string;
  /** Network members by memberKey: the first measured of each. */
  private readonly members = new Map<string, Measured>();
  private readonly linked: ReadonlyMap<number, string> | undefined;

  /** `units`: the store kept across analyses (the spec's solve context, the analysis `settings`
   *  and a linked mirror's network join each key). */
  constructor(private readonly curve: boolean, spec?: ResolvedSpec, units?: SolvedUnits, settings: object = { curve }) {
    this.solved = units ?? new Map<string, MirrorReport>();
    this.context = units && spec ? `${solveContext(spec, settings)}|` : '';
    this.linked = units && spec ? linkedInputs(spec) : undefined;
  }

  /** The report of ctx: measured by `measure` the first time its circuit is seen, copied after.
   *  `member`: a linked member's measurement in parts, shared with the members alike. */
  report(ctx: MirrorContext, measure: () => MirrorReport, member?: MemberMeasure): MirrorReport {
    const mk = member && memberKey(ctx.mirror, ctx.outputIndex, this.curve);
    if (mk !== undefined) measure = () => this.member(ctx, mk, member!);
    const print = this.solved instanceof SolvedUnits ? undefined : circuitPrint(ctx.mirror, ctx.outputIndex);
    if (print !== undefined) {
      const first = this.printed.get(print);
      if (!first) {
        const r = measure();
        this.printed.set(print, { ctx, report: r });
        return r;
      }
      if (first.ctx) {
        this.solved.set(this.keyOf(first.ctx), first.report);
        first.ctx = undefined;
      }
    }
    return this.keyed(ctx, measure);
  }

  /** A member's report from the first member alike (its own drift and noise), else measured. */
  private member(ctx: MirrorContext, key: string, m: MemberMeasure): MirrorReport {
    const like = this.members.get(key);
    const alike = like && alikeReport(like, m.joint, reportIdentity(ctx));
    if (alike) return alike;
    const first = m.parts();
    if (!like && first.joint) this.members.set(key, first);
    return first.report;
  }

  private keyOf(ctx: MirrorContext): string {
    const group = this.linked?.get(indexOf(ctx.mirror));
    const prefix = group === undefined ? this.context : `${this.context}${group}|`;
    // The key string itself is kept with the mirror object: a store looks a string up by its
    // hash, which V8 keeps in the string, so an unchanged mirror's key is neither written nor
    // hashed again on the next keystroke.
    let memo = keysOf.get(ctx.mirror);
    if (memo?.prefix !== prefix || memo.curve !== this.curve) keysOf.set(ctx.mirror, memo = { prefix, curve: this.curve, keys: [] });
    return memo.keys[ctx.outputIndex] ??= prefix + circuitKey(ctx.mirror, ctx.outputIndex, this.curve);
  }

  private keyed(ctx: MirrorContext, measure: () => MirrorReport): MirrorReport {
    const key = this.keyOf(ctx);
    if (this.solved instanceof SolvedUnits) {
      const read = this.solved.read(key, reportIdentity(ctx));
      if (read) return read;
    }
    const known = this.solved instanceof SolvedUnits ? undefined : this.solved.get(key);
    if (!known) {
      const clocked = clockedSolveCount();
      const r = measure();
      if (!(this.solved instanceof SolvedUnits)) {
        this.solved.set(key, r);
        return r;
      }
      // Kept for later analyses only when its clock could not matter: no solve of it could be
      // ended by a clock (every template circuit: a failure to converge is then as
      // reproducible as a success), or it converged by plain Newton (`clockFree`). The stored
      // report is never handed out itself: the next analysis copies it.
      if (clockedSolveCount() === clocked || clockFree(r)) this.solved.set(key, r);
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

/** The report carries identity `id` (what withIdentity writes). */
function sameIdentity(r: MirrorReport, id: ReportIdentity): boolean {
  if (r.name !== id.name || r.mirror !== id.mirror || r.mirrorIndex !== id.mirrorIndex || r.outputIndex !== id.outputIndex || r.output !== id.output) return false;
  if (r.path === id.path) return true;
  if (r.path.length !== id.path.length) return false;
  for (let k = 0; k < r.path.length; k++) if (r.path[k] !== id.path[k]) return false;
  return true;
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

