/**
 * Findings from process corners: for each check that fails at some corner, one finding naming
 * the worst corner (and how many others fail). A check the nominal point already fails is left
 * to the nominal rule, so a designer sees each problem once. Severities follow the nominal
 * checks: a corner is a condition the chip must survive.
 */
import type { CornerResult, CornerSpec, Finding, MirrorReport, ResolvedSpec, Severity } from '../types';
import type { ParsedSpec } from '../spec/index';
import { formatSI } from '../units/format';
import { ZERO_CELSIUS } from '../defaults';
import {
  complianceFails, complianceLimit, cornerRange, deviceRange, nameRange, requireRange, siteOf, type Site,
} from './site';

/** "ss (125 °C, vdd 1.62 V)". */
export function cornerLabel(c: CornerSpec | undefined, name: string): string {
  if (!c) return name;
  const parts: string[] = [];
  if (c.temperature !== undefined) {
    const t = Number((c.temperature - ZERO_CELSIUS).toFixed(1));
    parts.push(`${t < 0 ? '−' : ''}${Math.abs(t)} °C`);
  }
  if (c.vdd !== undefined) parts.push(`vdd ${formatSI(c.vdd, 'V')}`);
  if (c.vss !== undefined) parts.push(`vss ${formatSI(c.vss, 'V')}`);
  return parts.length ? `${name} (${parts.join(', ')})` : name;
}

const pct = (x: number): string => `${x >= 0 ? '+' : '−'}${Math.abs(100 * x).toPrecision(2)} %`;
const mv = (x: number): string => `${x < 0 ? '−' : ''}${formatSI(Math.abs(x), 'V')}`;

interface Failing { r: CornerResult; badness: number }

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
  const nomMargin = Math.min(...nominal.devices.map((d) => d.margin));
  if (nominal.converged && nomMargin >= 0) {
    const bad = solved.filter((r) => r.minMargin !== undefined && r.minMargin < 0).map((r) => ({ r, badness: -r.minMargin! }));
    const worst = bad.slice().sort((a, b) => b.badness - a.badness)[0];
    emit('corner-not-saturated', 'error', bad, worst ? deviceRange(parsed, site, worst.r.minMarginDevice ?? '') : nameRange(parsed, site), site.path,
      (w, label) => `\`${w.minMarginDevice}\` is not saturated at corner ${label}: margin ${mv(w.minMargin!)}; widen it (lower VOV) or give it more VDS`);
    if (nomMargin >= limits.margin) {
      const low = solved.filter((r) => r.minMargin !== undefined && r.minMargin >= 0 && r.minMargin < limits.margin)
        .map((r) => ({ r, badness: limits.margin - r.minMargin! }));
      const wl = low.slice().sort((a, b) => b.badness - a.badness)[0];
      emit('corner-low-margin', 'warning', low, wl ? deviceRange(parsed, site, wl.r.minMarginDevice ?? '') : nameRange(parsed, site), site.path,
        (w, label) => `\`${w.minMarginDevice}\` has only ${mv(w.minMargin!)} saturation margin at corner ${label}, below limits.margin ${mv(limits.margin)}`);
    }
  }

  // Ratio against require.ratio, else the geometric ratio.
  const target = site.require.ratio ?? nominal.ratioIdeal;
  if (target !== undefined && target > 0 && Math.abs(nominal.ratio / target - 1) <= limits.error) {
    const bad = solved.map((r) => ({ r, badness: Math.abs(r.ratio / target - 1) })).filter((f) => f.badness > limits.error);
    emit('corner-ratio-error', 'error', bad, site.require.ratio !== undefined ? requireRange(parsed, site, 'ratio') : nameRange(parsed, site),
      [...site.path, 'require', 'ratio'],
      (w, label) => `ratio ${Number(w.ratio.toPrecision(4))} at corner ${label} is ${pct(w.ratio / target - 1)} from ${Number(target.toPrecision(4))}, beyond limits.error ±${Number((100 * limits.error).toPrecision(3))} %`);
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
    const end = site.type === 'nmos' ? 0 : 1;
    const rangePath = [...site.path, 'output', 'range', end];
    const range = site.require.compliance !== undefined ? requireRange(parsed, site, 'compliance')
      : parsed.source.value(rangePath) ?? parsed.source.value([...site.path, 'output', 'range']) ?? nameRange(parsed, site);
    emit('corner-compliance', 'error', bad, range, which === 'require.compliance' ? [...site.path, 'require', 'compliance'] : rangePath,
      (w, label) => `output compliance ${formatSI(w.compliance, 'V')} at corner ${label}: the output must work ${site.type === 'nmos' ? 'down' : 'up'} to ${formatSI(limit, 'V')} (${which})`);
  }

  const sigma = site.require.sigma;
  if (sigma !== undefined && !(nominal.sigma !== undefined && nominal.sigma > sigma)) {
    const bad = solved.filter((r) => r.sigma !== undefined && r.sigma > sigma).map((r) => ({ r, badness: r.sigma! / sigma }));
    emit('corner-high-sigma', 'error', bad, requireRange(parsed, site, 'sigma'), [...site.path, 'require', 'sigma'],
      (w, label) => `mismatch sigma ${Number((100 * w.sigma!).toPrecision(2))} % at corner ${label} is above require.sigma ${Number((100 * sigma).toPrecision(2))} %; enlarge the devices' area`);
  }
  return findings;
}
