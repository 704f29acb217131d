/**
 * Saturation: not-saturated (nominal, and the supply side of output.range — the rail side is the
 * compliance check's), low-margin, and vbias-triode for a wide-swing cascode whose written
 * vbias is what puts a device in triode.
 */
import type { DeviceReport, SpecPath } from '../../types';
import type { Draft, RuleContext } from '../model';
import { draftKey } from '../model';
import { deviceRange, refOf, type Site } from '../sites';
import { solve } from '../../sizing/devices';
import { pickedVbias, withVbias } from '../../sizing/vbias';
import { takesVbias } from '../../kinds/index';
import { vbiasPlans, widenPlans } from '../plans';
import { code, formatSI } from '../../text/format';
import { isBipolarReport, sinksCurrent } from '../../device-types';
import { awayFromRail, crossing, deviceIn, isSaturated, marginGoal, siteDevices } from './common';

/** Reference devices belong to the mirror, not to one output: one finding for all outputs. */
function subjectPath(site: Site, d: DeviceReport): SpecPath {
  return refOf(site, d).output === undefined ? ['mirrors', site.mirrorIndex] : site.path;
}

function state(d: DeviceReport): string {
  if (isBipolarReport(d)) {
    if (d.region === 'cutoff') return `is cut off (VBE ${formatSI(d.vbe, 'V')}: it carries no collector current)`;
    return `is saturated: VCE ${formatSI(d.vce, 'V')} < vcesat ${formatSI(d.vcesat, 'V')} (margin ${formatSI(d.margin, 'V')})`;
  }
  if (d.region === 'cutoff') return `is cut off (VGS ${formatSI(d.vgs, 'V')} below VT ${formatSI(d.vth, 'V')})`;
  return `is in triode: VDS ${formatSI(d.vds, 'V')} < VDSsat ${formatSI(d.vdsat, 'V')} (margin ${formatSI(d.margin, 'V')})`;
}

export function checkSaturation(rc: RuleContext, site: Site): Draft[] {
  const drafts: Draft[] = [];
  const limits = rc.spec.limits;
  const devices = siteDevices(site);
  let unsat = devices.filter((d) => !isSaturated(d));

  // A written wide-swing vbias that the picked one would cure is the thing to change.
  const m = site.mirror;
  if (takesVbias(m) && m.vbias !== undefined && unsat.length > 0) {
    const picked = pickedVbias(rc.spec, site.mirrorIndex, site.outputIndex);
    const cured = picked !== undefined && (() => {
      const op = solve(withVbias(rc.spec, site.mirrorIndex, picked), site.mirrorIndex, site.outputIndex);
      return op !== undefined && unsat.every((d) => { const x = deviceIn(op, d.name); return x !== undefined && isSaturated(x); });
    })();
    if (cured && picked !== undefined) {
      const path: SpecPath = ['mirrors', site.mirrorIndex, 'vbias'];
      const worst = [...unsat].sort((a, b) => a.margin - b.margin)[0];
      drafts.push({
        key: draftKey('vbias-triode', ['mirrors', site.mirrorIndex]),
        mirrorIndex: site.mirrorIndex,
        finding: {
          severity: 'error', code: 'vbias-triode', path, range: rc.parsed.source.rangeFor(path),
          message: `vbias ${formatSI(m.vbias, 'V')} leaves ${unsat.map((d) => code(d.name)).join(', ')} out of saturation: ${code(worst.name)} ${state(worst)}; ` +
            `qpoint's pick is ${formatSI(picked, 'V')} (\`ref\` at VDSsat + ${formatSI(limits.margin, 'V')})`,
        },
        plan: () => vbiasPlans(rc, site, formatSI(limits.margin, 'V')),
      });
      unsat = [];
    }
  }

  for (const d of unsat) {
    const ref = refOf(site, d);
    const at = deviceRange(rc.parsed, rc.spec, ref, ['w']);
    let where = '';
    if (!rc.quick) {
      const side = awayFromRail(site, rc.spec);
      const leaves = saturatesFrom(rc, site, d.name, side.from, side.to);
      const rel = sinksCurrent(site.mirror.type) ? '≥' : '≤';
      where = leaves !== undefined ? `; it needs Vout ${rel} ${formatSI(leaves, 'V', 4)}` : '; no output voltage within the supply saturates it';
    }
    if (isBipolarReport(d)) {
      // A bipolar device leaves forward-active by its collector voltage: no size restores it.
      drafts.push({
        key: draftKey('not-forward-active', subjectPath(site, d), d.name),
        mirrorIndex: site.mirrorIndex,
        finding: {
          severity: 'error', code: 'not-forward-active', path: at.path, range: at.range,
          message: `${code(d.name)} ${state(d)} at Vout = ${formatSI(site.vout, 'V')}${where}`,
        },
        hint: 'give its collector more voltage: move Vout away from the rail, or use a kind with fewer VBE in the stack',
      });
      continue;
    }
    drafts.push({
      key: draftKey('not-saturated', subjectPath(site, d), d.name),
      mirrorIndex: site.mirrorIndex,
      finding: {
        severity: 'error', code: 'not-saturated', path: at.path, range: at.range,
        message: `${code(d.name)} ${state(d)} at Vout = ${formatSI(site.vout, 'V')}${where}`,
      },
      plan: function* (seen) {
        // Full margin if the mirror can get it, else a smaller step: just saturation (the
        // low-margin warning stays) — also when the full margin would take a device where the
        // square law is not trusted (rules/trust.ts).
        let any = false;
        for (const c of widenPlans(rc, site.mirrorIndex, marginGoal(site, d.name, limits.margin, site.vout), `for ${formatSI(limits.margin, 'V')} margin on ${code(d.name)}`)) { any = true; yield c; }
        if (!any || (!seen.offered('widen') && seen.untrusted('widen'))) {
          yield* widenPlans(rc, site.mirrorIndex, marginGoal(site, d.name, 0.005, site.vout), `to saturate ${code(d.name)}`, 'widen-step');
        }
      },
      hint: 'lower its overdrive (wider devices) or move Vout away from the rail',
    });
  }

  for (const d of devices) {
    // 0.1 mV of slack: a picked vbias puts `ref` at exactly limits.margin.
    if (!isSaturated(d) || d.margin >= limits.margin - 1e-4) continue;
    const ref = refOf(site, d);
    const at = deviceRange(rc.parsed, rc.spec, ref, ['w']);
    if (isBipolarReport(d)) {
      drafts.push({
        key: draftKey('low-margin', subjectPath(site, d), d.name),
        mirrorIndex: site.mirrorIndex,
        finding: {
          severity: 'warning', code: 'low-margin', path: at.path, range: at.range,
          message: `${code(d.name)} has ${formatSI(d.margin, 'V')} of forward-active margin at Vout = ${formatSI(site.vout, 'V')} (VCE ${formatSI(d.vce, 'V')}, vcesat ${formatSI(d.vcesat, 'V')}); limits.margin asks for ${formatSI(limits.margin, 'V')}`,
        },
      });
      continue;
    }
    drafts.push({
      key: draftKey('low-margin', subjectPath(site, d), d.name),
      mirrorIndex: site.mirrorIndex,
      finding: {
        severity: 'warning', code: 'low-margin', path: at.path, range: at.range,
        message: `${code(d.name)} has ${formatSI(d.margin, 'V')} of saturation margin at Vout = ${formatSI(site.vout, 'V')} (VDS ${formatSI(d.vds, 'V')}, VDSsat ${formatSI(d.vdsat, 'V')}); limits.margin asks for ${formatSI(limits.margin, 'V')}`,
      },
      plan: function* () {
        if (takesVbias(m) && m.vbias !== undefined) yield* vbiasPlans(rc, site, formatSI(limits.margin, 'V'));
        yield* widenPlans(rc, site.mirrorIndex, marginGoal(site, d.name, limits.margin, site.vout), `for ${formatSI(limits.margin, 'V')} margin on ${code(d.name)}`);
      },
    });
  }

  // The supply side of output.range (the rail side is `compliance`).
  if (site.range && unsat.length === 0) drafts.push(...rangeSide(rc, site));
  return drafts;
}

/** Where device `name` enters saturation when Vout moves from `from` toward `to`. */
function saturatesFrom(rc: RuleContext, site: Site, name: string, from: number, to: number): number | undefined {
  let last = from;
  for (const t of [0.1, 0.25, 0.5, 0.75, 1]) {
    const v = from + (to - from) * t;
    const d = deviceIn(solve(rc.spec, site.mirrorIndex, site.outputIndex, v), name);
    if (d && isSaturated(d)) {
      return crossing(site, rc.spec, v, last, (op) => { const x = deviceIn(op, name); return x ? isSaturated(x) : undefined; });
    }
    last = v;
  }
  return undefined;
}

function rangeSide(rc: RuleContext, site: Site): Draft[] {
  const [lo, hi] = site.range!;
  const nmos = sinksCurrent(site.mirror.type);
  const end = nmos ? hi : lo;
  if (nmos ? end <= site.vout : end >= site.vout) return [];
  const points = [0.25, 0.5, 0.75, 1].map((t) => site.vout + (end - site.vout) * t);
  const drafts: Draft[] = [];
  const reported = new Set<string>();
  let prev = site.vout;
  for (const v of points) {
    const op = solve(rc.spec, site.mirrorIndex, site.outputIndex, v);
    if (!op) { prev = v; continue; }
    for (const d of op.devices) {
      if (isSaturated(d) || reported.has(d.name)) continue;
      const own = site.report.devices.find((x) => x.name === d.name);
      if (!own) continue;
      const ref = refOf(site, own);
      if (ref.output !== undefined && ref.output !== site.outputIndex) continue;
      reported.add(d.name);
      const at = deviceRange(rc.parsed, rc.spec, ref, ['w']);
      const leaves = rc.quick ? undefined : crossing(site, rc.spec, prev, v, (o) => { const x = deviceIn(o, d.name); return x ? isSaturated(x) : undefined; });
      drafts.push({
        key: draftKey('not-saturated', subjectPath(site, own), `${d.name}@range`),
        mirrorIndex: site.mirrorIndex,
        finding: {
          severity: 'error', code: 'not-saturated', path: at.path, range: at.range,
          message: `${code(d.name)} leaves saturation ${leaves !== undefined ? `at Vout = ${formatSI(leaves, 'V', 4)}` : `before Vout = ${formatSI(v, 'V')}`}, inside output.range ${formatSI(lo, 'V')} … ${formatSI(hi, 'V')} ` +
            `(margin ${formatSI(d.margin, 'V')} at ${formatSI(v, 'V')})`,
        },
        plan: () => widenPlans(rc, site.mirrorIndex, marginGoal(site, d.name, 0, end), `to keep ${code(d.name)} saturated up to ${formatSI(end, 'V')}`),
      });
    }
    prev = v;
  }
  return drafts;
}
