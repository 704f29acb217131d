/**
 * A fix is offered only if it works: apply its edits to the text, re-read it, re-solve the mirror
 * it touches (or the whole file, for a process edit), and check that its finding is gone and no
 * error appeared that was not there before.
 *
 * Re-reading is local when it can be (spec/fragment.ts): a fix inside one mirror of a plain spec
 * re-reads that mirror's lines alone, validates and elaborates the data with that mirror
 * replaced, and re-solves it — the same elaborator and solver on the same data as a whole-file
 * re-read, at a fraction of the cost. Otherwise the whole edited text is parsed again.
 *
 * What a local re-check finds depends only on the mirror's item before and after the edit and on
 * what lies outside every item (`recheckContext`), and for a linked mirror on its network: a `Rechecks` store kept across analyses of
 * one file answers it again without a parse or a solve while the designer types elsewhere.
 */
import type { MirrorReport, Requirements, ResolvedMirror, ResolvedSpec, TextEdit } from '../types';
import { fromRead, looksJson, type ParsedSpec } from '../spec/index';
import { resolveParsed, resolveText } from '../resolve';
import { elaborate } from '../spec/elaborate';
import { FindingSink } from '../spec/findings';
import { MirrorFragments, SplicedSourceMap } from '../spec/fragment';
import { provisionalLinks } from '../network/index';
import { solveEditedNetworks } from '../network/edited';
import { isRecord } from '../spec/params';
import { validateSchema } from '../spec/schema';
import { YamlSourceMap } from '../spec/source-map';
import { analyzeSpec } from '../analysis/index';
import { clockFree, linkedInputs, type SolvedUnits } from '../analysis/repeats';
import type { ParseCache } from '../spec/incremental';
import { canonicalJson, digest } from '../canonical';
import { applyDesignTargets } from '../design/auto-size';
import { measure } from '../sizing/devices';
import { applyEdits } from '../text/edits';
import { LineIndex } from '../text/lines';
import type { Draft, FixPlan, RuleContext } from './model';
import { untrustedMove } from './trust';
import { mirrorAt } from '../mirror-at';
import { SweptMap } from '../swept-map';

export type Detect = (rc: RuleContext) => Draft[];

export interface Baseline {
  /** Error-severity spec findings of the original parse. */
  specErrors: number;
  /** Keys of error drafts of the original run. */
  errors: Set<string>;
}

/** Every output of one mirror of a spec, with the drift figures its requirements ask for: the
 *  re-check's quick rules read no other. */
function reportsOfMirror(spec: ResolvedSpec, mirrorIndex: number): MirrorReport[] | undefined {
  const m = mirrorAt(spec, mirrorIndex);
  if (!m) return undefined;
  const n = m.kind === 'netlist' ? 1 : m.outputs.length;
  const out: MirrorReport[] = [];
  for (let j = 0; j < n; j++) {
    const r = measure(spec, mirrorIndex, j, 'requirements');
    if (!r) return undefined;
    out.push(r);
  }
  return out;
}

/** Whether the re-check's measurements of mirror `i` (reportsOfMirror) read its network beyond
 *  the mirror handed on: a drift figure a requirement asks for is measured through the joint
 *  circuit of the spec's described networks (analysis/measure.ts, network/drift.ts). */
function readsNetwork(spec: ResolvedSpec, i: number): boolean {
  const m = mirrorAt(spec, i);
  if (!m) return true;
  const asks = (r: Requirements | undefined) => r?.tc !== undefined || r?.noise !== undefined || r?.supplySensitivity !== undefined;
  return m.kind === 'netlist' ? asks(m.require) : m.outputs.some((o) => asks(o.require));
}

/** A fix whose re-solve puts a square-law device below IC 1, where the numbers that verified it are not true. */
export interface Untrusted { untrusted: string; ic: number }

/** What `accepts` reads of a draft found in the edited text. */
export interface Found { key: string; error: boolean; mirrorIndex: number }

export type Recheck = Found[] | Untrusted | undefined;

/** What re-checks may keep across analyses of one file: local re-checks, and solved reports. */
export interface RecheckStore {
  rechecks: Rechecks;
  /** recheckContext of the file being analysed. */
  context: string;
  units?: SolvedUnits;
  parses?: ParseCache;
  /** The quick detect of a whole-file re-check, mirror by mirror from earlier analyses (rules/by-mirror.ts). */
  found?: (rc: RuleContext, detect: Detect, items: MirrorFragments | undefined) => Found[] | undefined;
}

/** Local re-check results kept across analyses of one file; entries one analysis did not use are
 *  dropped after it (`sweep`). */
export class Rechecks {
  /** 'whole': the re-check of that key is not local (the whole text is read again every time). */
  private readonly known = new SweptMap<string, { found: Recheck | 'whole' }>();
  /** Of the last analysis: local re-checks run, and read back. */
  runNow = 0;
  reusedNow = 0;
  /** While set, every key read or written (rules/by-mirror.ts keeps them with a mirror's findings). */
  log?: string[];

  begin(): void {
    this.known.begin();
    this.runNow = 0;
    this.reusedNow = 0;
  }

  get(key: string): { found: Recheck | 'whole' } | undefined {
    const e = this.known.get(key);
    if (e) { this.reusedNow++; this.log?.push(key); }
    return e;
  }

  set(key: string, found: Recheck | 'whole'): void {
    this.runNow++;
    this.log?.push(key);
    this.known.set(key, { found });
  }

  sweep(): void {
    this.known.sweep();
  }

  get size(): number {
    return this.known.size;
  }
}

/**
 * Everything outside the mirror items that a local re-check reads, as one digest: the data beside
 * `mirrors`, the resolved spec but its mirrors (process with its flavours and tables, supplies,
 * limits, params, corners, the solved networks, and whatever else it holds, serialised whole:
 * canonical.ts), every mirror's name, kind and polarities (elaboration checks names and the
 * polarities the process must describe), the file's kind and name.
 */
export function recheckContext(rc: RuleContext): string {
  const data = rc.parsed.data;
  const root = isRecord(data) ? { ...data, mirrors: undefined } : undefined;
  return digest(canonicalJson([root, { ...rc.spec, mirrors: undefined }, mirrorsDigest(rc.spec.mirrors), rc.json, rc.file]));
}

/** The digest of every mirror's [name, kind, polarities] in canonical JSON, each mirror's written
 *  once per mirror object (a value the next parse hands on); the last list's digest is kept, as a
 *  keystroke changes none of them. */
function mirrorsDigest(mirrors: readonly ResolvedMirror[]): string {
  const parts = mirrors.map(namesOf);
  const last = lastMirrors;
  if (last && last.parts.length === parts.length && parts.every((p, k) => p === last.parts[k])) return last.digest;
  lastMirrors = { parts, digest: digest(`[${parts.join(',')}]`) };
  return lastMirrors.digest;
}
let lastMirrors: { parts: string[]; digest: string } | undefined;

/** canonicalJson of a mirror's name, kind and polarities (recheckContext), once per mirror object. */
function namesOf(m: ResolvedMirror): string {
  let s = names.get(m);
  if (s === undefined) names.set(m, s = canonicalJson([m.name, m.kind, m.kind === 'netlist' ? m.devices.map((d) => d.type) : m.type]));
  return s;
}
const names = new WeakMap<ResolvedMirror, string>();

function found(drafts: Draft[]): Found[] {
  return drafts.map((d) => ({ key: d.key, error: d.finding.severity === 'error', mirrorIndex: d.mirrorIndex }));
}

/**
 * Re-check the text with the plan applied: the drafts found there, Untrusted when the square
 * law no longer holds for a device the fix moved (rules/trust.ts), or undefined when the text no
 * longer parses cleanly.
 */
export function recheck(rc: RuleContext, plan: FixPlan, baseline: Baseline, detect: Detect, store?: RecheckStore): Recheck {
  try {
    const key = store && localKey(rc, plan, store.context);
    const kept = key === undefined ? undefined : store!.rechecks.get(key);
    if (kept && kept.found !== 'whole') return kept.found;
    const text = applyEdits(rc.parsed.text, plan.edits);
    const solved = { clockFree: true };
    const local = !kept && rc.fragments && plan.scope === 'mirror' ? recheckMirror(rc, plan, text, detect, solved) : WHOLE;
    if (key !== undefined && !kept && solved.clockFree) store!.rechecks.set(key, local === WHOLE ? 'whole' : local);
    return local === WHOLE ? recheckWhole(rc, plan, text, baseline, detect, store) : local;
  } catch {
    return undefined;
  }
}

/**
 * The key of a plan's local re-check: its mirror's index and item before and after the edit, and
 * the context outside the items. Undefined when the re-check cannot be local (then it is never
 * kept: it reads the whole file).
 */
function localKey(rc: RuleContext, plan: FixPlan, context: string): string | undefined {
  const frags = rc.fragments;
  if (!frags || plan.scope !== 'mirror' || !localPossible(rc) || !frags.holds(plan.mirrorIndex, plan.edits)) return undefined;
  const item = frags.itemTexts(plan.mirrorIndex, plan.edits);
  // The mirror as resolved, and for a linked one every member of its network as resolved and the
  // joint solution: the re-check solves that network again with this mirror edited.
  const resolved = canonicalJson(mirrorAt(rc.spec, plan.mirrorIndex) ?? null);
  const linked = linkedInputs(rc.spec).get(plan.mirrorIndex) ?? '';
  return item && `${plan.mirrorIndex}\u0000${item.original}\u0000${item.edited}\u0000${resolved}\u0000${linked}\u0000${context}`;
}

/** The original spec reads without error and its data lists every mirror: the preconditions of a local re-read. */
function localPossible(rc: RuleContext): boolean {
  const data = rc.parsed.data;
  return isRecord(data) && Array.isArray(data.mirrors) && rc.parsed.source instanceof YamlSourceMap &&
    !rc.parsed.findings.some((f) => f.severity === 'error') && data.mirrors.length === rc.spec.mirrors.length;
}

/** Untrusted when the edited spec is square law and a device moved below IC 1. */
function trusted(rc: RuleContext, spec: ResolvedSpec, reports: MirrorReport[]): Untrusted | undefined {
  if (spec.process.model !== 'square-law') return undefined;
  const d = untrustedMove(rc.reports, reports);
  return d ? { untrusted: d.name, ic: d.ic } : undefined;
}

/** Mirror-scoped re-checks read on the whole text so far: their result reads every mirror (rules/by-mirror.ts keeps no findings that asked for one). */
let wholeForMirror = 0;

export function wholeMirrorRechecks(): number {
  return wholeForMirror;
}

function recheckWhole(rc: RuleContext, plan: FixPlan, text: string, baseline: Baseline, detect: Detect, store?: RecheckStore): Recheck {
  if (plan.scope === 'mirror') wholeForMirror++;
  const units = store?.units;
  // Limits may carry front-end defaults (the editor's margin); a fix never edits them. Sizes
  // written `auto` are sized again, as the analysis sizes them (a vbias fix moves them).
  const opts = { limits: rc.spec.limits, ...(rc.parsed.tables ? { tables: rc.parsed.tables } : {}) };
  // An edit outside every mirror (the EKV fix) re-reads the lines before the mirrors alone; its
  // spec findings are only counted, so they are placed on the original's tree as a local re-check's
  // are. The mirrors the designer did not edit since the last analysis keep their elaborations
  // from that analysis's re-check of the same fix. Otherwise the edited text of the last analysis
  // with the same fix differs by the designer's edit since: the file's parse cache reads only
  // what changed (spec/incremental.ts).
  const slot = `fix ${plan.scope === 'spec' ? '' : plan.mirrorIndex} ${JSON.stringify(plan.edits)}`;
  const outside = rc.fragments && localPossible(rc) ? rc.fragments.readOutside(text, plan.edits, store?.parses?.lastOutside(slot)) : undefined;
  const base = rc.parsed.source as YamlSourceMap;
  const json = looksJson(text, rc.file);
  const { parsed } = !outside ? resolveText(text, rc.file, { ...opts, ...(store?.parses ? { parses: { cache: store.parses, slot } } : {}) })
    : resolveParsed(store?.parses ? store.parses.fromOutside(slot, text, outside, base, json, opts)
      : fromRead(text, outside.read, { source: outside.source, findings: base }, json, opts), opts);
  const spec = parsed.spec;
  if (!parsed.parsed || !spec) return undefined;
  if (parsed.findings.filter((f) => f.severity === 'error').length > baseline.specErrors) return undefined;
  if (spec.mirrors.length !== rc.spec.mirrors.length) return undefined;
  // A process edit (the EKV fix) solves every mirror in the new process: kept by solve unit too.
  const reports = plan.scope === 'spec' ? analyzeSpec(spec, { units }) : reportsOfMirror(spec, plan.mirrorIndex);
  if (!reports) return undefined;
  const quick: RuleContext = { ...rc, parsed, spec, reports, quick: true };
  if (store?.found && plan.scope === 'spec') {
    const untrusted = trusted(rc, spec, reports);
    if (untrusted) return untrusted;
    quick.fragments = MirrorFragments.of(parsed);
    // Read outside the items, the edited text's items are the original's, as written.
    return store.found(quick, detect, outside ? rc.fragments : quick.fragments) ?? found(detect(quick));
  }
  return trusted(rc, spec, reports) ?? found(detect(quick));
}

const WHOLE = Symbol('re-read the whole text');

/**
 * The local re-check of a mirror-scoped plan, or WHOLE when it cannot be done locally. The original
 * spec had no error (it has a resolved spec), so the edited one is usable exactly when reading
 * the edited mirror adds none.
 */
function recheckMirror(rc: RuleContext, plan: FixPlan, text: string, detect: Detect, solved: { clockFree: boolean }): Recheck | typeof WHOLE {
  const frags = rc.fragments;
  const i = plan.mirrorIndex;
  const data = rc.parsed.data;
  const base = rc.parsed.source;
  if (!frags || !isRecord(data) || !Array.isArray(data.mirrors) || !(base instanceof YamlSourceMap)) return WHOLE;
  if (rc.parsed.findings.some((f) => f.severity === 'error') || data.mirrors.length !== rc.spec.mirrors.length) return WHOLE;
  if (!frags.holds(i, plan.edits)) return WHOLE;
  const frag = frags.readEdits(i, plan.edits);
  const span = frags.lineSpan(i);
  if (!frag || !span) return WHOLE;
  const sink = new FindingSink(base);
  // Structure: the root as it was, with this mirror as its only one (only "any error?" matters).
  validateSchema({ ...data, mirrors: [frag.data] }, sink);
  if (sink.errorCount > 0) return undefined;
  const items = data.mirrors.map((m: unknown, k: number) => (k === i ? frag.data : m));
  const read = elaborate({ ...data, mirrors: items }, sink, { items: data.mirrors, mirrors: rc.spec.mirrors, except: i, relink: true }, rc.parsed.tables);
  if (!read || sink.errorCount > 0 || read.mirrors.length !== rc.spec.mirrors.length) return undefined;
  // A linked mirror is re-solved with its whole network, as the whole-file re-read solves it (its
  // findings need no chain sigma), from the analysis's own solve of it (network/edited.ts).
  // Unless its measurements read the network (a drift requirement), only this mirror is handed on.
  const whole = readsNetwork(read, i);
  const linked = provisionalLinks({ ...read, limits: rc.spec.limits }, whole ? {} : { only: i });
  const spec = solveEditedNetworks(applyDesignTargets(linked, i).spec, i, rc.spec, whole ? {} : { only: 'edited' });
  const reports = reportsOfMirror(spec, i);
  if (!reports) return undefined;
  // A solve its time budget decided is not kept for another analysis (analysis/repeats.ts).
  solved.clockFree = reports.every(clockFree);
  const untrusted = trusted(rc, spec, reports);
  if (untrusted) return untrusted;
  const lineDelta = addedLines(rc.parsed.text, plan.edits);
  const source = new SplicedSourceMap(base, i, frag, span.last, lineDelta, text);
  const parsed: ParsedSpec = { text, parsed: true, findings: sink.list, source, json: rc.parsed.json, data: { ...data, mirrors: items }, spec };
  return found(detect({ ...rc, parsed, spec, reports, quick: true }));
}

/** Lines the edits add to `text` (or remove, negative): line breaks written minus line breaks
 *  replaced. Edits of one plan never overlap (applyEdits checks), so their counts add. */
function addedLines(text: string, edits: readonly TextEdit[]): number {
  const lines = LineIndex.of(text);
  let n = 0;
  for (const e of edits) {
    for (let i = e.newText.indexOf('\n'); i >= 0; i = e.newText.indexOf('\n', i + 1)) n++;
    n -= lines.lineOf(lines.offset(e.range.end)) - lines.lineOf(lines.offset(e.range.start));
  }
  return n;
}

/** The finding is gone and no error appeared that the original did not have (in the plan's scope). */
export function accepts(after: Recheck, draft: Draft, plan: FixPlan, baseline: Baseline): boolean {
  if (!after || !Array.isArray(after)) return false;
  if (after.some((d) => d.key === draft.key)) return false;
  return !after.some((d) => d.error && !baseline.errors.has(d.key) &&
    (plan.scope === 'spec' || d.mirrorIndex === plan.mirrorIndex));
}
