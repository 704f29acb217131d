/** square-law-weak-inversion (info): a model made for strong inversion (the square law) is
 *  being trusted below IC = 1. The code keeps its name; the model says whether it applies. */
import { isBipolarReport } from '../../device-types';
import type { Draft, RuleContext } from '../model';
import { draftKey } from '../model';
import { deviceRange, refOf, type Site } from '../sites';
import { modelPlans } from '../plans';
import { MODELS, WEAK_INVERSION_MODEL } from '../../models/registry';
import { code } from '../../text/format';
import { paramsOfDevice, siteDevices } from './common';

export function checkInversion(rc: RuleContext, site: Site, seen: Set<string>): Draft[] {
  const model = MODELS[rc.spec.process.model];
  const wide = WEAK_INVERSION_MODEL;
  if (model.coversWeakInversion || wide === undefined) return [];
  // A table device follows the designer's data, not the process model; a bipolar device has no inversion level.
  const low = siteDevices(site).filter((d) => !isBipolarReport(d) && !paramsOfDevice(rc.spec, site, d).table && d.ic < 1 && !seen.has(`${site.mirrorIndex}/${d.name}`)).sort((a, b) => a.ic - b.ic);
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
        `where the ${model.title} overestimates gm/ID; \`model: ${wide}\` covers it`,
    },
    plan: () => modelPlans(rc, site.mirrorIndex),
  }];
}
