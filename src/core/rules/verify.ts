/**
 * A fix is offered only if it works: apply its edits to the text, re-parse, re-solve the mirror
 * it touches (or the whole file, for a process edit), and check that its finding is gone and no
 * error appeared that was not there before.
 */
import type { MirrorReport, ResolvedSpec } from '../types';
import { parseSpec, type ParsedSpec } from '../spec/index';
import { analyzeSpec } from '../analysis/index';
import { measure } from '../sizing/devices';
import { applyTextEdits } from './compose';
import type { Draft, FixPlan, RuleContext } from './model';

export type Detect = (rc: RuleContext) => Draft[];

export interface Baseline {
  /** Error-severity spec findings of the original parse. */
  specErrors: number;
  /** Keys of error drafts of the original run. */
  errors: Set<string>;
}

/** Every output of one mirror of a spec. */
export function reportsOfMirror(spec: ResolvedSpec, mirrorIndex: number): MirrorReport[] | undefined {
  const m = spec.mirrors[mirrorIndex];
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

/** Re-check the text with the plan applied: the drafts found there, or undefined when it no longer parses cleanly. */
export function recheck(rc: RuleContext, plan: FixPlan, baseline: Baseline, detect: Detect): Draft[] | undefined {
  try {
    const text = applyTextEdits(rc.parsed.text, plan.edits);
    const parsed: ParsedSpec = parseSpec(text, rc.file);
    if (!parsed.parsed || !parsed.spec) return undefined;
    if (parsed.findings.filter((f) => f.severity === 'error').length > baseline.specErrors) return undefined;
    if (parsed.spec.mirrors.length !== rc.spec.mirrors.length) return undefined;
    // Limits may carry front-end defaults (the editor's margin); a fix never edits them.
    const spec: ResolvedSpec = { ...parsed.spec, limits: rc.spec.limits };
    const reports = plan.scope === 'spec' ? analyzeSpec(spec) : reportsOfMirror(spec, plan.mirrorIndex);
    if (!reports) return undefined;
    return detect({ ...rc, parsed: { ...parsed, spec }, spec, reports, quick: true });
  } catch {
    return undefined;
  }
}

/** The finding is gone and no error appeared that the original did not have (in the plan's scope). */
export function accepts(after: Draft[] | undefined, draft: Draft, plan: FixPlan, baseline: Baseline): boolean {
  if (!after) return false;
  if (after.some((d) => d.key === draft.key)) return false;
  return !after.some((d) => d.finding.severity === 'error' && !baseline.errors.has(d.key) &&
    (plan.scope === 'spec' || d.mirrorIndex === plan.mirrorIndex));
}
