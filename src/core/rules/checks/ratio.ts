/**
 * ratio-error (against require.ratio, else the geometric ratio) with its cause split, and
 * vds-mismatch (the pair's VDS difference alone moves the ratio by half the budget or more).
 */
import type { DeviceReport, ErrorSplit, RelatedLocation, ResolvedSpec } from '../../types';
import { KINDS } from '../../kinds/index';
import type { Draft, RuleContext } from '../model';
import { draftKey } from '../model';
import { deviceRange, kindRange, refOf, valueRange, type DeviceRef, type Site } from '../sites';
import { balancedPlans, cascodePlans, lengthenPlans, ratioPlans } from '../plans';
import { ratioAt } from '../../sizing/ratio';
import { code, formatPercent, formatRatio, formatSI, formatSignedPercent } from '../../text/format';
import { areaRatioPlans, baseDominated, betaHelperPlans } from '../bipolar-plans';
import { isBipolarReport, isBipolarSplit, isBipolarType } from '../../device-types';

/** The ratio-setting device and its partner: the kind's mirror pair (design §4 ratioIdeal). */
export function ratioPair(site: Site): { setter: string; partner: string } | undefined {
  const m = site.mirror;
  if (m.kind === 'netlist') return m.pair ? { setter: m.pair.out, partner: m.pair.ref } : undefined;
  const { ref, out } = KINDS[m.kind].pair;
  return { setter: out, partner: ref };
}

function findRole(site: Site, role: string): DeviceReport | undefined {
  const m = site.mirror;
  if (m.kind === 'netlist') return site.report.devices.find((d) => d.name === role);
  return site.report.devices.find((d) => {
    if (d.role !== role) return false;
    const r = refOf(site, d);
    return r.output === undefined || r.output === site.outputIndex;
  });
}

function related(rc: RuleContext, site: Site, d: DeviceReport | undefined, message: string): RelatedLocation[] {
  if (!d) return [];
  const at = deviceRange(rc.parsed, rc.spec, refOf(site, d), ['w']);
  return [{ path: at.path, range: at.range, message }];
}

export function checkRatio(rc: RuleContext, site: Site): Draft[] {
  const drafts: Draft[] = [];
  const r = site.report;
  const pair = ratioPair(site);
  const limit = rc.spec.limits.error;
  const required = site.require.ratio;
  const target = required ?? r.ratioIdeal;
  const setter = pair ? findRole(site, pair.setter) : undefined;
  const partner = pair ? findRole(site, pair.partner) : undefined;

  // A degenerated pair (the Widlar) runs at a ratio far from its area ratio by design: it is
  // judged against require.ratio only.
  const degenerated = site.mirror.kind !== 'netlist' && KINDS[site.mirror.kind].degeneration !== undefined;
  if (target !== undefined && target > 0 && r.ratio !== undefined && Number.isFinite(r.ratio) && !(degenerated && required === undefined)) {
    const ratio = r.ratio;
    const err = ratio / target - 1;
    if (Math.abs(err) > limit) {
      const setterRef: DeviceRef | undefined = setter ? refOf(site, setter) : undefined;
      const at = setterRef ? deviceRange(rc.parsed, rc.spec, setterRef, isBipolarType(site.mirror.type) ? ['area', 'm'] : ['w', 'm']) : kindRange(rc.parsed, site.mirrorIndex);
      const against = required !== undefined ? `the required ${formatRatio(required)}` : `the geometric ${formatRatio(target)}`;
      const rel = related(rc, site, partner, `mirrored from ${code(partner?.name ?? '')}`);
      if (required !== undefined) {
        const req = valueRange(rc.parsed, [...site.path, 'require', 'ratio']);
        rel.push({ path: req.path, range: req.range, message: `required ratio ${formatRatio(required)}` });
      }
      drafts.push({
        key: draftKey('ratio-error', site.path),
        mirrorIndex: site.mirrorIndex,
        finding: {
          severity: 'error', code: 'ratio-error', path: at.path, range: at.range, related: rel,
          message: `ratio ${formatRatio(ratio)} is ${formatSignedPercent(err)} off ${against} (limit ±${formatPercent(limit)})${causes(r.errorSplit, r.ratioIdeal, required)}`,
        },
        plan: isBipolarType(site.mirror.type) ? function* () {
          // Base currents are removed at their cause (a helper returns them); an area ratio
          // then trims what is left.
          const split = r.errorSplit;
          if (split && isBipolarSplit(split) && baseDominated(split)) yield* betaHelperPlans(rc, site);
          if (setterRef) yield* areaRatioPlans(rc, site, setterRef, target, required === undefined);
        } : function* () {
          // A VDS mismatch is removed at its cause (the balanced Wilson, a longer channel, a
          // cascode); an integer m keeps the unit cell. A W trim is right at one Vout, one corner
          // and one λ only, and breaks the unit cell: it comes last.
          yield* balancedPlans(rc, site);
          const vds = vdsCaused(r.errorSplit, r.ratioIdeal, target, limit);
          if (vds) {
            yield* lengthenPlans(rc, site.mirrorIndex, (s: ResolvedSpec) => {
              const now = ratioAt(s, site.mirrorIndex, site.outputIndex);
              return Number.isFinite(now) ? limit - Math.abs(now / target - 1) : NaN;
            }, `for ratio ${formatRatio(target)} within ±${formatPercent(limit)}`, MAX_RATIO_LENGTHEN);
            yield* cascodePlans(rc, site);
          }
          if (setterRef) yield* ratioPlans(rc, site, setterRef, target, required === undefined, vds);
        },
      });
    }
  }

  // A VDS mismatch already compensated by sizing (the required ratio is met within half the
  // budget, e.g. an auto-sized or fixed output W) needs no warning: the designer has dealt with it.
  const compensated = required !== undefined && r.ratio !== undefined && Number.isFinite(r.ratio) && Math.abs(r.ratio / required - 1) <= limit / 2;
  const split = r.errorSplit;
  if (split && !isBipolarSplit(split) && setter && partner && !isBipolarReport(setter) && !isBipolarReport(partner) && !compensated && Math.abs(split.vds) >= limit / 2) {
    const at = kindRange(rc.parsed, site.mirrorIndex);
    const kind = site.mirror.kind;
    const hint = kind === 'simple'
      ? `a cascode would hold ${code(setter.name)} at the VDS of ${code(partner.name)}`
      : kind === 'wilson' ? 'the balanced Wilson equalises the two'
        : 'match the VDS of the pair (cascode sizes and bias)';
    drafts.push({
      key: draftKey('vds-mismatch', site.path),
      mirrorIndex: site.mirrorIndex,
      finding: {
        severity: 'warning', code: 'vds-mismatch', path: at.path, range: at.range,
        related: [...related(rc, site, setter, `VDS ${formatSI(setter.vds, 'V')}`), ...related(rc, site, partner, `VDS ${formatSI(partner.vds, 'V')}`)],
        message: `VDS of ${code(setter.name)} (${formatSI(setter.vds, 'V')}) and ${code(partner.name)} (${formatSI(partner.vds, 'V')}) differ by ${formatSI(Math.abs(setter.vds - partner.vds), 'V')}: ` +
          `length modulation moves the ratio by ${formatSignedPercent(split.vds)} (half the ±${formatPercent(limit)} budget is ${formatPercent(limit / 2)})`,
      },
      plan: () => balancedPlans(rc, site),
      hint,
    });
  }
  return drafts;
}

/** Longest lengthening offered for a ratio (area ×64): beyond it a cascode is the answer. */
const MAX_RATIO_LENGTHEN = 8;

/** The ratio misses mostly by length modulation (not by sizing, body effect or gate drive). */
function vdsCaused(split: ErrorSplit | undefined, ideal: number | undefined, target: number, limit: number): boolean {
  if (!split || isBipolarSplit(split) || (ideal !== undefined && Math.abs(ideal / target - 1) > limit)) return false;
  const v = Math.abs(split.vds);
  return v > limit / 2 && [split.body, split.geometry, split.gate ?? 0].every((x) => v >= Math.abs(x));
}

/** The causes of a ratio error, largest first, so the one that matters leads the message;
 *  causes that contribute nothing (under 0.005 %) are never named, so a term whose voltage
 *  difference is zero cannot be blamed. */
function causes(split: ErrorSplit | undefined, ideal: number | undefined, required: number | undefined): string {
  const parts: { text: string; size: number }[] = [];
  if (required !== undefined && ideal !== undefined && Math.abs(ideal / required - 1) > 1e-9) {
    const e = ideal / required - 1;
    parts.push({ text: `sizing ${formatSignedPercent(e)} (geometric ratio ${formatRatio(ideal)})`, size: Math.abs(e) });
  }
  if (split) {
    const named: [string, number][] = isBipolarSplit(split)
      ? [['base current', split.base], ['VCE mismatch (Early)', split.vce], ['geometry', split.geometry]]
      : [['VDS mismatch', split.vds], ['body effect', split.body], ['gate drive', split.gate ?? 0], ['geometry', split.geometry]];
    for (const [label, v] of named) if (Math.abs(v) >= 5e-5) parts.push({ text: `${label} ${formatSignedPercent(v)}`, size: Math.abs(v) });
  }
  parts.sort((a, b) => b.size - a.size);
  return parts.length > 0 ? `: ${parts.map((p) => p.text).join(', ')}` : '';
}
