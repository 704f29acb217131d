/**
 * Fixes for corner findings. The size is found against every corner at once — the smallest
 * widening (saturation, margin, compliance) or lengthening at constant W/L (ratio, Rout; area,
 * for sigma) that passes the check at each corner of `corners:` — and the fix is offered only
 * when the edited file, analysed again with its corners, no longer has the finding and has no
 * error it did not have (nominal or at any corner). Mirrors with `auto` sizes get none (the
 * design-target pass sizes them).
 */
import type { Finding, MirrorReport, ResolvedSpec } from '../types';
import { sinksCurrent } from '../device-types';
import type { ParsedSpec } from '../spec/index';
import type { RuleContext } from '../rules/model';
import { lengthenPlans, widenPlans, type Candidate } from '../rules/plans';
import { applyEdits } from '../text/edits';
import { runCorners } from './corners';
import { complianceLimit, siteOf } from '../rules/sites';

/** Full re-checks (with corners) per file: each re-analyses the whole edited text at every corner. */
const MAX_CORNER_CHECKS = 6;
/** Candidates tried per finding. */
const PER_FINDING = 2;

type Check = (text: string) => Finding[];

const key = (f: Finding) => `${f.code}@${JSON.stringify(f.path)}`;

/** `findings` with verified fixes on the corner findings that have one. */
export function withCornerFixes(parsed: ParsedSpec, spec: ResolvedSpec, reports: MirrorReport[], findings: Finding[], check: Check): Finding[] {
  const json = parsed.json ?? /^\s*[{[]/.test(parsed.text);
  const rc: RuleContext = { parsed, spec, reports, quick: false, json, file: json ? 'spec.bias.json' : 'spec.bias.yaml' };
  const errors = new Set(findings.filter((f) => f.severity === 'error').map(key));
  let left = MAX_CORNER_CHECKS;
  return findings.map((f) => {
    if (!f.code.startsWith('corner-') || f.fixes || left <= 0) return f;
    const report = reports.find((r) => r.path.every((p, i) => f.path[i] === p));
    const candidates = report ? plansFor(rc, f, report) : undefined;
    if (!candidates) return f;
    let tried = 0;
    try {
      for (const c of candidates) {
        if (tried >= PER_FINDING || left <= 0) break;
        const p = c.build();
        if (!p) continue;
        tried++;
        left--;
        const after = check(applyEdits(parsed.text, p.edits));
        if (after.some((x) => key(x) === key(f))) continue;
        if (after.some((x) => x.severity === 'error' && !errors.has(key(x)))) continue;
        return { ...f, fixes: [{ title: `${p.title} (verified at every corner)`, edits: p.edits, preferred: true }] };
      }
    } catch {
      // A search that fails leaves the finding without a fix.
    }
    return f;
  });
}

/** The scaling that passes the finding's check at every corner, lazily. */
function plansFor(rc: RuleContext, f: Finding, report: MirrorReport): Iterable<Candidate> | undefined {
  const site = siteOf(rc.spec, report);
  if (!site) return undefined;
  const { mirrorIndex: i, outputIndex: j } = site;
  const limits = rc.spec.limits;
  /** The worst value of `metric` over the corners (NaN when a corner does not solve). */
  const worst = (metric: (r: ReturnType<typeof runCorners>[number]) => number) => (s: ResolvedSpec): number => {
    const rs = runCorners(s, i, j);
    if (rs.length === 0 || rs.some((r) => !r.converged)) return NaN;
    return Math.min(...rs.map(metric));
  };
  const all = 'at every corner';
  switch (f.code) {
    case 'corner-not-saturated':
      return widenPlans(rc, i, worst((r) => (r.minMargin ?? NaN) - 0.005), `to keep every device saturated ${all}`);
    case 'corner-low-margin':
      return widenPlans(rc, i, worst((r) => (r.minMargin ?? NaN) - limits.margin), `for limits.margin ${all}`);
    case 'corner-compliance': {
      const limit = complianceLimit(site);
      if (limit === undefined) return undefined;
      const nmos = sinksCurrent(site.mirror.type);
      return widenPlans(rc, i, worst((r) => (nmos ? limit - r.compliance : r.compliance - limit)), `for the compliance ${all}`);
    }
    case 'corner-ratio-error': {
      const target = site.require.ratio ?? report.ratioIdeal;
      if (target === undefined) return undefined;
      return lengthenPlans(rc, i, worst((r) => limits.error - Math.abs(r.ratio / target - 1)), `for the ratio within ±${100 * limits.error} % ${all}`, 8);
    }
    case 'corner-low-rout': {
      const need = site.require.rout;
      return need === undefined ? undefined : lengthenPlans(rc, i, worst((r) => r.rout / need - 1), `for require.rout ${all}`);
    }
    case 'corner-high-sigma': {
      const need = site.require.sigma;
      return need === undefined ? undefined : lengthenPlans(rc, i, worst((r) => need - (r.sigma ?? Infinity)), `for require.sigma ${all}`);
    }
    default:
      return undefined;
  }
}
