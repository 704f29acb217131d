/**
 * Fixes a bipolar designer expects for a ratio error: when base currents take the larger share,
 * the kind that returns them (a simple mirror becomes a beta-helper mirror); else the emitter-area
 * ratio of the output device for the target ratio, from re-solves of the whole circuit (the
 * Early effect and the base currents included). Each is verified by the caller like every fix.
 */
import type { BipolarErrorSplit } from '../types';
import type { RuleContext } from './model';
import { quotedLike, replaceValueEdit } from '../spec/edit';
import { resized, sameRef, sizeOf, type DeviceRef } from '../sizing/devices';
import { ratioAt } from '../sizing/ratio';
import { quantizeSize } from '../sizing/quantize';
import { candidate, devicePlan, fixable, plan, type Candidate } from './plans';
import type { KeyInsert } from './build-edits';
import { shortDecimal } from '../sizing/token-style';
import type { Site } from './sites';
import { formatRatio } from '../text/format';

/** Whether the base currents explain most of the error (more than the other causes together). */
export function baseDominated(split: BipolarErrorSplit): boolean {
  return Math.abs(split.base) > Math.abs(split.vce) + Math.abs(split.geometry);
}

/** `kind: simple` → `beta-helper`: its helper supplies the base currents (ratio error 2/β²). */
export function* betaHelperPlans(rc: RuleContext, site: Site): Generator<Candidate> {
  if (site.mirror.kind !== 'simple') return;
  const path = ['mirrors', site.mirrorIndex, 'kind'];
  const range = rc.parsed.source.value(path);
  if (!range) return;
  const edit = replaceValueEdit(rc.parsed, path, quotedLike(rc.parsed.source.text(range), 'beta-helper'));
  if (!edit) return;
  yield candidate('beta-helper', () => plan(site.mirrorIndex, 'Switch to the beta-helper mirror (`kind: beta-helper`): its `helper` supplies the base currents', [edit], 'beta-helper'));
}

/** Emitter area of `device` for iout/iin = target: a proportional step, then secant steps. */
function areaForRatio(rc: RuleContext, site: Site, device: DeviceRef, target: number): number | undefined {
  const size = sizeOf(rc.spec, device);
  if (!size || !(target > 0)) return undefined;
  const f = (area: number): number => ratioAt(resized(rc.spec, site.mirrorIndex, (r, s) => (sameRef(r, device) ? { ...s, area } : undefined)), site.mirrorIndex, site.outputIndex) / target - 1;
  let a = size.area ?? 1;
  let fa = f(a);
  if (!Number.isFinite(fa)) return undefined;
  let b = a / (1 + fa);
  for (let k = 0; k < 8; k++) {
    const fb = f(b);
    if (!Number.isFinite(fb)) return undefined;
    if (Math.abs(fb) < 1e-6 || fb === fa) return b;
    const next = b - (fb * (b - a)) / (fb - fa);
    a = b; fa = fb;
    b = next > 0 ? next : b / 2;
  }
  return b;
}

/** Set the output device's `area` for the target ratio. `stateRatio`: also write
 *  `require.ratio` (the intent was the geometric ratio, which the new area no longer shows). */
export function* areaRatioPlans(rc: RuleContext, site: Site, device: DeviceRef, target: number, stateRatio: boolean): Generator<Candidate> {
  if (!fixable(rc, site.mirrorIndex)) return;
  const area = areaForRatio(rc, site, device, target);
  if (area === undefined || !(area > 0)) return;
  const value = quantizeSize(area, undefined, 'nearest');
  const extra: KeyInsert[] = stateRatio ? [{ parent: [...site.path, 'require'], key: 'ratio', text: shortDecimal(target, 6) }] : [];
  const stated = stateRatio ? ` and state require.ratio ${shortDecimal(target, 6)}` : '';
  yield candidate('area', () => devicePlan(rc, site, [{ ref: device, key: 'area', value }], extra,
    (notes) => `Set the emitter area for ratio ${formatRatio(target)}: ${notes}${stated}`, 'area'));
}
