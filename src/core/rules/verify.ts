/**
 * A fix is offered only if it works: apply its edits to the text, re-read it, re-solve the mirror
 * it touches (or the whole file, for a process edit), and check that its finding is gone and no
 * error appeared that was not there before.
 *
 * Re-reading is local when it can be (spec/fragment.ts): a fix inside one mirror of a plain spec
 * re-reads that mirror's lines alone, validates and elaborates the data with that mirror
 * replaced, and re-solves it — the same elaborator and solver on the same data as a whole-file
 * re-read, at a fraction of the cost. Otherwise the whole edited text is parsed again.
 */
import type { MirrorReport, ResolvedSpec } from '../types';
import type { ParsedSpec } from '../spec/index';
import { resolveText } from '../resolve';
import { elaborate } from '../spec/elaborate';
import { FindingSink } from '../spec/findings';
import { SplicedSourceMap } from '../spec/fragment';
import { provisionalLinks, solveNetworks } from '../network/index';
import { isRecord } from '../spec/params';
import { validateSchema } from '../spec/schema';
import { YamlSourceMap } from '../spec/source-map';
import { analyzeSpec } from '../analysis/index';
import { applyDesignTargets } from '../design/auto-size';
import { measure } from '../sizing/devices';
import { applyEdits } from '../text/edits';
import type { Draft, FixPlan, RuleContext } from './model';
import { untrustedMove } from './trust';
import { mirrorAt } from '../mirror-at';

export type Detect = (rc: RuleContext) => Draft[];

export interface Baseline {
  /** Error-severity spec findings of the original parse. */
  specErrors: number;
  /** Keys of error drafts of the original run. */
  errors: Set<string>;
}

/** Every output of one mirror of a spec. */
export function reportsOfMirror(spec: ResolvedSpec, mirrorIndex: number): MirrorReport[] | undefined {
  const m = mirrorAt(spec, mirrorIndex);
  if (!m) return undefined;
  const n = m.kind === 'netlist' ? 1 : m.outputs.length;
  const out: MirrorReport[] = [];
  for (let j = 0; j < n; j++) {
    const r = measure(spec, mirrorIndex, j);
    if (!r) return undefined;
    out.push(r);
  }
  return out;
}

/** A fix whose re-solve puts a square-law device below IC 1, where the numbers that verified it are not true. */
export interface Untrusted { untrusted: string; ic: number }

export type Recheck = Draft[] | Untrusted | undefined;

/**
 * Re-check the text with the plan applied: the drafts found there, Untrusted when the square
 * law no longer holds for a device the fix moved (rules/trust.ts), or undefined when the text no
 * longer parses cleanly.
 */
export function recheck(rc: RuleContext, plan: FixPlan, baseline: Baseline, detect: Detect): Recheck {
  try {
    const text = applyEdits(rc.parsed.text, plan.edits);
    const local = rc.fragments && plan.scope === 'mirror' ? recheckMirror(rc, plan, text, detect) : WHOLE;
    return local === WHOLE ? recheckWhole(rc, plan, text, baseline, detect) : local;
  } catch {
    return undefined;
  }
}

/** Untrusted when the edited spec is square law and a device moved below IC 1. */
function trusted(rc: RuleContext, spec: ResolvedSpec, reports: MirrorReport[]): Untrusted | undefined {
  if (spec.process.model !== 'square-law') return undefined;
  const d = untrustedMove(rc.reports, reports);
  return d ? { untrusted: d.name, ic: d.ic } : undefined;
}

function recheckWhole(rc: RuleContext, plan: FixPlan, text: string, baseline: Baseline, detect: Detect): Recheck {
  // Limits may carry front-end defaults (the editor's margin); a fix never edits them. Sizes
  // written `auto` are sized again, as the analysis sizes them (a vbias fix moves them).
  const { parsed } = resolveText(text, rc.file, { limits: rc.spec.limits, ...(rc.parsed.tables ? { tables: rc.parsed.tables } : {}) });
  const spec = parsed.spec;
  if (!parsed.parsed || !spec) return undefined;
  if (parsed.findings.filter((f) => f.severity === 'error').length > baseline.specErrors) return undefined;
  if (spec.mirrors.length !== rc.spec.mirrors.length) return undefined;
  const reports = plan.scope === 'spec' ? analyzeSpec(spec) : reportsOfMirror(spec, plan.mirrorIndex);
  if (!reports) return undefined;
  return trusted(rc, spec, reports) ?? detect({ ...rc, parsed, spec, reports, quick: true });
}

const WHOLE = Symbol('re-read the whole text');

/**
 * The local re-check of a mirror-scoped plan, or WHOLE when it cannot be done locally. The original
 * spec had no error (it has a resolved spec), so the edited one is usable exactly when reading
 * the edited mirror adds none.
 */
function recheckMirror(rc: RuleContext, plan: FixPlan, text: string, detect: Detect): Recheck | typeof WHOLE {
  const frags = rc.fragments;
  const i = plan.mirrorIndex;
  const data = rc.parsed.data;
  const base = rc.parsed.source;
  if (!frags || !isRecord(data) || !Array.isArray(data.mirrors) || !(base instanceof YamlSourceMap)) return WHOLE;
  if (rc.parsed.findings.some((f) => f.severity === 'error') || data.mirrors.length !== rc.spec.mirrors.length) return WHOLE;
  if (!frags.holds(i, plan.edits)) return WHOLE;
  const frag = frags.read(text, i);
  const span = frags.lineSpan(i);
  if (!frag || !span) return WHOLE;
  const sink = new FindingSink(base);
  // Structure: the root as it was, with this mirror as its only one (only "any error?" matters).
  validateSchema({ ...data, mirrors: [frag.data] }, sink);
  if (sink.errorCount > 0) return undefined;
  const items = data.mirrors.map((m: unknown, k: number) => (k === i ? frag.data : m));
  const read = elaborate({ ...data, mirrors: items }, sink, { items: data.mirrors, mirrors: rc.spec.mirrors, except: i }, rc.parsed.tables);
  if (!read || sink.errorCount > 0 || read.mirrors.length !== rc.spec.mirrors.length) return undefined;
  // A linked mirror is re-solved with its whole network, as the whole-file re-read solves it (its
  // findings need no chain sigma).
  const spec = solveNetworks(applyDesignTargets(provisionalLinks({ ...read, limits: rc.spec.limits }), i).spec, undefined, { chainSigma: false });
  const reports = reportsOfMirror(spec, i);
  if (!reports) return undefined;
  const untrusted = trusted(rc, spec, reports);
  if (untrusted) return untrusted;
  const lineDelta = countLines(text) - countLines(rc.parsed.text);
  const source = new SplicedSourceMap(base, i, frag, span.last, lineDelta, text);
  const parsed: ParsedSpec = { text, parsed: true, findings: sink.list, source, json: rc.parsed.json, data: { ...data, mirrors: items }, spec };
  return detect({ ...rc, parsed, spec, reports, quick: true });
}

function countLines(text: string): number {
  let n = 1;
  for (let i = text.indexOf('\n'); i >= 0; i = text.indexOf('\n', i + 1)) n++;
  return n;
}

/** The finding is gone and no error appeared that the original did not have (in the plan's scope). */
export function accepts(after: Recheck, draft: Draft, plan: FixPlan, baseline: Baseline): boolean {
  if (!after || !Array.isArray(after)) return false;
  if (after.some((d) => d.key === draft.key)) return false;
  return !after.some((d) => d.finding.severity === 'error' && !baseline.errors.has(d.key) &&
    (plan.scope === 'spec' || d.mirrorIndex === plan.mirrorIndex));
}
