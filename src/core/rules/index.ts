/**
 * Design findings for a parsed, solved spec (design §6): each check turns report numbers into
 * findings at the narrowest source range; each finding's candidate fixes are verified by
 * re-reading and re-solving the edited text (locally where exact: verify.ts), and only verified
 * fixes are offered, the first one preferred.
 */
import type { Finding, Fix, MirrorReport } from '../types';
import type { ParsedSpec } from '../spec/index';
import type { Draft, FixPlan, RuleContext } from './model';
import { keyPath } from './model';
import { isAutoSized, siteOf, type Site } from './sites';
import { MirrorFragments, sharesValues } from '../spec/fragment';
import { accepts, recheck, recheckContext, type Baseline, type Recheck, type Rechecks, type RecheckStore } from './verify';
import type { SolvedUnits } from '../analysis/repeats';
import type { ParseCache } from '../spec/incremental';
import { findingsByMirror, RecordingMemo, type MirrorFindings } from './by-mirror';
import { checkConvergence } from './checks/convergence';
import { checkSaturation } from './checks/saturation';
import { checkRatio } from './checks/ratio';
import { checkCompliance, checkRout, checkSigma } from './checks/requirements';
import { checkFilterNoise, checkNoise, checkSupplySensitivity, checkTc } from './checks/drift';
import { checkHeadroom } from './checks/headroom';
import { checkInversion } from './checks/inversion';
import { checkGeometry } from './checks/geometry';
import { checkStartup } from './checks/startup';
import { checkTableRange } from './checks/table-range';
import { indexOf } from '../mirror-at';

export { type RuleInfo } from './catalog';

/** Upper bound on verified candidates per finding (each costs a parse and a solve). */
const MAX_VERIFICATIONS = 6;

export interface RulesOptions {
  /** Re-checks (parse + solve of an edited text) allowed for the whole file; later findings get no fixes. */
  maxRechecks?: number;
  /** ms for fix verification of the whole file, on the clock `now` (default Date.now); without it
   *  only the count of re-checks bounds the work, so the fixes offered never depend on how busy
   *  the machine is (the CLI in CI and the editor see the same fixes for the same text). */
  budgetMs?: number;
  now?: () => number;
  /**
   * How edited text is re-read to compose and verify fixes: 'local' (default) re-reads only the
   * edited mirror where that is exact (spec/fragment.ts), 'whole-file' always the whole text. Both
   * offer the same fixes (test/fuzz/verify-local.test.ts); 'whole-file' is the reference.
   */
  reread?: 'local' | 'whole-file';
  /** Local re-check results kept from earlier analyses of this file (the editor's worker). */
  rechecks?: Rechecks;
  /** Solved reports kept from earlier analyses (a process fix re-solves every mirror). */
  units?: SolvedUnits;
  /** Earlier parses of this file's texts (a whole-file re-check reads only what changed). */
  parses?: ParseCache;
  /** Each mirror's findings kept from earlier analyses of this file, and the analysis settings. */
  byMirror?: { store: MirrorFindings; settings: string };
}

const DEFAULT_RECHECKS = 120;
/** Characters the whole-file re-checks of one analysis may re-read (4 Mi: about five seconds of
 *  parsing on a quiet machine, some hundred re-checks of an ordinary spec): the bound that keeps
 *  a large file sharing values through aliases in bounded time, counted, so the fixes offered are
 *  the same however busy the machine. */
const WHOLE_FILE_CHARS = 4 * 1024 * 1024;

interface Budget {
  /** Where local re-checks are kept across analyses, with this file's context (verify.ts). */
  store?: RecheckStore;
  left: number;
  /** Characters whole-file re-checks may still re-read. */
  chars: number;
  deadline: number;
  now: () => number;
  /**
   * The spec shares values through aliases: an edit in one mirror's text can change another
   * mirror, so every fix is verified on the whole file (not with auto-sized mirrors, which only
   * the design-target pass sizes).
   */
  widen: () => boolean;
}

/** Every check over every report, without fixes. Never throws: a failing check yields nothing. */
function detect(rc: RuleContext): Draft[] {
  const drafts: Draft[] = [];
  const keys = new Set<string>();
  const inversionSeen = new Set<string>();
  for (const report of rc.reports) {
    const site = siteOf(rc.spec, report);
    if (!site) continue;
    const run = (f: () => Draft[]) => {
      try {
        for (const d of f()) {
          if (keys.has(d.key)) continue; // a reference device shared by a bank's outputs
          keys.add(d.key);
          drafts.push(named(d, site));
        }
      } catch {
        // A check that fails on odd numbers must not cost the other findings.
      }
    };
    // The zero-current state is judged without an operating point: before the convergence gate.
    run(() => checkStartup(rc, site));
    const conv = checkConvergence(rc, site);
    if (conv.length > 0) { run(() => conv); continue; }
    run(() => checkSaturation(rc, site));
    run(() => checkRatio(rc, site));
    run(() => checkRout(rc, site));
    run(() => checkCompliance(rc, site));
    run(() => checkSigma(rc, site));
    run(() => checkNoise(rc, site));
    run(() => checkFilterNoise(rc, site));
    run(() => checkTc(rc, site));
    run(() => checkSupplySensitivity(rc, site));
    run(() => checkHeadroom(rc, site));
    run(() => checkGeometry(rc, site));
    run(() => checkInversion(rc, site, inversionSeen));
    run(() => checkTableRange(rc, site));
  }
  return drafts;
}

/**
 * The message leads with what it is about — the bank output (`tail.lna: …`) for a finding on
 * one output, else the mirror — since the Problems list mixes the findings of many mirrors.
 */
function named(d: Draft, site: Site): Draft {
  const own = keyPath(d.key).includes('outputs') ? site.report.name : site.mirror.name;
  return { ...d, finding: { ...d.finding, message: `${own}: ${d.finding.message}` } };
}

/**
 * Design findings (with verified fixes) for a parsed spec and its reports. Pure, never throws.
 * Fix verification is bounded (RulesOptions) so a huge faulty file still answers promptly: past
 * the budget, findings come without fixes (and with their hint).
 */
export function runRules(parsed: ParsedSpec, reports: MirrorReport[], opts: RulesOptions = {}): Finding[] {
  const spec = parsed.spec;
  if (!spec) return [];
  try {
    const json = parsed.json ?? /^\s*[{[]/.test(parsed.text);
    const rc: RuleContext = { parsed, spec, reports, quick: false, json, file: json ? 'spec.bias.json' : 'spec.bias.yaml' };
    if (opts.reread !== 'whole-file') rc.fragments = MirrorFragments.of(parsed);
    const timed = opts.budgetMs !== undefined;
    const now = timed ? opts.now ?? Date.now : (): number => 0;
    if (opts.byMirror && opts.rechecks && rc.fragments) {
      const memo = new RecordingMemo();
      const budget: Budget = {
        left: opts.maxRechecks ?? DEFAULT_RECHECKS, chars: WHOLE_FILE_CHARS, deadline: timed ? now() + (opts.budgetMs ?? 0) : Infinity, now,
        widen: () => sharesValues(parsed) && !spec.mirrors.some((m) => isAutoSized(spec, indexOf(m))),
        store: { rechecks: opts.rechecks, context: recheckContext(rc), units: opts.units, parses: opts.parses, found: (q, d, items) => opts.byMirror!.store.found(q, d, items) },
      };
      const found = findingsByMirror(rc, {
        store: opts.byMirror.store, recheckStore: budget.store!, settings: opts.byMirror.settings, detect, memo, budget,
        specErrors: parsed.findings.filter((f) => f.severity === 'error').length,
        finish: (d, baseline) => finish(rc, d, baseline, memo, budget),
      });
      if (found) return found;
    }
    const drafts = detect(rc);
    const baseline: Baseline = {
      specErrors: parsed.findings.filter((f) => f.severity === 'error').length,
      errors: new Set(drafts.filter((d) => d.finding.severity === 'error').map((d) => d.key)),
    };
    const memo = new Map<string, Recheck>();
    let widen: boolean | undefined;  // found on the first fix built: a clean file never pays for the walk
    const budget: Budget = {
      left: opts.maxRechecks ?? DEFAULT_RECHECKS, chars: WHOLE_FILE_CHARS, deadline: timed ? now() + (opts.budgetMs ?? 0) : Infinity, now,
      widen: () => (widen ??= sharesValues(parsed) && !spec.mirrors.some((m) => isAutoSized(spec, indexOf(m)))),
    };
    if (opts.rechecks && rc.fragments) budget.store = { rechecks: opts.rechecks, context: recheckContext(rc), units: opts.units, parses: opts.parses };
    return drafts.map((d) => finish(rc, d, baseline, memo, budget));
  } catch {
    return [];
  }
}

function finish(rc: RuleContext, d: Draft, baseline: Baseline, memo: Map<string, Recheck>, budget: Budget): Finding {
  const fixes: Fix[] = [];
  let untrusted: { untrusted: string; ic: number } | undefined;
  if (d.plan && budget.left > 0 && budget.now() < budget.deadline) {
    const families = new Set<string>();
    // A family whose candidate left the square law's ground: its larger steps would too.
    const untrustedFamilies = new Set<string>();
    let tried = 0;
    try {
      const seen = { offered: (f: string) => families.has(f), untrusted: (f: string) => untrustedFamilies.has(f) };
      for (const c of d.plan(seen)) {
        if (families.has(c.family) || untrustedFamilies.has(c.family)) continue;
        if (tried >= MAX_VERIFICATIONS || budget.left <= 0 || budget.now() >= budget.deadline) break;
        const built = c.build();
        if (!built) continue;
        const p: FixPlan = built.scope === 'mirror' && budget.widen() ? { ...built, scope: 'spec' } : built;
        tried++;
        // The same edit answers several findings (the balanced Wilson, the EKV model): re-check once.
        // A whole-file re-check does not depend on the mirror the plan came from.
        const id = p.scope === 'spec' ? `spec:${JSON.stringify(p.edits)}` : `mirror:${p.mirrorIndex}:${JSON.stringify(p.edits)}`;
        if (!memo.has(id)) {
          // A whole-file re-check re-reads the text; a local one a mirror's lines (not counted).
          const whole = p.scope === 'spec' || !rc.fragments;
          if (whole && budget.chars < rc.parsed.text.length) break;
          if (whole) budget.chars -= rc.parsed.text.length;
          budget.left--;
          memo.set(id, recheck(rc, p, baseline, detect, budget.store));
        }
        const after = memo.get(id);
        if (after && !Array.isArray(after)) { untrusted ??= after; untrustedFamilies.add(p.family); }
        if (!accepts(after, d, p, baseline)) continue;
        families.add(p.family);
        fixes.push({ title: p.title, edits: p.edits, ...(fixes.length === 0 ? { preferred: true } : {}) });
      }
    } catch {
      // A solver that fails leaves the fixes found so far.
    }
  }
  const f: Finding = { ...d.finding };
  if (fixes.length > 0) f.fixes = fixes;
  else if (untrusted) f.message = `${f.message}; ${untrustedHint(untrusted)}`;
  else if (d.hint) f.message = `${f.message}; ${d.hint}`;
  return f;
}

/** Why the sizing fix that would work is not offered, and what to do instead. */
function untrustedHint(u: { untrusted: string; ic: number }): string {
  return `the size that meets it puts \`${u.untrusted}\` at inversion coefficient ${u.ic.toPrecision(2)}, where the square law is not trusted: ` +
    'size it with `model: ekv`, or take a smaller step';
}
