/** The mirror's stated requirements: low-rout, compliance, high-sigma. */
import { mirrorParams } from '../../flavours';
import type { ResolvedSpec, SpecPath } from '../../types';
import { inWorkingRegion, sinksCurrent } from '../../device-types';
import type { Draft, RuleContext } from '../model';
import { draftKey } from '../model';
import { deviceRange, kindRange, refOf, valueRange, type Site } from '../sites';
import { measure, solve } from '../../sizing/devices';
import { areaPlans, lengthenPlans, widenPlans } from '../plans';
import { code, formatPercent, formatSI } from '../../text/format';
import { ratioPair } from './ratio';
import { deviceIn } from './common';

/** Range of the output device (for a bank, this output's), preferring the given size keys. */
function outputDeviceRange(rc: RuleContext, site: Site, keys: ('w' | 'l' | 'm')[], role?: string) {
  const want = role ?? (site.mirror.kind === 'netlist' ? ratioPair(site)?.setter : 'out');
  const d = want ? site.report.devices.find((x) => (site.mirror.kind === 'netlist' ? x.name === want : x.role === want && refOf(site, x).output === site.outputIndex)) : undefined;
  return d ? deviceRange(rc.parsed, rc.spec, refOf(site, d), keys) : kindRange(rc.parsed, site.mirrorIndex);
}

export function checkRout(rc: RuleContext, site: Site): Draft[] {
  const need = site.require.rout;
  const r = site.report;
  if (need === undefined || !(r.rout < need)) return [];
  const at = outputDeviceRange(rc, site, ['l', 'w']);
  const req = valueRange(rc.parsed, [...site.path, 'require', 'rout']);
  const mt = site.mirror.type;
  const hint = mt === 'npn' || mt === 'pnp'
    ? (site.mirror.kind === 'simple' || site.mirror.kind === 'beta-helper' ? 'emitter degeneration (a Widlar) or a cascode or Wilson (Rout ≈ β·ro/2)' : 'emitter degeneration, or a larger Early voltage')
    : mirrorParams(rc.spec.process, site.mirror, mt).lref === undefined
    ? 'this process gives λ without lref, so L does not change ro: use a cascode'
    : site.mirror.kind === 'simple' ? 'lengthen the devices, or use a cascode (Rout ≈ gm·ro²)' : 'lengthen the devices';
  return [{
    key: draftKey('low-rout', site.path),
    mirrorIndex: site.mirrorIndex,
    finding: {
      severity: 'error', code: 'low-rout', path: at.path, range: at.range,
      related: [{ path: req.path, range: req.range, message: `required Rout ${formatSI(need, 'Ω')}` }],
      message: `Rout ${formatSI(r.rout, 'Ω')} is below the required ${formatSI(need, 'Ω')} (${formatPercent(r.rout / need, 3)} of it)`,
    },
    plan: () => lengthenPlans(rc, site.mirrorIndex, (s: ResolvedSpec) => {
      const m = measure(s, site.mirrorIndex, site.outputIndex);
      return m && m.converged ? m.rout / need - 1 : NaN;
    }, `for Rout ≥ ${formatSI(need, 'Ω')}`),
    hint,
  }];
}

/** The compliance target: NMOS works down to the lower of require.compliance and range[0]; PMOS up to the higher. */
function complianceTarget(site: Site): { v: number; path: SpecPath; what: string } | undefined {
  const nmos = sinksCurrent(site.mirror.type);
  const cands: { v: number; path: SpecPath; what: string }[] = [];
  if (site.require.compliance !== undefined) cands.push({ v: site.require.compliance, path: [...site.path, 'require', 'compliance'], what: 'require.compliance' });
  if (site.range) {
    const idx = nmos ? 0 : 1;
    const outPath: SpecPath = site.mirror.kind === 'netlist' ? ['mirrors', site.mirrorIndex, 'output', 'range', idx] : [...site.path, 'output', 'range', idx];
    cands.push({ v: site.range[idx], path: outPath, what: 'output.range' });
  }
  if (cands.length === 0) return undefined;
  return cands.sort((a, b) => (nmos ? a.v - b.v : b.v - a.v))[0];
}

export function checkCompliance(rc: RuleContext, site: Site): Draft[] {
  const t = complianceTarget(site);
  const r = site.report;
  if (!t || !Number.isFinite(r.compliance)) return [];
  const nmos = sinksCurrent(site.mirror.type);
  const tol = 5e-4; // the engine's compliance is accurate to ≤ 1 mV; do not flag a tie
  const bad = nmos ? r.compliance > t.v + tol : r.compliance < t.v - tol;
  // A device out of saturation at every output voltage has no compliance to speak of; the
  // saturation check (not-saturated, vbias-triode) already names it at the nominal point.
  if (!bad || r.noCompliance) return [];
  // The device that limits is the one that leaves saturation at the compliance voltage: just past
  // it, not at the target, where devices that leave later would mask it.
  const worst = limiterAt(rc, site, r.compliance + (nmos ? -3e-3 : 3e-3)) ?? limiterAt(rc, site, t.v);
  const own = worst ? r.devices.find((d) => d.name === worst.name) : undefined;
  const at = own ? deviceRange(rc.parsed, rc.spec, refOf(site, own), ['w']) : kindRange(rc.parsed, site.mirrorIndex);
  const req = valueRange(rc.parsed, t.path);
  const dir = nmos ? 'down to' : 'up to';
  const who = worst ? `${code(worst.name)} leaves saturation ${nmos ? 'below' : 'above'} Vout = ${formatSI(r.compliance, 'V')}` : `compliance is ${formatSI(r.compliance, 'V')}`;
  const atTarget = worst ? deviceIn(solve(rc.spec, site.mirrorIndex, site.outputIndex, t.v), worst.name) : undefined;
  const there = atTarget ? ` (its margin there is ${formatSI(atTarget.margin, 'V')})` : '';
  return [{
    key: draftKey('compliance', site.path),
    mirrorIndex: site.mirrorIndex,
    finding: {
      severity: 'error', code: 'compliance', path: at.path, range: at.range,
      related: [{ path: req.path, range: req.range, message: `${t.what}: must work ${dir} ${formatSI(t.v, 'V')}` }],
      message: `${who}, but ${t.what} needs the mirror to work ${dir} ${formatSI(t.v, 'V')}${there}`,
    },
    plan: () => widenPlans(rc, site.mirrorIndex, (s: ResolvedSpec) => {
      const m = measure(s, site.mirrorIndex, site.outputIndex);
      if (!m || !m.converged || !Number.isFinite(m.compliance)) return NaN;
      return nmos ? t.v - m.compliance : m.compliance - t.v;
    }, `for compliance ${dir} ${formatSI(t.v, 'V')}`),
    hint: site.mirror.kind === 'wide-swing' ? 'lower the overdrives (wider devices) or lower vbias' : 'lower the overdrives (wider devices) or use a wide-swing cascode',
  }];
}

/** The device furthest out of saturation at output voltage `v`, if any is. */
function limiterAt(rc: RuleContext, site: Site, v: number) {
  const op = solve(rc.spec, site.mirrorIndex, site.outputIndex, v);
  return op?.devices.filter((d) => !inWorkingRegion(d)).sort((a, b) => a.margin - b.margin)[0];
}

export function checkSigma(rc: RuleContext, site: Site): Draft[] {
  const need = site.require.sigma;
  const r = site.report;
  if (need === undefined || r.sigma === undefined || !(r.sigma > need)) return [];
  const at = outputDeviceRange(rc, site, ['w', 'l']);
  const req = valueRange(rc.parsed, [...site.path, 'require', 'sigma']);
  const area = (r.sigma / need) ** 2;
  return [{
    key: draftKey('high-sigma', site.path),
    mirrorIndex: site.mirrorIndex,
    finding: {
      severity: 'error', code: 'high-sigma', path: at.path, range: at.range,
      related: [{ path: req.path, range: req.range, message: `required σ ≤ ${formatPercent(need)}` }],
      message: `σ(Iout) ${formatPercent(r.sigma)} is above the required ${formatPercent(need)}; Pelgrom scaling (σ ∝ 1/√(W·L)) needs about ${area.toPrecision(3)}× the gate area`,
    },
    plan: () => areaPlans(rc, site, need),
  }];
}
