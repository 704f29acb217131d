/**
 * Findings from process corners: for each check that fails at some corner, one finding naming
 * the worst corner (and how many others fail). A check the nominal point already fails is left
 * to the nominal rule, so a designer sees each problem once. Severities follow the nominal
 * checks: a corner is a condition the chip must survive.
 */
import type { CornerResult, CornerSpec, Finding, MirrorReport, Range, ResolvedSpec, Severity } from '../types';
import { sinksCurrent } from '../device-types';
import { KINDS } from '../kinds/index';
import type { ParsedSpec } from '../spec/index';
import { formatPercent, formatRatio, formatSI, formatSignedPercent } from '../text/format';
import { ZERO_CELSIUS } from '../defaults';
import {
  complianceFails, complianceLimit, cornerRange, deviceRange, nameRange, refOf, requireRange, siteOf, type Site,
} from '../rules/sites';

/** "ss (125 °C, vdd 1.62 V)". */
function cornerLabel(c: CornerSpec | undefined, name: string): string {
  if (!c) return name;
  const parts: string[] = [];
  if (c.temperature !== undefined) {
    const t = Number((c.temperature - ZERO_CELSIUS).toFixed(1));
    parts.push(`${t} °C`);
  }
  if (c.vdd !== undefined) parts.push(`vdd ${formatSI(c.vdd, 'V')}`);
  if (c.vss !== undefined) parts.push(`vss ${formatSI(c.vss, 'V')}`);
  return parts.length ? `${name} (${parts.join(', ')})` : name;
}


interface Failing { r: CornerResult; badness: number }

/** A corner finding about a device points at its key (no size fix is offered for it). */
function deviceAt(parsed: ParsedSpec, spec: ResolvedSpec, site: Site, name: string | undefined): Range {
  const d = site.report.devices.find((x) => x.name === name);
  return d ? deviceRange(parsed, spec, refOf(site, d), []).range : nameRange(parsed, site);
}

export function cornerFindings(parsed: ParsedSpec, spec: ResolvedSpec, reports: MirrorReport[]): Finding[] {
  const out: Finding[] = [];
  for (const report of reports) {
    if (!report.corners?.length) continue;
    const site = siteOf(spec, report);
    if (!site) continue;
    out.push(...forSite(parsed, spec, site));
  }
  return out;
}

function forSite(parsed: ParsedSpec, spec: ResolvedSpec, site: Site): Finding[] {
  const nominal = site.report;
  const corners = nominal.corners ?? [];
  const byName = new Map(spec.corners.map((c) => [c.name, c]));
  const findings: Finding[] = [];
  const limits = spec.limits;

  const emit = (code: string, severity: Severity, failing: Failing[], range: Finding['range'], path: Finding['path'], text: (worst: CornerResult, label: string) => string): void => {
    if (failing.length === 0) return;
    failing.sort((a, b) => b.badness - a.badness);
    const worst = failing[0]!.r;
    const others = failing.slice(1).map((f) => f.r.name);
    const label = cornerLabel(byName.get(worst.name), worst.name);
    const also = others.length ? `; also at ${others.slice(0, 4).join(', ')}${others.length > 4 ? ` and ${others.length - 4} more` : ''}` : '';
    const corner = byName.get(worst.name);
    findings.push({
      severity, code, path, range,
      message: `${nominal.name}: ${text(worst, label)}${also}`,
      ...(corner ? { related: [{ path: corner.path, range: cornerRange(parsed, corner), message: `corner ${worst.name}` }] } : {}),
    });
  };

  const solved = corners.filter((r) => r.converged);
  emit('corner-no-convergence', 'error', corners.filter((r) => !r.converged).map((r) => ({ r, badness: 0 })),
    nameRange(parsed, site), site.path, (_w, label) => `the operating point does not converge at corner ${label}; the mirror may have no working point there`);

  // Saturation: worst device margin per corner.
  const nomMargin = Math.min(...nominal.devices.filter((d) => d.role !== 'startup').map((d) => d.margin));
  if (nominal.converged && nomMargin >= 0) {
    const bad = solved.filter((r) => r.minMargin !== undefined && r.minMargin < 0).map((r) => ({ r, badness: -r.minMargin! }));
    const worst = bad.slice().sort((a, b) => b.badness - a.badness)[0];
    emit('corner-not-saturated', 'error', bad, worst ? deviceAt(parsed, spec, site, worst.r.minMarginDevice) : nameRange(parsed, site), site.path,
      (w, label) => `\`${w.minMarginDevice}\` is not saturated at corner ${label}: margin ${formatSI(w.minMargin!, 'V')}; widen it (lower VOV) or give it more VDS`);
    if (nomMargin >= limits.margin) {
      const low = solved.filter((r) => r.minMargin !== undefined && r.minMargin >= 0 && r.minMargin < limits.margin)
        .map((r) => ({ r, badness: limits.margin - r.minMargin! }));
      const wl = low.slice().sort((a, b) => b.badness - a.badness)[0];
      emit('corner-low-margin', 'warning', low, wl ? deviceAt(parsed, spec, site, wl.r.minMarginDevice) : nameRange(parsed, site), site.path,
        (w, label) => `\`${w.minMarginDevice}\` has only ${formatSI(w.minMargin!, 'V')} saturation margin at corner ${label}, below limits.margin ${formatSI(limits.margin, 'V')}`);
    }
  }

  // Ratio against require.ratio, else the design ratio. A degenerated pair (the Widlar) is
  // judged against require.ratio only, as the ratio check judges it: its law moves with UT and
  // its resistor across corners by design, so the nominal law is no target there.
  const degenerated = site.mirror.kind !== 'netlist' && KINDS[site.mirror.kind].degeneration !== undefined;
  const target = site.require.ratio ?? (degenerated ? undefined : nominal.ratioIdeal);
  if (target !== undefined && target > 0 && nominal.ratio !== undefined && Math.abs(nominal.ratio / target - 1) <= limits.error) {
    const bad = solved.map((r) => ({ r, badness: Math.abs(r.ratio / target - 1) })).filter((f) => f.badness > limits.error);
    emit('corner-ratio-error', 'error', bad, site.require.ratio !== undefined ? requireRange(parsed, site, 'ratio') : nameRange(parsed, site),
      [...site.path, 'require', 'ratio'],
      (w, label) => `ratio ${formatRatio(w.ratio)} at corner ${label} is ${formatSignedPercent(w.ratio / target - 1)} from ${formatRatio(target)}, beyond limits.error ±${formatPercent(limits.error)}`);
  }

  const rout = site.require.rout;
  if (rout !== undefined && nominal.rout >= rout) {
    const bad = solved.filter((r) => !(r.rout >= rout)).map((r) => ({ r, badness: rout / r.rout }));
    emit('corner-low-rout', 'error', bad, requireRange(parsed, site, 'rout'), [...site.path, 'require', 'rout'],
      (w, label) => `Rout ${formatSI(w.rout, 'Ω')} at corner ${label} is below require.rout ${formatSI(rout, 'Ω')}; lengthen the output devices`);
  }

  const limit = complianceLimit(site);
  if (limit !== undefined && !complianceFails(site, nominal.compliance, limit)) {
    const bad = solved.filter((r) => complianceFails(site, r.compliance, limit))
      .map((r) => ({ r, badness: Math.abs(r.compliance - limit) }));
    const which = site.require.compliance !== undefined ? 'require.compliance' : 'output.range';
    // The far end of output.range is the element that must change (NMOS the low, PMOS the high).
    const end = sinksCurrent(site.mirror.type) ? 0 : 1;
    const rangePath = [...site.path, 'output', 'range', end];
    const range = site.require.compliance !== undefined ? requireRange(parsed, site, 'compliance')
      : parsed.source.value(rangePath) ?? parsed.source.value([...site.path, 'output', 'range']) ?? nameRange(parsed, site);
    emit('corner-compliance', 'error', bad, range, which === 'require.compliance' ? [...site.path, 'require', 'compliance'] : rangePath,
      (w, label) => `output compliance ${formatSI(w.compliance, 'V')} at corner ${label}: the output must work ${sinksCurrent(site.mirror.type) ? 'down' : 'up'} to ${formatSI(limit, 'V')} (${which})`);
  }

  const sigma = site.require.sigma;
  if (sigma !== undefined && !(nominal.sigma !== undefined && nominal.sigma > sigma)) {
    const bad = solved.filter((r) => r.sigma !== undefined && r.sigma > sigma).map((r) => ({ r, badness: r.sigma! / sigma }));
    emit('corner-high-sigma', 'error', bad, requireRange(parsed, site, 'sigma'), [...site.path, 'require', 'sigma'],
      (w, label) => `mismatch sigma ${formatPercent(w.sigma!)} at corner ${label} is above require.sigma ${formatPercent(sigma)}; enlarge the devices' area`);
  }
  return findings;
}
