/**
 * Candidate fixes, computed by the sizing solvers on modified copies of the resolved spec and
 * written as minimal edits. Each generator yields candidates best first, lazily (a solver runs
 * only when its candidates are wanted); the caller verifies each by re-parsing and re-solving the
 * edited text and offers the first of each family that holds.
 */
import type { ResolvedSpec, TextEdit } from '../types';
import type { RuleContext, FixPlan } from './model';
import { allDevices, sizeOf, type DeviceRef } from '../sizing/devices';
import { quantizeSize, type RoundDirection } from '../sizing/quantize';
import { scaleForGoal, areaScaleForSigma } from '../sizing/scale';
import { widthForRatio, countForRatio } from '../sizing/ratio';
import { pickedVbias } from '../sizing/vbias';
import { balancedBalSize } from '../sizing/balance';
import { shortDecimal } from '../sizing/token-style';
import { quotedLike, replaceValueEdit } from '../spec/edit';
import { formatValue, notesText, planSizeEdits, type SizeChange } from './size-edits';
import { buildEdits, type KeyInsert } from './build-edits';
import { paramsOf, planParamEdits } from './param-edits';
import { isAutoSized, overridePath, type Site } from './sites';
import { formatFactor, formatSI } from '../text/format';
import { indexOf } from '../mirror-at';
import { MODELS, WEAK_INVERSION_MODEL } from '../models/registry';

/** Mirrors with `auto` sizes are sized by the design-target pass first; their fixes come from it. */
export function fixable(rc: RuleContext, mirrorIndex: number): boolean {
  return !isAutoSized(rc.spec, mirrorIndex);
}

function scaleChanges(spec: ResolvedSpec, mirrorIndex: number, k: { w?: number; l?: number }, dir: RoundDirection): SizeChange[] {
  const grid = spec.process.grid;
  const out: SizeChange[] = [];
  for (const ref of allDevices(spec, mirrorIndex)) {
    const s = sizeOf(spec, ref);
    if (!s) continue;
    if (k.w !== undefined) out.push({ ref, key: 'w', value: quantizeSize(s.w * k.w, grid, dir) });
    if (k.l !== undefined) out.push({ ref, key: 'l', value: quantizeSize(s.l * k.l, grid, dir) });
  }
  return out;
}

export function plan(mirrorIndex: number, title: string, edits: TextEdit[] | undefined, family: string): FixPlan | undefined {
  return edits && edits.length > 0 ? { title, edits, scope: 'mirror', mirrorIndex, family } : undefined;
}

/** A lazily built fix: solvers run when the generator advances, edits when `build` is called. */
export interface Candidate { family: string; build: () => FixPlan | undefined }

export function candidate(family: string, build: () => FixPlan | undefined): Candidate {
  return { family, build };
}

/** Widen every device by one factor (lower VOV), smallest factor that meets `goal` (≥ 0). */
export function* widenPlans(rc: RuleContext, mirrorIndex: number, goal: (s: ResolvedSpec) => number, purpose: string, family = 'widen'): Generator<Candidate> {
  if (!fixable(rc, mirrorIndex)) return;
  const k = scaleForGoal(rc.spec, mirrorIndex, { w: true, l: false }, goal);
  if (k === undefined) return;
  for (const kk of [k, k * 1.03, k * 1.1]) {
    yield* scaleCandidates(rc, mirrorIndex, scaleChanges(rc.spec, mirrorIndex, { w: kk }, 'up'), family,
      (notes) => `Widen the mirror ${formatFactor(kk)} (every W, ratios kept) ${purpose}: ${notes}`);
  }
}

/**
 * One scaling as candidates: the local edit of the size tokens, and — where they are written
 * through a param (`w: wu`) — the edit of the param, whole-file scope since every mirror reading
 * it changes (rules/param-edits.ts). The param edit comes first when no other mirror reads it.
 */
function* scaleCandidates(rc: RuleContext, mirrorIndex: number, changes: SizeChange[], family: string, title: (notes: string) => string): Generator<Candidate> {
  const local = candidate(family, () => {
    const p = planSizeEdits(rc.parsed, rc.spec, changes, rc.json, rc.file, rc.fragments);
    return p && plan(mirrorIndex, title(notesText(p.notes)), p.edits, family);
  });
  const via = paramsOf(rc.parsed, rc.spec, changes);
  if (!via) { yield local; return; }
  const viaParam = candidate(`${family}-param`, () => {
    const p = planParamEdits(rc.parsed, rc.spec, changes, rc.json, rc.file);
    if (!p) return undefined;
    const names = p.params.map((n) => `\`${n}\``).join(', ');
    const what = p.params.length === 1 ? `param ${names}` : `params ${names}`;
    const shared = p.sharedWith.length > 0 ? ` (${what}, also read by ${p.sharedWith.map((n) => `\`${n}\``).join(', ')})` : ` (${what})`;
    return { title: `${title(notesText(p.notes))}${shared}`, edits: p.edits, scope: 'spec', mirrorIndex, family: `${family}-param` };
  });
  if (via.sharedWith.length === 0) { yield viaParam; yield local; } else { yield local; yield viaParam; }
}

/** Lengthen every device at constant W/L, smallest factor up to kMax that meets `goal`. */
export function* lengthenPlans(rc: RuleContext, mirrorIndex: number, goal: (s: ResolvedSpec) => number, purpose: string, kMax = 64): Generator<Candidate> {
  if (!fixable(rc, mirrorIndex)) return;
  const k = scaleForGoal(rc.spec, mirrorIndex, { w: true, l: true }, goal, kMax);
  if (k === undefined) return;
  for (const kk of [k, k * 1.03, k * 1.1]) {
    yield* scaleCandidates(rc, mirrorIndex, scaleChanges(rc.spec, mirrorIndex, { w: kk, l: kk }, 'up'), 'lengthen',
      (notes) => `Lengthen the mirror ${formatFactor(kk)} at constant W/L ${purpose}: ${notes}`);
  }
}

/** Scale the gate area at constant W/L for a required sigma (Pelgrom closed form, verified). */
export function* areaPlans(rc: RuleContext, site: Site, target: number): Generator<Candidate> {
  if (!fixable(rc, site.mirrorIndex)) return;
  const s = areaScaleForSigma(rc.spec, site.mirrorIndex, site.outputIndex, target);
  if (s === undefined) return;
  for (const ss of [s, s * 1.03, s * 1.1]) {
    yield* scaleCandidates(rc, site.mirrorIndex, scaleChanges(rc.spec, site.mirrorIndex, { w: ss, l: ss }, 'up'), 'area',
      (notes) => `Scale the gate area ${formatFactor(ss * ss)} at constant W/L (σ ∝ 1/√(W·L)): ${notes}`);
  }
}

/** Set sizes of some devices (overrides where a shared token cannot change), plus extra keys. */
export function devicePlan(rc: RuleContext, site: Site, changes: SizeChange[], extra: KeyInsert[], title: (notes: string) => string, family: string): FixPlan | undefined {
  const p = planSizeEdits(rc.parsed, rc.spec, changes, rc.json, rc.file, rc.fragments);
  if (!p) return undefined;
  let edits = p.edits;
  if (extra.length > 0) {
    // Compose with the extra insertions: apply the size edits, then insert on the result.
    const merged = buildEdits(rc.parsed, edits, extra, rc.file, rc.fragments);
    if (!merged) return undefined;
    edits = merged;
  }
  return plan(site.mirrorIndex, title(notesText(p.notes)), edits, family);
}

/**
 * W of the ratio device for the target ratio (length modulation included), then m when an
 * integer count hits the target. `stateRatio`: also write `require.ratio` (the intent was
 * the geometric ratio, which the new width no longer shows).
 */
export function* ratioPlans(rc: RuleContext, site: Site, device: DeviceRef, target: number, stateRatio: boolean, countFirst = false): Generator<Candidate> {
  if (!fixable(rc, site.mirrorIndex)) return;
  const size = sizeOf(rc.spec, device);
  if (!size) return;
  const extra: KeyInsert[] = stateRatio ? [{ parent: [...site.path, 'require'], key: 'ratio', text: shortDecimal(target, 6) }] : [];
  const stated = stateRatio ? ` and state require.ratio ${shortDecimal(target, 6)}` : '';
  const byCount = function* (): Generator<Candidate> {
    if (stateRatio) return;
    const m = countForRatio(rc.spec, site.mirrorIndex, site.outputIndex, device, target);
    if (m !== undefined) {
      yield candidate('ratio-m', () => devicePlan(rc, site, [{ ref: device, key: 'm', value: m }], [], (notes) => `Use ${m} parallel \`${device.role}\` devices: ${notes}`, 'ratio-m'));
    }
  };
  // A wrong parallel count (geometric 4 for a required 3) is fixed where it was made: m first.
  const ideal = site.report.ratioIdeal;
  const sizingError = !stateRatio && ideal !== undefined && Math.abs(ideal / target - 1) > rc.spec.limits.error;
  if (sizingError || countFirst) yield* byCount();
  const w = widthForRatio(rc.spec, site.mirrorIndex, site.outputIndex, device, target);
  if (w !== undefined) {
    const grid = rc.spec.process.grid;
    const seen = new Set<number>();
    for (const dir of ['nearest', 'up', 'down'] as const) {
      const value = quantizeSize(w, grid, dir);
      if (seen.has(value)) continue;
      seen.add(value);
      yield candidate('ratio-w', () => devicePlan(rc, site, [{ ref: device, key: 'w', value }], extra,
        (notes) => `Size \`${device.role}\` for ratio ${shortDecimal(target, 6)} including length modulation${stated}: ${notes}`, 'ratio-w'));
    }
  }
  if (!sizingError && !countFirst) yield* byCount();
}

/**
 * A simple mirror becomes a cascode (`kind: cascode`): `outc` holds `out` at the VDS of `ref`,
 * which removes a VDS-mismatch error at its cause. `outc` gets the sizes written for `out`
 * (its m, W, L), `refc` those written for `ref`, so each cascode carries its partner's current
 * density.
 */
export function* cascodePlans(rc: RuleContext, site: Site): Generator<Candidate> {
  const m = site.mirror;
  if (m.kind !== 'simple' || !fixable(rc, site.mirrorIndex)) return;
  const path = ['mirrors', site.mirrorIndex, 'kind'];
  const range = rc.parsed.source.value(path);
  if (!range) return;
  const kindEdit = replaceValueEdit(rc.parsed, path, quotedLike(rc.parsed.source.text(range), 'cascode'));
  if (!kindEdit) return;
  yield candidate('cascode', () => {
    const extra: KeyInsert[] = [];
    for (const [from, to] of [['ref', 'refc'], ['out', 'outc']] as const) {
      for (const ref of allDevices(rc.spec, site.mirrorIndex).filter((r) => r.role === from)) {
        const own = overridePath(rc.spec, ref);
        for (const key of ['w', 'l', 'm'] as const) {
          const tok = rc.parsed.source.value([...own, key]);
          if (tok) extra.push({ parent: [...own.slice(0, -1), to], key, text: rc.parsed.source.text(tok) });
        }
      }
    }
    const edits = extra.length > 0 ? buildEdits(rc.parsed, [kindEdit], extra, rc.file, rc.fragments) : [kindEdit];
    return plan(site.mirrorIndex, 'Make it a cascode (`kind: cascode`): `outc` holds `out` at the VDS of `ref`', edits, 'cascode');
  });
}

/** Set one device's size keys (e.g. raise L to lmin at constant W/L). */
export function* setSizePlans(rc: RuleContext, site: Site, changes: () => SizeChange[], title: (notes: string) => string, family: string): Generator<Candidate> {
  if (!fixable(rc, site.mirrorIndex)) return;
  yield candidate(family, () => devicePlan(rc, site, changes(), [], title, family));
}

/** Write qpoint's own vbias pick in place of the written one (rounded to 1 mV). */
export function* vbiasPlans(rc: RuleContext, site: Site, marginText: string): Generator<Candidate> {
  const picked = pickedVbias(rc.spec, site.mirrorIndex, site.outputIndex);
  if (picked === undefined) return;
  const path = ['mirrors', site.mirrorIndex, 'vbias'];
  const range = rc.parsed.source.value(path);
  if (!range) return;
  const token = rc.parsed.source.text(range);
  const seen = new Set<number>();
  for (const dir of ['up', 'nearest', 'down'] as const) {
    const mv = dir === 'up' ? Math.ceil(picked * 1000 - 1e-9) : dir === 'down' ? Math.floor(picked * 1000 + 1e-9) : Math.round(picked * 1000);
    const v = mv / 1000;
    if (seen.has(v)) continue;
    seen.add(v);
    yield candidate('vbias', () => {
      const edit = replaceValueEdit(rc.parsed, path, formatValue('v', v, token, rc.json));
      return edit && plan(site.mirrorIndex, `Set vbias to ${formatSI(v, 'V')} (qpoint's pick: \`ref\` at VDSsat + ${marginText})`, [edit], 'vbias');
    });
  }
}

/** `kind: wilson` → `wilson-balanced`; `bal` is the unit device unless out's current density needs another width. */
export function* balancedPlans(rc: RuleContext, site: Site): Generator<Candidate> {
  const m = site.mirror;
  if (m.kind !== 'wilson') return;
  const path = ['mirrors', site.mirrorIndex, 'kind'];
  const range = rc.parsed.source.value(path);
  if (!range) return;
  const token = rc.parsed.source.text(range);
  const kindEdit = replaceValueEdit(rc.parsed, path, quotedLike(token, 'wilson-balanced'));
  if (!kindEdit) return;
  const title = 'Switch to the balanced Wilson (its `bal` diode equalises VDS of `in` and `diode`)';
  yield candidate('balanced', () => plan(site.mirrorIndex, title, [kindEdit], 'balanced'));
  const ratio = site.report.ratioIdeal ?? site.report.ratio ?? NaN;
  const bal = balancedBalSize(m, ratio);
  if (bal && fixable(rc, site.mirrorIndex)) {
    const w = quantizeSize(bal.w, rc.spec.process.grid, 'nearest');
    const unit = sizeOf(rc.spec, { mirror: site.mirrorIndex, role: 'in' });
    const extra: KeyInsert[] = [{ parent: ['mirrors', site.mirrorIndex, 'devices', 'bal'], key: 'w', text: formatValue('w', w, undefined, rc.json) }];
    if (bal.l !== unit?.l) extra.push({ parent: ['mirrors', site.mirrorIndex, 'devices', 'bal'], key: 'l', text: formatValue('l', bal.l, undefined, rc.json) });
    if (bal.m !== 1) extra.push({ parent: ['mirrors', site.mirrorIndex, 'devices', 'bal'], key: 'm', text: formatValue('m', bal.m, undefined, rc.json) });
    yield candidate('balanced', () => plan(site.mirrorIndex, `${title}, \`bal\` W ${formatValue('w', w, undefined, false)} for out's current density`,
      buildEdits(rc.parsed, [kindEdit], extra, rc.file, rc.fragments), 'balanced'));
  }
}

/** `process.model:` the model that covers weak inversion (whole-file scope). */
export function* modelPlans(rc: RuleContext, mirrorIndex: number): Generator<Candidate> {
  // The re-check re-solves the whole file; auto-sized mirrors are sized by another pass first.
  if (rc.spec.mirrors.some((m) => isAutoSized(rc.spec, indexOf(m)))) return;
  yield candidate('model', () => modelPlan(rc, mirrorIndex));
}

function modelPlan(rc: RuleContext, mirrorIndex: number): FixPlan | undefined {
  const name = WEAK_INVERSION_MODEL;
  if (name === undefined) return undefined;
  const path = ['process', 'model'];
  const range = rc.parsed.source.value(path);
  let edits: TextEdit[] | undefined;
  if (range) {
    const token = rc.parsed.source.text(range);
    const e = replaceValueEdit(rc.parsed, path, quotedLike(token, name));
    edits = e ? [e] : undefined;
  } else {
    edits = buildEdits(rc.parsed, [], [{ parent: ['process'], key: 'model', text: rc.json ? `"${name}"` : name }], rc.file);
  }
  if (!edits) return undefined;
  return { title: `Use the ${MODELS[name].title} (\`model: ${name}\`), valid from weak to strong inversion`, edits, scope: 'spec', mirrorIndex, family: 'model' };
}

