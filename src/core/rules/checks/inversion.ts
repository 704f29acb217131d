/** square-law-weak-inversion (info): the square law is being trusted below IC = 1. */
import type { Draft, RuleContext } from '../model';
import { draftKey } from '../model';
import { deviceRange, refOf, type Site } from '../sites';
import { modelPlans } from '../plans';
import { code } from '../../text/format';
import { siteDevices } from './common';

export function checkInversion(rc: RuleContext, site: Site, seen: Set<string>): Draft[] {
  if (rc.spec.process.model !== 'square-law') return [];
  const low = siteDevices(site).filter((d) => d.ic < 1 && !seen.has(`${site.mirrorIndex}/${d.name}`)).sort((a, b) => a.ic - b.ic);
  if (low.length === 0) return [];
  for (const d of low) seen.add(`${site.mirrorIndex}/${d.name}`);
  const worst = low[0];
  const at = deviceRange(rc.parsed, rc.spec, refOf(site, worst), ['w']);
  const others = low.slice(1).map((d) => `${code(d.name)} ${d.ic.toPrecision(2)}`);
  const region = worst.ic < 0.1 ? 'weak' : 'moderate';
  return [{
    key: draftKey('square-law-weak-inversion', site.path, worst.name),
    mirrorIndex: site.mirrorIndex,
    finding: {
      severity: 'info', code: 'square-law-weak-inversion', path: at.path, range: at.range,
      message: `${code(worst.name)} runs at inversion coefficient ${worst.ic.toPrecision(2)} (${region} inversion)${others.length ? `, also ${others.join(', ')}` : ''}, ` +
        'where the square law overestimates gm/ID; `model: ekv` covers it',
    },
    plan: () => modelPlans(rc, site.mirrorIndex),
  }];
}
