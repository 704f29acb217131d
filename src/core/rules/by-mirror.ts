/**
 * Each mirror's design findings, with their verified fixes, kept across analyses of one file (the
 * editor analyses on every keystroke): a keystroke in one mirror finds and verifies that mirror's
 * findings again and reads the others' back, moved to where their mirror now starts.
 *
 * What a mirror's findings depend on is its key: the mirror's index and item text (by digest), its network
 * (`linkedInputs`: every member as resolved and the joint solution), everything outside the items
 * (`recheckContext`: the data beside `mirrors`, the resolved spec but its mirrors, every mirror's
 * name, kind and polarities), the text above the first item (a fix's edit there keeps its
 * position), and the analysis settings. An unlinked mirror is resolved from its item and that
 * context alone (elaboration, design targets), so its reports are too. Two things are shared by the whole file and checked on reuse, not keyed: the
 * re-check budget (rules/index.ts: a mirror's fixes are the same when the budget never ran out
 * on it, or it starts at the same count) and the whole-file re-checks of spec-wide fixes (the
 * EKV model, a param: their result reads every mirror, so each is looked up again and must answer
 * as it did). A mirror whose findings reach elsewhere (a range in another item or below the
 * list), that re-read its fixes on the whole text, or whose verification ran past the clock, is
 * found again every time. The report equals a fresh one: test/core/incremental.test.ts.
 */
import type { Finding, MirrorReport, Range } from '../types';
import type { Draft, FixPlan, RuleContext } from './model';
import { accepts, recheck, recheckContext, wholeMirrorRechecks, type Baseline, type Detect, type Found, type Recheck, type RecheckStore } from './verify';
import { canonicalJson, digest } from '../canonical';
import { linkedInputs } from '../analysis/repeats';
import { LineIndex } from '../text/lines';
import { SweptMap } from '../swept-map';
import type { MirrorFragments } from '../spec/fragment';

/** A whole-file re-check of a spec-wide fix, as one mirror's findings asked for it. */
interface SpecQuery {
  id: string;
  /** Another finding had asked for it first (no budget spent). */
  hit: boolean;
  draftKey: string;
  mirrorIndex: number;
  /** What the finding made of it (accepted, or why not). */
  outcome: string;
}

interface Entry {
  /** The findings as JSON, lines of ranges inside the item counted from its first line. */
  findings: string;
  /** Per range (rangesOf order): counted from the item's first line. */
  relative: boolean[];
  /** Keys of its error drafts (every fix's baseline). */
  errors: string[];
  /** Re-check budget left when it began, spent on it, and whether it ran out. */
  left: number;
  spent: number;
  blocked: boolean;
  queries: SpecQuery[];
  /** Local re-checks it read (kept for the next analysis as if read again). */
  rechecks: string[];
  /** The findings as last placed, and the item's first line then: read back at the same line,
   *  they are those objects again (findings are values nothing changes once made). */
  placed?: { first: number; findings: Finding[] };
}

/** Each mirror's findings by key (above); what an analysis did not use is dropped after it. */
export class MirrorFindings {
  private readonly known = new SweptMap<string, Entry>();
  /** What the quick detect of a whole-file re-check found in each mirror (no ranges: nothing moves). */
  private readonly quick = new SweptMap<string, Found[]>();
  /** Of the last analysis: mirrors whose findings were found, and read back. */
  foundNow = 0;
  reusedNow = 0;

  begin(): void {
    this.known.begin();
    this.quick.begin();
    this.foundNow = 0;
    this.reusedNow = 0;
  }

  sweep(): void {
    this.known.sweep();
    this.quick.sweep();
  }

  /**
   * The drafts a whole-file re-check finds (`detect` in its quick form, which plans no fix), each
   * mirror's read back by the same key as its findings; undefined when the edited spec's items
   * are not known (then the caller detects them all). `items`: where the edited text's items are
   * written (the edited text's own fragments, or the original's when the edit lies outside them).
   */
  found(rc: RuleContext, detect: Detect, items: MirrorFragments | undefined): Found[] | undefined {
    const frags = items;
    const groups = frags && frags.lineSpan(0) ? mirrorGroups(rc.reports) : undefined;
    if (!frags || !groups) return undefined;
    const context = digest(canonicalJson([recheckContext(rc), 'quick']));
    const linked = linkedInputs(rc.spec);
    const unlinked = `\u0000${context}`;
    const out: Found[] = [];
    for (const g of groups) {
      const group = linked.get(g.mirrorIndex);
      const key = frags.itemKey(g.mirrorIndex, group === undefined ? unlinked : `${group}${unlinked}`);
      const kept = key === undefined ? undefined : this.quick.get(key);
      if (kept) {
        out.push(...kept);
        continue;
      }
      const found = detect({ ...rc, reports: g.reports }).map((d) => ({ key: d.key, error: d.finding.severity === 'error', mirrorIndex: d.mirrorIndex }));
      if (key !== undefined) this.quick.set(key, found);
      out.push(...found);
    }
    return out;
  }

  get size(): number {
    return this.known.size;
  }

  get(key: string): Entry | undefined {
    return this.known.get(key);
  }

  set(key: string, e: Entry): void {
    this.known.set(key, { ...e });
  }
}

/** The memo of re-checks of one runRules (rules/index.ts), telling which spec-wide ones a finding asks for. */
export class RecordingMemo extends Map<string, Recheck> {
  log?: SpecQuery[];
  current?: Draft;
  baseline?: Baseline;
  private asked?: { id: string; hit: boolean };

  override has(id: string): boolean {
    const hit = super.has(id);
    this.asked = { id, hit };
    return hit;
  }

  override get(id: string): Recheck {
    const after = super.get(id);
    if (this.log && this.current && this.baseline && id.startsWith('spec:')) {
      const hit = this.asked?.id === id ? this.asked.hit : true;
      this.log.push({ id, hit, draftKey: this.current.key, mirrorIndex: this.current.mirrorIndex, outcome: outcomeOf(after, this.current.key, this.current.mirrorIndex, this.baseline) });
    }
    return after;
  }
}

function outcomeOf(after: Recheck, draftKey: string, mirrorIndex: number, baseline: Baseline): string {
  if (!Array.isArray(after)) return JSON.stringify(after ?? null);
  const plan = { scope: 'spec', mirrorIndex } as FixPlan;
  return accepts(after, { key: draftKey } as Draft, plan, baseline) ? 'accepted' : 'refused';
}

export interface MirrorRun {
  store: MirrorFindings;
  recheckStore: RecheckStore;
  /** The analysis settings (the reports' options). */
  settings: string;
  detect: Detect;
  /** Finds one draft's fixes with the run's memo and budget (rules/index.ts `finish`). */
  finish: (d: Draft, baseline: Baseline) => Finding;
  memo: RecordingMemo;
  budget: { left: number; chars: number; deadline: number; now: () => number };
  specErrors: number;
}

interface Group { mirrorIndex: number; reports: MirrorReport[]; key?: string; first?: number; last?: number; entry?: Entry; drafts?: Draft[] }

/** The reports by mirror, in order; undefined when a mirror's reports are not together. */
function mirrorGroups(reports: MirrorReport[]): Group[] | undefined {
  const groups: Group[] = [];
  const seen = new Set<number>();
  for (const r of reports) {
    const last = groups[groups.length - 1];
    if (last && last.mirrorIndex === r.mirrorIndex) { last.reports.push(r); continue; }
    if (seen.has(r.mirrorIndex)) return undefined;
    seen.add(r.mirrorIndex);
    groups.push({ mirrorIndex: r.mirrorIndex, reports: [r] });
  }
  return groups;
}

/** Every finding of runRules, mirror by mirror, read back where the key allows; undefined when the spec does not allow it. */
export function findingsByMirror(rc: RuleContext, run: MirrorRun): Finding[] | undefined {
  const frags = rc.fragments;
  const top = frags?.lineSpan(0);
  if (!frags || !top) return undefined;
  const groups: Group[] | undefined = mirrorGroups(rc.reports);
  if (!groups) return undefined;
  const lines = LineIndex.of(rc.parsed.text);
  const header = rc.parsed.text.slice(0, lines.offset({ line: top.first, character: 0 }));
  // recheckContext(rc), computed once for the run's local re-checks.
  const context = digest(canonicalJson([run.recheckStore.context, header, run.settings]));
  const linked = linkedInputs(rc.spec);
  const unlinked = `\u0000${context}`;
  const errors = new Set<string>();
  for (const g of groups) {
    const span = frags.lineSpan(g.mirrorIndex);
    const group = linked.get(g.mirrorIndex);
    const key = frags.itemKey(g.mirrorIndex, group === undefined ? unlinked : `${group}${unlinked}`);
    if (span && key !== undefined) {
      g.first = span.first;
      g.last = span.last;
      g.key = key;
      g.entry = run.store.get(g.key);
    }
    if (g.entry) for (const k of g.entry.errors) errors.add(k);
    else {
      g.drafts = run.detect({ ...rc, reports: g.reports });
      for (const d of g.drafts) if (d.finding.severity === 'error') errors.add(d.key);
    }
  }
  const baseline: Baseline = { specErrors: run.specErrors, errors };
  run.memo.baseline = baseline;
  const out: Finding[] = [];
  for (const g of groups) {
    const again = g.entry && reuse(rc, run, g.entry, baseline);
    if (again) {
      run.store.reusedNow++;
      out.push(...placed(g.entry!, g.first!));
      continue;
    }
    run.store.foundNow++;
    const drafts = g.drafts ?? run.detect({ ...rc, reports: g.reports });
    const left = run.budget.left;
    const whole = wholeMirrorRechecks();
    const queries: SpecQuery[] = [];
    const rechecks: string[] = [];
    run.memo.log = queries;
    run.recheckStore.rechecks.log = rechecks;
    const found: Finding[] = [];
    for (const d of drafts) {
      run.memo.current = d;
      found.push(run.finish(d, baseline));
    }
    run.memo.log = undefined;
    run.memo.current = undefined;
    run.recheckStore.rechecks.log = undefined;
    out.push(...found);
    if (g.key === undefined || wholeMirrorRechecks() !== whole || run.budget.now() >= run.budget.deadline) continue;
    const kept = relative(found, g.first!, g.last!, top.first);
    if (!kept) continue;
    run.store.set(g.key, {
      ...kept, errors: drafts.filter((d) => d.finding.severity === 'error').map((d) => d.key),
      left, spent: left - run.budget.left, blocked: run.budget.left <= 0, queries, rechecks,
    });
  }
  return out;
}

/** Reads a mirror's kept findings back when the file's shared state lets them stand: the budget, and every spec-wide re-check answering as before. */
function reuse(rc: RuleContext, run: MirrorRun, e: Entry, baseline: Baseline): boolean {
  const left = run.budget.left;
  if (run.budget.now() >= run.budget.deadline) return false;
  if (e.blocked ? left !== e.left : left - e.spent < 1) return false;
  const added: string[] = [];
  const ok = e.queries.every((q) => {
    const hit = Map.prototype.has.call(run.memo, q.id);
    if (hit !== q.hit) return false;
    if (!hit) {
      // A whole-file re-check spends the file's character budget here as it would in finish.
      if (run.budget.chars < rc.parsed.text.length) return false;
      run.budget.chars -= rc.parsed.text.length;
      const plan: FixPlan = { title: '', edits: JSON.parse(q.id.slice('spec:'.length)) as FixPlan['edits'], scope: 'spec', mirrorIndex: q.mirrorIndex, family: '' };
      Map.prototype.set.call(run.memo, q.id, recheck(rc, plan, baseline, run.detect, run.recheckStore));
      added.push(q.id);
    }
    return outcomeOf(Map.prototype.get.call(run.memo, q.id) as Recheck, q.draftKey, q.mirrorIndex, baseline) === q.outcome;
  });
  if (!ok) {
    for (const id of added) Map.prototype.delete.call(run.memo, id);
    return false;
  }
  run.budget.left = left - e.spent;
  for (const k of e.rechecks) run.recheckStore.rechecks.get(k);
  return true;
}

function* rangesOf(fs: Finding[]): Generator<Range> {
  for (const f of fs) {
    yield f.range;
    for (const r of f.related ?? []) yield r.range;
    for (const fix of f.fixes ?? []) for (const e of fix.edits) yield e.range;
  }
}

/** The findings with ranges inside the item counted from its first line; undefined when one reaches below the header elsewhere. */
function relative(found: Finding[], first: number, last: number, headerEnd: number): { findings: string; relative: boolean[] } | undefined {
  const copy = JSON.parse(JSON.stringify(found)) as Finding[];
  const flags: boolean[] = [];
  for (const r of rangesOf(copy)) {
    if (r.start.line >= first && r.end.line <= last) {
      r.start.line -= first;
      r.end.line -= first;
      flags.push(true);
    } else if (r.end.line < headerEnd) {
      flags.push(false);
    } else {
      return undefined;
    }
  }
  return { findings: JSON.stringify(copy), relative: flags };
}

function placed(e: Entry, first: number): Finding[] {
  if (e.placed?.first === first) return e.placed.findings;
  const fs = JSON.parse(e.findings) as Finding[];
  e.placed = { first, findings: fs };
  let k = 0;
  for (const r of rangesOf(fs)) {
    if (e.relative[k++]) {
      r.start.line += first;
      r.end.line += first;
    }
  }
  return fs;
}
