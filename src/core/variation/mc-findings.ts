/**
 * Findings from Monte Carlo: `mc-nonlinear` (info) when the sampled sigma and the linearized
 * Pelgrom sigma disagree by more than 15 % — and by more than three standard errors of a sampled
 * sigma (σ/√(2N)), so a short run's noise does not raise it; `mc-yield` (warning) when some
 * samples miss a requirement the output states, so that the yield is below the 3σ fraction.
 */
import type { Finding, MirrorReport, ResolvedSpec } from '../types';
import type { ParsedSpec } from '../spec/index';
import { formatPercent, formatSI, formatSignedPercent } from '../text/format';
import { nameRange, requireRange, siteOf } from '../rules/sites';

/** Relative disagreement between Monte Carlo and linearized sigma that counts as nonlinear. */
const MC_NONLINEAR = 0.15;

/** Yield below which `mc-yield` warns: the two-sided 3σ fraction, 99.73 % (common practice). */
const MC_YIELD_TARGET = 0.9973;

export function monteCarloFindings(parsed: ParsedSpec, spec: ResolvedSpec, reports: MirrorReport[]): Finding[] {
  const out: Finding[] = [];
  for (const report of reports) {
    const mc = report.mc;
    if (!mc) continue;
    const site = siteOf(spec, report);
    if (!site) continue;
    // An output of a network is sampled with every device above it: its linearized figure is
    // the chain's (design §9.3).
    const lin = report.chainSigma ?? report.sigma;
    const valid = mc.samples - (mc.failed ?? 0);
    if (lin !== undefined && lin > 0 && valid > 1) {
      const diff = mc.sigma / lin - 1;
      const noise = 3 / Math.sqrt(2 * valid);
      if (Math.abs(diff) > MC_NONLINEAR && Math.abs(diff) > noise) {
        out.push({
          severity: 'info', code: 'mc-nonlinear', path: [...site.path, 'require', 'sigma'],
          range: site.require.sigma !== undefined ? requireRange(parsed, site, 'sigma') : nameRange(parsed, site),
          message: `${report.name}: Monte Carlo sigma ${formatPercent(mc.sigma)} differs from the linearized${report.chainSigma !== undefined ? ' chain' : ''} ${formatPercent(lin)} by ${formatSignedPercent(diff)}: the mismatch is too large for small-signal analysis; trust the Monte Carlo figure`,
        });
      }
    }
    const req = site.require;
    const hasReq = req.ratio !== undefined || req.rout !== undefined || req.compliance !== undefined || req.sigma !== undefined;
    if (hasReq && mc.yield < MC_YIELD_TARGET) {
      const f = mc.failures;
      const parts: string[] = [];
      if (f?.ratio) parts.push(`${f.ratio} with the ratio outside ±${formatPercent(spec.limits.tolerance)} (limits.tolerance)`);
      if (f?.saturation) parts.push(`${f.saturation} with a device out of saturation`);
      if (f?.compliance) parts.push(`${f.compliance} not saturated at ${formatSI(req.compliance ?? NaN, 'V')}`);
      if (f?.convergence) parts.push(`${f.convergence} without a solution`);
      const failing = mc.samples - Math.round(mc.yield * mc.samples);   // yield is pass/N: exact in samples
      out.push({
        severity: 'warning', code: 'mc-yield', path: [...site.path, 'require'],
        range: parsed.source.key([...site.path, 'require']) ?? nameRange(parsed, site),
        message: `${report.name}: Monte Carlo yield ${formatPercent(mc.yield, 4)} (N = ${mc.samples}, seed ${mc.seed}): ${failing} sample${failing === 1 ? '' : 's'} fail${failing === 1 ? 's' : ''}${parts.length ? ` — ${parts.join(', ')}` : ''}`,
      });
    }
  }
  return out;
}
