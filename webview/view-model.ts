/**
 * From a finished report to what the panel shows: formatted figures, table rows, which
 * requirement holds, which finding or anchor a row reveals. Pure (no DOM) so vitest covers it;
 * the DOM code in render.ts only lays these out. Nothing here is physics: every number comes
 * from the core's report, this module only picks, formats and cross-references.
 */
import type {
  Anchor, CornerResult, DeviceReport, FileReport, Finding, MirrorReport, Range, Requirements,
  Severity, SpecPath,
} from '../src/core/types';
import { formatNumber, formatPercent, formatSI, formatSignedPercent } from './format';
import { isBipolarReport, isBipolarSplit, isBipolarType, sinksCurrent, workingRegion } from '../src/core/device-types';

/** The caution line every view carries (design §7); one text for the panel and the report. */

const SEVERITY_RANK: Record<Severity, number> = { error: 0, warning: 1, info: 2 };

// ───────────────────────────── which findings belong where ─────────────────────────────

function startsWith(path: SpecPath, prefix: SpecPath): boolean {
  return prefix.length <= path.length && prefix.every((s, i) => path[i] === s);
}

/** ['mirrors', i] of a mirror report's path (an output of a bank sits below it). */
function mirrorRoot(path: SpecPath): SpecPath {
  return path.slice(0, 2);
}

/** Does a finding concern this output? Findings under its own path do; for an output of a bias
 *  bank, so do findings on the shared reference (the mirror's path, outside `outputs`). */
export function concerns(mirror: MirrorReport, finding: Finding): boolean {
  if (startsWith(finding.path, mirror.path)) return true;
  const root = mirrorRoot(mirror.path);
  if (mirror.path.length <= root.length || !startsWith(finding.path, root)) return false;
  return finding.path[root.length] !== 'outputs';
}

export function findingsFor(report: FileReport, mirror: MirrorReport): Finding[] {
  return report.findings.filter((f) => concerns(mirror, f));
}

/** Findings that belong to no mirror output (process, supplies, parse errors). */
export function fileFindings(report: FileReport): Finding[] {
  return report.findings.filter((f) => !report.mirrors.some((m) => concerns(m, f)));
}

function worstSeverity(findings: readonly Finding[]): Severity | undefined {
  let worst: Severity | undefined;
  for (const f of findings) if (!worst || SEVERITY_RANK[f.severity] < SEVERITY_RANK[worst]) worst = f.severity;
  return worst;
}

function countSeverities(findings: readonly Finding[]): Record<Severity, number> {
  const n: Record<Severity, number> = { error: 0, warning: 0, info: 0 };
  for (const f of findings) n[f.severity]++;
  return n;
}

// ───────────────────────────── requirements ─────────────────────────────

export type RequirementKey = keyof Requirements;
const REQUIREMENT_KEYS: readonly RequirementKey[] = ['ratio', 'rout', 'compliance', 'sigma', 'noise', 'tc', 'supplySensitivity'];

/** Words in a finding code that name a requirement (codes are kebab-case, e.g. `rout-low`). */
const CODE_WORDS: Record<RequirementKey, readonly string[]> = {
  ratio: ['ratio'],
  rout: ['rout'],
  compliance: ['compliance'],
  sigma: ['sigma', 'mismatch'],
  noise: ['noise'],
  tc: ['tc'],
  supplySensitivity: ['sensitivity'],
};

/** A finding speaks about requirement `key` when it (or a related location) points at
 *  `require.<key>`, or its code names the requirement. Info findings never fail one. */
export function failsRequirement(finding: Finding, key: RequirementKey): boolean {
  if (finding.severity === 'info') return false;
  const atKey = (p: SpecPath) => p.some((s, i) => s === 'require' && p[i + 1] === key);
  if (atKey(finding.path) || (finding.related ?? []).some((r) => atKey(r.path))) return true;
  const words = finding.code.split('-');
  return CODE_WORDS[key].some((w) => words.includes(w));
}

export interface RequirementView {
  key: RequirementKey;
  label: string;
  /** "≥ 20 MΩ" */
  target: string;
  actual: string;
  met: boolean;
  /** The finding that says why it is not met, to reveal. */
  finding?: Finding;
}

export function requirementViews(mirror: MirrorReport, findings: readonly Finding[]): RequirementView[] {
  const req = mirror.require;
  if (!req) return [];
  const views: RequirementView[] = [];
  for (const key of REQUIREMENT_KEYS) {
    const target = req[key];
    if (target === undefined) continue;
    const failing = findings.find((f) => failsRequirement(f, key));
    views.push({ key, label: FIGURE_LABEL[key], target: requirementText(mirror, key, target),
      actual: actualText(mirror, key), met: !failing, finding: failing });
  }
  return views;
}

const FIGURE_LABEL: Record<RequirementKey, string> = {
  ratio: 'Ratio', rout: 'Output resistance', compliance: 'Compliance', sigma: 'Mismatch σ',
  noise: 'Noise density', tc: 'Temperature coefficient', supplySensitivity: 'Supply sensitivity',
};

function requirementText(mirror: MirrorReport, key: RequirementKey, target: number): string {
  switch (key) {
    case 'ratio': return `= ${formatNumber(target, 4)}`;
    case 'rout': return `≥ ${formatSI(target, 'Ω')}`;
    case 'compliance': return `${sinksCurrent(mirror.type) ? '≤' : '≥'} ${formatSI(target, 'V')}`;
    case 'sigma': return `≤ ${formatPercent(target)}`;
    case 'noise': return `≤ ${formatSI(target, 'A/√Hz')}`;
    case 'tc': return `≤ ${formatNumber(target, 3)} ppm/°C`;
    case 'supplySensitivity': return `≤ ${formatNumber(target, 3)}`;
  }
}

function actualText(mirror: MirrorReport, key: RequirementKey): string {
  switch (key) {
    case 'ratio': return formatNumber(mirror.ratio ?? NaN, 4);
    case 'rout': return formatSI(mirror.rout, 'Ω');
    case 'compliance': return formatSI(mirror.compliance, 'V', 4);
    case 'sigma': return mirror.sigma === undefined ? '—' : formatPercent(mirror.sigma);
    case 'noise': return mirror.noise === undefined ? '—' : formatSI(mirror.noise.density, 'A/√Hz');
    case 'tc': return mirror.tc === undefined ? '—' : `${formatNumber(mirror.tc, 3)} ppm/°C`;
    case 'supplySensitivity': return mirror.supplySensitivity === undefined ? '—' : formatNumber(mirror.supplySensitivity, 3);
  }
}

// ───────────────────────────── summary figures ─────────────────────────────

export interface FigureView {
  key: string;
  label: string;
  value: string;
  /** Second line: the textbook formula, the ideal ratio, what the figure means. */
  detail?: string;
}

/** The causes of the error that are there (≥ 0.005 %, as the ratio-error message names them). */
function splitText(split: NonNullable<MirrorReport['errorSplit']>): string {
  const named: [string, number | undefined][] = isBipolarSplit(split)
    ? [['base current', split.base], ['VCE', split.vce], ['geometry', split.geometry]]
    : [['VDS', split.vds], ['body', split.body], ['gate', split.gate], ['geometry', split.geometry]];
  const shown = named.filter(([, v]) => v !== undefined && Math.abs(v) >= 5e-5).map(([k, v]) => `${k} ${formatSignedPercent(v!, 2)}`);
  return shown.length > 0 ? shown.join(' · ') : 'no systematic cause above 0.005 %';
}

export function summaryFigures(m: MirrorReport): FigureView[] {
  const figures: FigureView[] = [
    { key: 'iin', label: 'Iin', value: m.iin !== undefined ? formatSI(m.iin, 'A', 4) : '–', detail: 'input branch' },
    { key: 'iout', label: 'Iout', value: formatSI(m.iout, 'A', 4), detail: `at Vout = ${formatSI(m.vout, 'V')}` },
    { key: 'ratio', label: 'Ratio', value: formatNumber(m.ratio ?? NaN, 5),
      detail: m.ratioIdeal === undefined ? undefined : `ideal ${formatNumber(m.ratioIdeal, 5)}` },
  ];
  if (m.error !== undefined) {
    const split = m.errorSplit;
    figures.push({ key: 'error', label: 'Error', value: formatSignedPercent(m.error),
      detail: split ? splitText(split) : 'systematic' });
  }
  figures.push({ key: 'rout', label: 'Rout', value: formatSI(m.rout, 'Ω'),
    detail: m.routApprox === undefined ? 'exact, linearized' : `textbook ${formatSI(m.routApprox, 'Ω')}` });
  figures.push(m.noCompliance
    ? { key: 'compliance', label: 'Compliance', value: 'none', detail: `${m.noCompliance.device} out of saturation at every Vout` }
    : { key: 'compliance', label: 'Compliance', value: formatSI(m.compliance, 'V', 4), detail: sinksCurrent(m.type) ? 'works down to' : 'works up to' });
  if (m.sigma !== undefined) figures.push({ key: 'sigma', label: 'σ(Iout)', value: formatPercent(m.sigma), detail: 'Pelgrom, 1σ' });
  if (m.vbias !== undefined) {
    figures.push({ key: 'vbias', label: 'Vbias', value: formatSI(m.vbias, 'V', 4),
      detail: m.vbiasPicked ? 'picked by qpoint' : 'from the spec' });
  }
  if (m.supplySensitivity !== undefined) {
    figures.push({ key: 'supplySensitivity', label: 'Supply sensitivity', value: formatNumber(m.supplySensitivity, 3), detail: '(vdd/Iout)·∂Iout/∂vdd' });
  }
  if (m.tc !== undefined) {
    figures.push({ key: 'tc', label: 'TC', value: `${formatNumber(m.tc, 3)} ppm/°C`,
      detail: m.tcBox !== undefined ? `box ${formatNumber(m.tcBox, 3)} ppm/°C over trange` : 'at the operating temperature' });
  }
  if (m.noise) {
    const top = Object.entries(m.noise.shares).sort((a, b) => b[1] - a[1])[0];
    figures.push({ key: 'noise', label: `Noise at ${formatSI(m.noise.f, 'Hz')}`, value: formatSI(m.noise.density, 'A/√Hz'),
      detail: `${formatSI(m.noise.integrated, 'A')} rms in band${top ? ` · ${top[0]} ${formatPercent(top[1])}` : ''}` });
  }
  return figures;
}

// ───────────────────────────── devices ─────────────────────────────

export interface Column { key: string; label: string; unit?: string; numeric: boolean; title?: string }

/** `bad`: fails a requirement (error colour); `worst`: the worst of its column, still within
 *  every requirement (emphasis only); `sized`: computed by qpoint. */
export interface CellView { text: string; title?: string; flag?: 'bad' | 'worst' | 'sized' }

export interface DeviceRowView {
  name: string;
  cells: CellView[];
  /** Worst severity of the findings on this device. */
  severity?: Severity;
  reveal?: Range;
}

/** A bipolar mirror's columns, thirteen like a MOSFET mirror's (VEB, VEC for a PNP). */
function bipolarColumns(p: boolean): Column[] {
  return [
    { key: 'name', label: 'Device', numeric: false },
    { key: 'area', label: 'Area', numeric: true, title: 'emitter-area multiple' },
    { key: 'm', label: 'm', numeric: true, title: 'parallel count' },
    { key: 'ic', label: 'IC', numeric: true, title: 'collector current' },
    { key: 'ib', label: 'IB', numeric: true, title: 'base current' },
    { key: 'vbe', label: p ? 'VEB' : 'VBE', numeric: true },
    { key: 'vce', label: p ? 'VEC' : 'VCE', numeric: true },
    { key: 'margin', label: 'Margin', numeric: true, title: 'VCE − vcesat' },
    { key: 'region', label: 'Region', numeric: false },
    { key: 'beta', label: 'β', numeric: true, title: 'IC/IB' },
    { key: 'gm', label: 'gm', numeric: true },
    { key: 'rpi', label: 'rπ', numeric: true },
    { key: 'ro', label: 'ro', numeric: true },
  ];
}

export function deviceColumns(type: MirrorReport['type']): Column[] {
  if (isBipolarType(type)) return bipolarColumns(type === 'pnp');
  const p = type === 'pmos';
  return [
    { key: 'name', label: 'Device', numeric: false },
    { key: 'w', label: 'W', numeric: true },
    { key: 'l', label: 'L', numeric: true },
    { key: 'm', label: 'm', numeric: true, title: 'parallel count' },
    { key: 'id', label: 'ID', numeric: true },
    { key: 'vgs', label: p ? 'VSG' : 'VGS', numeric: true },
    { key: 'vds', label: p ? 'VSD' : 'VDS', numeric: true },
    { key: 'vdsat', label: p ? 'VSDsat' : 'VDSsat', numeric: true },
    { key: 'margin', label: 'Margin', numeric: true, title: 'VDS − VDSsat' },
    { key: 'region', label: 'Region', numeric: false },
    { key: 'gmId', label: 'gm/ID', numeric: true, title: '1/V' },
    { key: 'ic', label: 'IC', numeric: true, title: 'inversion coefficient' },
    { key: 'ro', label: 'ro', numeric: true },
  ];
}

const SIZED_TITLE = 'computed by qpoint';

export function deviceRow(report: FileReport, mirror: MirrorReport, d: DeviceReport, findings: readonly Finding[]): DeviceRowView {
  const anchor = deviceAnchor(report, mirror, d);
  const own = anchor?.kind === 'device' ? findings.filter((f) => startsWith(f.path, anchor.path)) : [];
  const size = (text: string): CellView => (d.sized ? { text, title: SIZED_TITLE, flag: 'sized' } : { text });
  const region: CellView = { text: d.region, flag: d.region === workingRegion(d.type) ? undefined : 'bad' };
  const margin: CellView = { text: formatSI(d.margin, 'V', 3), flag: d.margin < 0 ? 'bad' : undefined };
  const name: CellView = { text: d.name, title: d.role === d.name ? undefined : `role ${d.role}` };
  if (isBipolarReport(d)) {
    // In a bipolar mirror's own columns; in a BiCMOS netlist's MOSFET columns, the bipolar
    // counterpart of each (area for W, IC for ID, VBE for VGS, VCE for VDS, vcesat for VDSsat,
    // gm/IC for gm/ID, β for IC).
    const cells: CellView[] = isBipolarType(mirror.type) ? [
      name, { text: formatNumber(d.area, 4) }, { text: formatNumber(d.m, 4) },
      { text: formatSI(d.ic, 'A', 4) }, { text: formatSI(d.ib, 'A', 4) },
      { text: formatSI(d.vbe, 'V', 4) }, { text: formatSI(d.vce, 'V', 4) }, margin, region,
      { text: formatNumber(d.beta, 4) }, { text: formatSI(d.gm, 'S') }, { text: formatSI(d.rpi, 'Ω') }, { text: formatSI(d.ro, 'Ω') },
    ] : [
      name, { text: formatNumber(d.area, 4), title: `${d.type}: emitter-area multiple` }, { text: '—' }, { text: formatNumber(d.m, 4) },
      { text: formatSI(d.ic, 'A', 4), title: 'IC' }, { text: formatSI(d.vbe, 'V', 4), title: 'VBE' }, { text: formatSI(d.vce, 'V', 4), title: 'VCE' },
      { text: formatSI(d.vcesat, 'V', 4), title: 'vcesat' }, margin, region,
      { text: formatNumber(d.ic !== 0 ? d.gm / d.ic : 0, 3), title: 'gm/IC' }, { text: formatNumber(d.beta, 4), title: 'β' },
      { text: formatSI(d.ro, 'Ω') },
    ];
    return { name: d.name, cells, severity: worstSeverity(own), reveal: anchor?.range };
  }
  return {
    name: d.name,
    cells: [
      { text: d.name, title: [d.role === d.name ? '' : `role ${d.role}`, d.table ? `from table ${d.table}` : ''].filter(Boolean).join('; ') || undefined },
      size(formatSI(d.w, 'm')),
      size(formatSI(d.l, 'm')),
      { text: formatNumber(d.m, 4) },
      { text: formatSI(d.id, 'A', 4) },
      { text: formatSI(d.vgs, 'V', 4) },
      { text: formatSI(d.vds, 'V', 4) },
      { text: formatSI(d.vdsat, 'V', 4) },
      { text: formatSI(d.margin, 'V', 3), flag: d.margin < 0 ? 'bad' : undefined },
      { text: d.region, flag: d.region === 'saturation' ? undefined : 'bad' },
      { text: formatNumber(d.gmId, 3) },
      { text: formatNumber(d.ic, 3), title: `${d.inversion} inversion` },
      { text: formatSI(d.ro, 'Ω') },
    ],
    severity: worstSeverity(own),
    reveal: anchor?.range,
  };
}

/** Where a device is written: its own key if the spec has one, else the output or mirror it
 *  inherits its size from. */
export function deviceAnchor(report: FileReport, mirror: MirrorReport, d: DeviceReport): Anchor | undefined {
  const root = mirrorRoot(mirror.path);
  return report.anchors.find((a) => a.kind === 'device' && a.device === d.name && a.report === mirror.name) ??
    report.anchors.find((a) => a.kind === 'device' && a.device === d.name && startsWith(a.path, root)) ??
    mirrorAnchor(report, mirror);
}

export function mirrorAnchor(report: FileReport, mirror: MirrorReport): Anchor | undefined {
  const root = mirrorRoot(mirror.path);
  return report.anchors.find((a) => a.kind === 'output' && a.report === mirror.name) ??
    report.anchors.find((a) => a.kind === 'mirror' && startsWith(a.path, root) && a.path.length === root.length);
}

// ───────────────────────────── findings ─────────────────────────────

export interface FindingRowView {
  severity: Severity;
  code: string;
  message: string;
  /** 1-based "line:col", as the CLI prints it. */
  location: string;
  reveal: Range;
}

export function findingRows(findings: readonly Finding[]): FindingRowView[] {
  return findings.map((f) => ({
    severity: f.severity, code: f.code, message: f.message,
    location: `${f.range.start.line + 1}:${f.range.start.character + 1}`, reveal: f.range,
  }));
}

// ───────────────────────────── mirror list ─────────────────────────────

export interface MirrorListItem {
  name: string;
  kind: string;
  type: string;
  iout: string;
  error: string;
  compliance: string;
  converged: boolean;
  counts: Record<Severity, number>;
  worst?: Severity;
}

export function mirrorList(report: FileReport): MirrorListItem[] {
  return report.mirrors.map((m) => {
    const own = findingsFor(report, m);
    return {
      name: m.name, kind: m.kind, type: m.type,
      iout: formatSI(m.iout, 'A', 4),
      error: m.error === undefined ? '—' : formatSignedPercent(m.error),
      compliance: formatSI(m.compliance, 'V', 4),
      converged: m.converged, counts: countSeverities(own), worst: worstSeverity(own),
    };
  });
}

// ───────────────────────────── corners ─────────────────────────────

export interface CornerRowView { name: string; cells: CellView[] }

export const CORNER_COLUMNS: readonly Column[] = [
  { key: 'name', label: 'Corner', numeric: false },
  { key: 'iout', label: 'Iout', numeric: true },
  { key: 'ratio', label: 'Ratio', numeric: true },
  { key: 'error', label: 'Error', numeric: true },
  { key: 'rout', label: 'Rout', numeric: true },
  { key: 'compliance', label: 'Compliance', numeric: true },
  { key: 'sigma', label: 'σ', numeric: true },
  { key: 'minMargin', label: 'Min margin', numeric: true },
];

/** Corner rows. The worst value of each column is marked `worst` (emphasis, no colour); a value
 *  is `bad` (the error colour) only where it fails a requirement: a device out of saturation
 *  (margin < 0), the ratio beyond limits.error of require.ratio (else the geometric ratio, as the
 *  ratio check reads it), Rout below require.rout, compliance past require.compliance, σ above
 *  require.sigma. Without `limits` the ratio column is only ranked. */
export function cornerRows(mirror: MirrorReport, limits?: { error: number }): CornerRowView[] {
  const corners = mirror.corners ?? [];
  const ok = corners.filter((c) => c.converged);
  const req = mirror.require ?? {};
  const nmos = sinksCurrent(mirror.type);
  const worst = (pick: (c: CornerResult) => number | undefined, better: (a: number, b: number) => boolean): CornerResult | undefined => {
    let w: CornerResult | undefined;
    for (const c of ok) {
      const v = pick(c);
      if (v === undefined || Number.isNaN(v)) continue;
      const wv = w ? pick(w) : undefined;
      if (wv === undefined || better(wv, v)) w = c;
    }
    return w;
  };
  const worstError = worst((c) => Math.abs(c.error), (a, b) => b > a);
  const worstRout = worst((c) => c.rout, (a, b) => b < a);
  const worstCompliance = worst((c) => c.compliance, (a, b) => (nmos ? b > a : b < a));
  const worstSigma = worst((c) => c.sigma, (a, b) => b > a);
  const worstMargin = worst((c) => c.minMargin, (a, b) => b < a);
  const target = req.ratio ?? mirror.ratioIdeal;
  const fails = {
    error: (c: CornerResult) => limits !== undefined && target !== undefined && target > 0 && Math.abs(c.ratio / target - 1) > limits.error,
    rout: (c: CornerResult) => req.rout !== undefined && c.rout < req.rout,
    compliance: (c: CornerResult) => req.compliance !== undefined && (nmos ? c.compliance > req.compliance : c.compliance < req.compliance),
    sigma: (c: CornerResult) => req.sigma !== undefined && c.sigma !== undefined && c.sigma > req.sigma,
    margin: (c: CornerResult) => c.minMargin !== undefined && c.minMargin < 0,
  };
  const flag = (c: CornerResult, w: CornerResult | undefined, bad: (c: CornerResult) => boolean): CellView['flag'] =>
    (c.converged && bad(c) ? 'bad' : c === w ? 'worst' : undefined);
  return corners.map((c) => ({
    name: c.name,
    cells: [
      { text: c.name, title: c.converged ? undefined : 'did not converge', flag: c.converged ? undefined : 'bad' },
      { text: formatSI(c.iout, 'A', 4) },
      { text: formatNumber(c.ratio, 5) },
      { text: formatSignedPercent(c.error), flag: flag(c, worstError, fails.error) },
      { text: formatSI(c.rout, 'Ω'), flag: flag(c, worstRout, fails.rout) },
      { text: formatSI(c.compliance, 'V', 4), flag: flag(c, worstCompliance, fails.compliance) },
      { text: c.sigma === undefined ? '—' : formatPercent(c.sigma), flag: flag(c, worstSigma, fails.sigma) },
      { text: c.minMargin === undefined ? '—' : `${formatSI(c.minMargin, 'V')}${c.minMarginDevice ? ` (${c.minMarginDevice})` : ''}`,
        flag: flag(c, worstMargin, fails.margin) },
    ],
  }));
}

// ───────────────────────────── Monte Carlo ─────────────────────────────

export function monteCarloFigures(mirror: MirrorReport): FigureView[] {
  const mc = mirror.mc;
  if (!mc) return [];
  return [
    { key: 'samples', label: 'Samples', value: formatNumber(mc.samples, 6), detail: `seed ${mc.seed}` },
    { key: 'mean', label: 'Mean Iout', value: formatSI(mc.mean, 'A', 4) },
    { key: 'sigma', label: 'σ(Iout)', value: formatPercent(mc.sigma), detail: mirror.sigma === undefined ? undefined : `Pelgrom ${formatPercent(mirror.sigma)}` },
    { key: 'range', label: 'Range', value: `${formatSI(mc.min, 'A', 4)} … ${formatSI(mc.max, 'A', 4)}` },
    { key: 'yield', label: 'Yield', value: formatPercent(mc.yield, 4), detail: yieldDetail(mirror) },
  ];
}

/** What the yield counts, in samples, so that 99.55 % cannot read as a pass: the per-sample
 *  checks (variation/montecarlo.ts) when all pass, else how many samples fail and why. */
function yieldDetail(mirror: MirrorReport): string {
  const mc = mirror.mc!;
  const failing = mc.samples - Math.round(mc.yield * mc.samples);   // yield is pass/N: exact in samples
  if (failing === 0) {
    const compliance = mirror.require?.compliance !== undefined ? ', and at require.compliance' : '';
    return `all ${mc.samples} samples saturated, ratio within limits.tolerance${compliance}`;
  }
  const f = mc.failures;
  const why = [
    f?.saturation ? `${f.saturation} out of saturation` : '',
    f?.ratio ? `${f.ratio} ratio outside limits.tolerance` : '',
    f?.compliance ? `${f.compliance} not saturated at require.compliance` : '',
    f?.convergence ? `${f.convergence} without a solution` : '',
  ].filter((x) => x !== '');
  return `${failing} of ${mc.samples} samples fail${why.length > 0 ? `: ${why.join(', ')}` : ''}`;
}
