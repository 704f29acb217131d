/**
 * The terminal report: per mirror a summary and a device table that fits 100 columns, then the
 * findings as `file:line:col: severity code: message` (1-based, the form editors and CI
 * annotators link to). Every line passes through `escapeControls`: titles, names and messages
 * are the spec's text, and a YAML escape can put ESC, BEL or CR in them.
 */
import type { BipolarDeviceReport, DeviceReport, FileReport, Finding, MirrorReport, MosDeviceReport, NetworkReport, ReferenceReport } from '../types';
import { isBipolarReport } from '../device-types';
import { escapeControls, formatPercent, formatSI, formatSignedPercent } from '../text/format';

export function findingLine(file: string, f: Finding): string {
  return escapeControls(`${file}:${f.range.start.line + 1}:${f.range.start.character + 1}: ${f.severity} ${f.code}: ${f.message}`);
}

export function renderText(report: FileReport, opts: { tables?: boolean } = {}): string {
  const out: string[] = [];
  if (opts.tables !== false && report.mirrors.length > 0) {
    out.push(`${report.file}${report.title ? ` — ${report.title}` : ''}`);
    for (const m of report.mirrors) out.push(...mirrorBlock(m), '');
    for (const n of report.networks ?? []) out.push(...networkBlock(n), '');
  }
  const lines = out.map(escapeControls);
  for (const f of report.findings) lines.push(findingLine(report.file, f));
  return lines.join('\n');
}

/** A self-biased reference in one line: its current, loop gain and start-up check. */
export function referenceText(r: ReferenceReport, si: (v: number, unit: string) => string): string {
  const s = r.startup;
  const lg = r.loopGain !== undefined ? `  loop gain ${r.loopGain.toPrecision(3)}` : '';
  let start: string;
  if (!s.element) start = s.zeroState ? 'zero-current state, no start-up element' : 'no zero-current state';
  else {
    const there = s.conducts ? 'conducts at zero current' : 'off at zero current';
    const op = s.current !== undefined && s.limit !== undefined ? `, ${si(s.current, 'A')} at the operating point (limit ${si(s.limit, 'A')})` : '';
    start = `${there}${op}`;
  }
  return `reference ${si(r.current, 'A')}${lg}  start-up: ${start}`;
}

function mirrorBlock(m: MirrorReport): string[] {
  // A node outside the rails is no operating point: its numbers describe nothing, so none are shown.
  if (m.beyondRails) return [`${m.name}  ${m.kind} ${m.type}  (no operating point within the supply)`];
  const head = `${m.name}  ${m.kind} ${m.type}${m.converged ? '' : '  (did not converge)'}`;
  const ratio = m.ratio === undefined ? '' : m.ratioIdeal !== undefined
    ? `  ratio ${m.ratio.toPrecision(5)} (ideal ${+m.ratioIdeal.toPrecision(6)})`
    : `  ratio ${m.ratio.toPrecision(5)}`;
  const err = m.error !== undefined ? `  error ${formatSignedPercent(m.error)}` : '';
  const iin = m.iin !== undefined ? `  Iin ${si(m.iin, 'A')}` : '';
  const line1 = `${iin}  Iout ${si(m.iout, 'A')}${ratio}${err}`;
  const approx = m.routApprox !== undefined ? ` (textbook ${si(m.routApprox, 'Ω')})` : '';
  const sigma = m.sigma !== undefined ? `  σ ${formatPercent(m.sigma)}` : '';
  const vb = m.vbias !== undefined ? `  vbias ${si(m.vbias, 'V')}${m.vbiasPicked ? ' (picked)' : ''}` : '';
  const compliance = m.noCompliance ? `compliance none (${m.noCompliance.device} out of saturation at every Vout)` : `compliance ${si(m.compliance, 'V')}`;
  const line2 = `  Rout ${si(m.rout, 'Ω')}${approx}  ${compliance} at Vout ${si(m.vout, 'V')}${sigma}${vb}`;
  const ref = m.reference ? [`  ${referenceText(m.reference, (v, u) => si(v, u))}`] : [];
  return [head, line1, line2, ...ref, ...linkLines(m), ...driftLines(m), ...deviceTable(m.devices), ...cornerLines(m), ...monteCarloLines(m)];
}

/** A network member's place in it (design §9.3): what feeds it, what it feeds, the chain figures. */
function linkLines(m: MirrorReport): string[] {
  if (m.network === undefined) return [];
  const from = m.fedBy !== undefined ? `fed by ${m.fedBy}` : `root of ${m.network}`;
  const to = m.feeds !== undefined
    ? `  feeds ${m.feeds} at ${si(m.linkV ?? NaN, 'V')}${m.headroom !== undefined ? ` (headroom ${si(m.headroom, 'V')})` : ''}`
    : '';
  const chain = m.intended !== undefined ? `  intended ${si(m.intended, 'A')}` : '';
  const err = m.chainError !== undefined ? `  chain error ${formatSignedPercent(m.chainError)}` : '';
  const sigma = m.chainSigma !== undefined ? `  chain σ ${formatPercent(m.chainSigma)}` : '';
  return [`  ${from}${to}${chain}${err}${sigma}`];
}

function networkBlock(n: NetworkReport): string[] {
  const state = n.converged ? '' : '  (did not converge)';
  const worst = n.worstLeaf !== undefined ? `  worst leaf ${n.worstLeaf}` : '';
  return [
    `network ${n.root}${state}: ${n.members.join(', ')}`,
    `  supply ${si(n.supplyCurrent.vdd, 'A')}  power ${si(n.power, 'W')}  leaves ${n.leaves.join(', ')}${worst}`,
  ];
}

/** Supply sensitivity, temperature coefficient and noise (design §12), when computed. */
function driftLines(m: MirrorReport): string[] {
  const parts: string[] = [];
  if (m.supplySensitivity !== undefined) parts.push(`supply sensitivity ${m.supplySensitivity.toPrecision(3)}`);
  if (m.tc !== undefined) {
    const box = m.tcBox !== undefined ? ` (box ${ppm(m.tcBox)} over process.trange)` : '';
    parts.push(`tc ${ppm(m.tc)}${box}`);
  }
  const n = m.noise;
  const lines = parts.length ? [`  ${parts.join('  ')}`] : [];
  if (n) {
    const top = Object.entries(n.shares).sort((a, b) => b[1] - a[1]).slice(0, 2)
      .map(([k, v]) => `${k} ${formatPercent(v)}`).join(', ');
    const corner = n.corner !== undefined ? `  flicker corner ${si(n.corner, 'Hz')}` : '';
    lines.push(`  noise ${si(n.density, 'A/√Hz')} at ${si(n.f, 'Hz')} (${top})  ${si(n.integrated, 'A')} rms over ${si(n.band[0], 'Hz')}…${si(n.band[1], 'Hz')}${corner}`);
  }
  return lines;
}

function ppm(x: number): string {
  return `${x >= 0 ? '+' : '-'}${Math.abs(x).toPrecision(3)} ppm/°C`;
}

function cornerLines(m: MirrorReport): string[] {
  if (!m.corners?.length) return [];
  return m.corners.map((c) => {
    if (!c.converged) return `  corner ${c.name}: did not converge`;
    const err = Number.isFinite(c.error) ? `  error ${formatSignedPercent(c.error)}` : '';
    const margin = c.minMargin !== undefined ? `  min margin ${si(c.minMargin, 'V')}${c.minMarginDevice ? ` (${c.minMarginDevice})` : ''}` : '';
    const sigma = c.sigma !== undefined ? `  σ ${formatPercent(c.sigma)}` : '';
    return `  corner ${c.name}: Iout ${si(c.iout, 'A')}  ratio ${c.ratio.toPrecision(5)}${err}  Rout ${si(c.rout, 'Ω')}  compliance ${si(c.compliance, 'V')}${sigma}${margin}`;
  });
}

function monteCarloLines(m: MirrorReport): string[] {
  const mc = m.mc;
  if (!mc) return [];
  const lin = m.sigma !== undefined ? ` (linearized ${formatPercent(m.sigma)})` : '';
  return [`  Monte Carlo N=${mc.samples} seed ${mc.seed}: mean ${si(mc.mean, 'A')}  σ ${formatPercent(mc.sigma)}${lin}` +
    `  range ${si(mc.min, 'A')}…${si(mc.max, 'A')}  yield ${formatPercent(mc.yield, 4)}`];
}

const COLUMNS: [string, number][] = [
  ['device', 10], ['W/L·m', 17], ['ID', 9], ['VGS', 9], ['VDS', 9], ['VDSsat', 9],
  ['margin', 10], ['region', 7], ['gm/ID', 6], ['ro', 9],
];

/** Tables by devices array: identical mirrors share one (analysis/repeats.ts), so a network of
 *  repeated channels formats each distinct table once. */
const tables = new WeakMap<DeviceReport[], string[]>();

function deviceTable(devices: DeviceReport[]): string[] {
  let lines = tables.get(devices);
  if (!lines) {
    lines = formatTable(devices);
    tables.set(devices, lines);
  }
  return lines;
}

/** Bipolar devices get their own table, with their own quantities (VEB, VEC for a PNP). */
const BIPOLAR_COLUMNS: [string, number][] = [
  ['device', 10], ['area·m', 9], ['IC', 9], ['IB', 9], ['VBE', 9], ['VCE', 9],
  ['margin', 10], ['region', 9], ['beta', 7], ['gm', 9], ['ro', 9],
];

function formatTable(devices: DeviceReport[]): string[] {
  const mos = devices.filter((d): d is MosDeviceReport => !isBipolarReport(d));
  const bjt = devices.filter(isBipolarReport);
  return [...(mos.length > 0 || bjt.length === 0 ? formatMosTable(mos) : []), ...(bjt.length > 0 ? formatBipolarTable(bjt) : [])];
}

function formatBipolarTable(devices: BipolarDeviceReport[]): string[] {
  const rows = devices.map((d) => [
    d.name, `${+d.area.toPrecision(4)}·${d.m}`,
    si(d.ic, 'A'), si(d.ib, 'A'), si(d.vbe, 'V'), si(d.vce, 'V'),
    (d.margin >= 0 ? '+' : '') + si(d.margin, 'V'),
    d.region === 'forward-active' ? 'active' : d.region,
    d.beta.toFixed(1), si(d.gm, 'S'), si(d.ro, 'Ω'),
  ]);
  const widths = BIPOLAR_COLUMNS.map(([title, w], i) => Math.max(w, title.length + 1, ...rows.map((r) => r[i].length + 1)));
  const fmt = (cells: string[]) => '  ' + cells.map((c, i) => c.padEnd(widths[i])).join('').trimEnd();
  return [fmt(BIPOLAR_COLUMNS.map((c) => c[0])), ...rows.map(fmt)];
}

function formatMosTable(devices: MosDeviceReport[]): string[] {
  const rows = devices.map((d) => [
    d.name,
    `${si(d.w, '')}/${si(d.l, '')}·${d.m}${d.sized ? '*' : ''}`,
    si(d.id, 'A'), si(d.vgs, 'V'), si(d.vds, 'V'), si(d.vdsat, 'V'),
    (d.margin >= 0 ? '+' : '') + si(d.margin, 'V'),
    d.region === 'saturation' ? 'sat' : d.region,
    d.gmId.toFixed(1),
    si(d.ro, 'Ω'),
  ]);
  const widths = COLUMNS.map(([title, w], i) => Math.max(w, title.length + 1, ...rows.map((r) => r[i].length + 1)));
  const fmt = (cells: string[]) => '  ' + cells.map((c, i) => c.padEnd(widths[i])).join('').trimEnd();
  return [fmt(COLUMNS.map((c) => c[0])), ...rows.map(fmt)];
}

function si(v: number, unit: string): string {
  return Number.isFinite(v) ? formatSI(v, unit, 3).replace(/ /g, '') : String(v);
}
