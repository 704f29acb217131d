/**
 * Drift and noise (design §12): `noise-high`, `tc-high`, `supply-sensitivity-high` against the
 * output's `require`, and `filter-adds-noise` when a gate filter raises the output noise at
 * analysis.noise.f instead of lowering it (its resistor's 4kT·R above the diode's 4kT·γ/gm).
 */
import type { Range, ResolvedSpec, SpecPath, TemplateMirror, TextEdit } from '../../types';
import type { Draft, FixPlan, RuleContext } from '../model';
import { draftKey } from '../model';
import { deviceRange, kindRange, refOf, siteOf, valueRange, type Site } from '../sites';
import { indexOf } from '../../mirror-at';
import { measure, withMirror } from '../../sizing/devices';
import { lengthenPlans, widenPlans } from '../plans';
import { replaceValueEdit } from '../../spec/edit';
import { code, formatPercent, formatSI } from '../../text/format';
import { mirrorParams } from '../../flavours';
import { isBipolarType } from '../../device-types';

const ppm = (x: number): string => `${x >= 0 ? '+' : '-'}${Math.abs(x).toPrecision(3)} ppm/°C`;

/** Where a share's element is written: a device's size, the input resistor, the filter. A
 *  linked output's shares name another mirror's elements by path (`mirror/element`). */
function elementRange(rc: RuleContext, site: Site, name: string): { path: SpecPath; range: Range } {
  const slash = name.indexOf('/');
  const other = slash > 0 ? rc.spec.mirrors.find((x) => x.name === name.slice(0, slash)) : undefined;
  const m = other ?? site.mirror;
  const mirrorIndex = indexOf(m);
  const local = other ? name.slice(slash + 1) : name;
  if (local.startsWith('filter') && m.kind !== 'netlist' && m.filter) return valueRange(rc.parsed, [...m.path, 'filter', 'c']);
  if (local === 'input' && m.kind !== 'netlist' && m.input.kind === 'resistor') return valueRange(rc.parsed, [...m.path, 'input', 'resistor']);
  const report = other ? rc.reports.find((r) => r.mirrorIndex === mirrorIndex && r.devices.some((x) => x.name === local)) : site.report;
  const at = report && (other ? siteOf(rc.spec, report) : site);
  const d = report?.devices.find((x) => x.name === local);
  return at && d ? deviceRange(rc.parsed, rc.spec, refOf(at, d), ['w', 'l']) : kindRange(rc.parsed, mirrorIndex);
}

/** The element with the largest share of the density², and that share. */
function dominant(shares: Record<string, number>): [string, number] | undefined {
  let best: [string, number] | undefined;
  for (const [k, v] of Object.entries(shares)) if (!best || v > best[1]) best = [k, v];
  return best;
}

function withFilterC(spec: ResolvedSpec, m: TemplateMirror, mirrorIndex: number, c: number): ResolvedSpec {
  return withMirror(spec, mirrorIndex, { ...m, filter: { r: m.filter!.r, c } });
}

/** c rounded up to two significant digits, so the written value still meets the goal. */
function ceil2(c: number): number {
  const e = Math.floor(Math.log10(c)) - 1;
  return Math.ceil(c / 10 ** e - 1e-9) * 10 ** e;
}

/** The smallest filter capacitance (doubling, then bisection) up to 1000× today's at which
 *  `goal` holds (≥ 0), as an edit of the `c` value. */
function* filterPlans(rc: RuleContext, site: Site, goal: (s: ResolvedSpec) => number, purpose: string): Generator<{ family: string; build: () => FixPlan | undefined }> {
  const m = site.mirror;
  if (m.kind === 'netlist' || !m.filter) return;
  const c0 = m.filter.c;
  const ok = (c: number): boolean => goal(withFilterC(rc.spec, m, site.mirrorIndex, c)) >= 0;
  let hi = c0 * 2;
  while (hi <= c0 * 1024 && !ok(hi)) hi *= 2;
  if (hi > c0 * 1024) return;
  let lo = hi / 2;
  for (let i = 0; i < 12; i++) { const mid = Math.sqrt(lo * hi); if (ok(mid)) hi = mid; else lo = mid; }
  for (const c of [ceil2(hi), ceil2(hi * 1.2)]) {
    yield {
      family: 'filter-c',
      build: () => {
        const e: TextEdit | undefined = replaceValueEdit(rc.parsed, [...m.path, 'filter', 'c'], formatSI(c, 'F'));
        return e ? { title: `Set the gate filter's c to ${formatSI(c, 'F')} (pole at ${formatSI(1 / (2 * Math.PI * m.filter!.r * c), 'Hz')}) ${purpose}`, edits: [e], scope: 'mirror', mirrorIndex: site.mirrorIndex, family: 'filter-c' } : undefined;
      },
    };
  }
}

export function checkNoise(rc: RuleContext, site: Site): Draft[] {
  const need = site.require.noise;
  const n = site.report.noise;
  if (need === undefined || !n || !(n.density > need)) return [];
  const top = dominant(n.shares);
  const at = top ? elementRange(rc, site, top[0]) : kindRange(rc.parsed, site.mirrorIndex);
  const req = valueRange(rc.parsed, [...site.path, 'require', 'noise']);
  const flickerDominant = n.corner !== undefined && n.corner > n.f;
  const what = top ? `; ${code(top[0])} carries ${formatPercent(top[1])} of it${flickerDominant ? ' (flicker: the corner is ' + formatSI(n.corner!, 'Hz') + ')' : ''}` : '';
  const goal = (s: ResolvedSpec): number => {
    const r = measure(s, site.mirrorIndex, site.outputIndex);
    return r?.converged && r.noise ? 1 - r.noise.density / need : NaN;
  };
  const purpose = `for noise ≤ ${formatSI(need, 'A/√Hz')} at ${formatSI(n.f, 'Hz')}`;
  return [{
    key: draftKey('noise-high', site.path),
    mirrorIndex: site.mirrorIndex,
    finding: {
      severity: 'error', code: 'noise-high', path: at.path, range: at.range,
      related: [{ path: req.path, range: req.range, message: `required noise ≤ ${formatSI(need, 'A/√Hz')}` }],
      message: `output noise ${formatSI(n.density, 'A/√Hz')} at ${formatSI(n.f, 'Hz')} is above the required ${formatSI(need, 'A/√Hz')}${what}`,
    },
    plan: () => (function* () {
      if (top && top[0].startsWith('filter')) yield* filterPlans(rc, site, goal, purpose);
      // Flicker falls with the gate area at constant W/L; thermal noise with a lower gm (longer L).
      yield* lengthenPlans(rc, site.mirrorIndex, goal, purpose);
    })(),
    hint: isBipolarType(site.mirror.type)
      ? 'shot noise follows the current: emitter degeneration or a base-line filter with a pole below f lowers what reaches the output'
      : flickerDominant ? 'enlarge the gate area of the dominant device (flicker ∝ 1/(W·L))' : 'lower gm (a longer L, a higher overdrive) or add a gate filter with a pole below f',
  }];
}

export function checkFilterNoise(rc: RuleContext, site: Site): Draft[] {
  const m = site.mirror;
  const n = site.report.noise;
  if (m.kind === 'netlist' || !m.filter || !n || rc.quick) return [];
  const bare: TemplateMirror = { ...m };
  delete bare.filter;
  const without = measure(withMirror(rc.spec, site.mirrorIndex, bare), site.mirrorIndex, site.outputIndex)?.noise;
  if (!without || !(n.density > without.density * 1.001)) return [];
  const at = valueRange(rc.parsed, [...m.path, 'filter', 'r']);
  const goal = (s: ResolvedSpec): number => {
    const r = measure(s, site.mirrorIndex, site.outputIndex);
    return r?.converged && r.noise ? 1 - r.noise.density / without.density : NaN;
  };
  return [{
    key: draftKey('filter-adds-noise', site.path),
    mirrorIndex: site.mirrorIndex,
    finding: {
      severity: 'warning', code: 'filter-adds-noise', path: at.path, range: at.range,
      message: `the gate filter raises the output noise at ${formatSI(n.f, 'Hz')} from ${formatSI(without.density, 'A/√Hz')} to ${formatSI(n.density, 'A/√Hz')}: its resistor's noise (4kT·R) reaches the output gates below the pole at ${formatSI(1 / (2 * Math.PI * m.filter.r * m.filter.c), 'Hz')}`,
    },
    plan: () => filterPlans(rc, site, goal, `so the filter lowers the noise at ${formatSI(n.f, 'Hz')}`),
    hint: 'a larger c (pole well below f) or a smaller r',
  }];
}

/** The anchor of a drift finding: the input resistor when it sets the current, else the output device. */
function driftRange(rc: RuleContext, site: Site): { path: SpecPath; range: Range } {
  const m = site.mirror;
  if (m.kind !== 'netlist' && m.input.kind === 'resistor') return valueRange(rc.parsed, [...m.path, 'input', 'resistor']);
  const d = site.report.devices.find((x) => x.role === 'out' && refOf(site, x).output === site.outputIndex) ?? site.report.devices[0];
  return d ? deviceRange(rc.parsed, rc.spec, refOf(site, d), ['l', 'w']) : kindRange(rc.parsed, site.mirrorIndex);
}

export function checkTc(rc: RuleContext, site: Site): Draft[] {
  const need = site.require.tc;
  const r = site.report;
  if (need === undefined || r.tc === undefined) return [];
  const worst = Math.max(Math.abs(r.tc), r.tcBox ?? 0);
  if (!(worst > need)) return [];
  const at = driftRange(rc, site);
  const req = valueRange(rc.parsed, [...site.path, 'require', 'tc']);
  const box = r.tcBox !== undefined ? ` (box ${r.tcBox.toPrecision(3)} ppm/°C over process.trange)` : '';
  const goal = (s: ResolvedSpec): number => {
    const x = measure(s, site.mirrorIndex, site.outputIndex);
    return x?.converged && x.tc !== undefined ? 1 - Math.max(Math.abs(x.tc), x.tcBox ?? 0) / need : NaN;
  };
  // The mirror's own flavour; a table device follows its table, not the tcv/bex laws; a bipolar
  // mirror has no zero-TC bias point.
  const type = site.mirror.type;
  const p = isBipolarType(type) ? undefined : mirrorParams(rc.spec.process, site.mirror, type);
  const ztc = p && p.bex !== 0 && !p.table ? (2 * Math.abs(p.tcv) * rc.spec.process.temperature) / Math.abs(p.bex) : NaN;
  return [{
    key: draftKey('tc-high', site.path),
    mirrorIndex: site.mirrorIndex,
    finding: {
      severity: 'error', code: 'tc-high', path: at.path, range: at.range,
      related: [{ path: req.path, range: req.range, message: `required |tc| ≤ ${need} ppm/°C` }],
      message: `output current drifts ${ppm(r.tc)}${box}, above the required ${need} ppm/°C`,
    },
    plan: () => widenPlans(rc, site.mirrorIndex, goal, `for |tc| ≤ ${need} ppm/°C`, 'widen-tc'),
    hint: Number.isFinite(ztc) && ztc > 0
      ? `the square law's zero-TC overdrive here is 2·|tcv|·T/|bex| = ${formatSI(ztc, 'V')}; a resistor's tc1 can cancel the rest`
      : 'a resistor tc1 of the opposite sign can cancel the drift',
  }];
}

export function checkSupplySensitivity(rc: RuleContext, site: Site): Draft[] {
  const need = site.require.supplySensitivity;
  const s = site.report.supplySensitivity;
  if (need === undefined || s === undefined || !(Math.abs(s) > need)) return [];
  const at = driftRange(rc, site);
  const req = valueRange(rc.parsed, [...site.path, 'require', 'supplySensitivity']);
  const goal = (x: ResolvedSpec): number => {
    const r = measure(x, site.mirrorIndex, site.outputIndex);
    return r?.converged && r.supplySensitivity !== undefined ? 1 - Math.abs(r.supplySensitivity) / need : NaN;
  };
  const resistorFed = site.mirror.kind !== 'netlist' && site.mirror.input.kind === 'resistor';
  return [{
    key: draftKey('supply-sensitivity-high', site.path),
    mirrorIndex: site.mirrorIndex,
    finding: {
      severity: 'error', code: 'supply-sensitivity-high', path: at.path, range: at.range,
      related: [{ path: req.path, range: req.range, message: `required supply sensitivity ≤ ${need}` }],
      message: `supply sensitivity (vdd/iout)·∂iout/∂vdd is ${s.toPrecision(3)}, above the required ${need}`,
    },
    plan: () => lengthenPlans(rc, site.mirrorIndex, goal, `for supply sensitivity ≤ ${need}`),
    hint: resistorFed
      ? 'a resistor from the supply sets the current itself (S ≈ vdd/(I·(R + 1/gm))): feed the mirror from a self-biased reference'
      : 'a longer output device or a cascode raises the output resistance',
  }];
}
