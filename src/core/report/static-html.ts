/**
 * The report's static body: every mirror's figures, devices, findings, corners and Monte Carlo
 * as HTML tables, its schematic with the operating point and its Iout/Rout sweep and histogram
 * as inline SVG (schematic/, svg.ts; schematics are laid out beforehand, `schematicsOf`). It reads without
 * JavaScript, prints, and archives: the file states the tool version, when it was written and a
 * hash of the input, so a reviewer knows what it is a report of. The live panel's script, when
 * it runs, replaces it on screen with the interactive view; printing always uses this body.
 */
import type { BipolarDeviceReport, DeviceReport, FileReport, Finding, MirrorReport, MosDeviceReport } from '../types';
import { ZERO_CELSIUS } from '../defaults';
import { NOISE_PART_FLOOR, visibleNoiseParts } from './noise-parts';
import { isBipolarReport, isBipolarSplit, sinksCurrent } from '../device-types';
import { formatPercent, formatSI, formatSignedPercent } from '../text/format';
import { histogramSvg, linePlotSvg } from './svg';
import { referenceText } from './text';
import { schematicSvg, type Schematic } from '../schematic';
import { networkTreeSvg, type LaidTree } from '../network-tree';

/** What the page says about its own making; the caller supplies it (the core has no clock). */
export interface ReportStamp {
  /** qpoint's version. */
  version: string;
  /** ISO 8601 time the report was written. */
  date: string;
  /** Hash of the input text, e.g. `sha256:…`. */
  inputHash: string;
}

const ESC: Record<string, string> = { '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' };
const esc = (s: string): string => s.replace(/[&<>"']/g, (c) => ESC[c] ?? c);
const si = (v: number, unit: string, digits = 3): string => (Number.isFinite(v) ? formatSI(v, unit, digits) : v === Infinity ? `∞ ${unit}` : '—');
const pct = (x: number, signed = false, digits = 3): string => (Number.isFinite(x) ? (signed ? formatSignedPercent(x, digits) : formatPercent(x, digits)) : '—');
const ppm = (x: number): string => (Number.isFinite(x) ? `${x >= 0 ? '+' : '-'}${Math.abs(x).toPrecision(3)} ppm/°C` : '—');
const plain = (x: number, digits = 5): string => (Number.isFinite(x) ? String(Number(x.toPrecision(digits))) : '—');

function table(caption: string, head: string[], rows: string[][], cls = ''): string {
  const th = head.map((h) => `<th scope="col">${esc(h)}</th>`).join('');
  const body = rows.map((r) => `<tr>${r.map((c) => `<td>${c}</td>`).join('')}</tr>`).join('');
  return `<table class="grid static ${cls}"><caption>${esc(caption)}</caption><thead><tr>${th}</tr></thead><tbody>${body}</tbody></table>`;
}

function stampLine(report: FileReport, stamp: ReportStamp | undefined): string {
  const parts = [`file <code>${esc(report.file)}</code>`];
  if (stamp) parts.push(`qpoint ${esc(stamp.version)}`, `written ${esc(stamp.date)}`, `input ${esc(stamp.inputHash)}`);
  return `<p class="stamp">${parts.join(' · ')}</p>`;
}

function findingsTable(file: string, findings: Finding[]): string {
  if (findings.length === 0) return '<p class="ok">No findings: every check passes.</p>';
  return table(`Findings in ${file}`, ['Severity', 'Code', 'Message', 'Line'], findings.map((f) => [
    `<span class="severity severity-${f.severity}">${f.severity}</span>`, `<code>${esc(f.code)}</code>`, esc(f.message),
    `${f.range.start.line + 1}:${f.range.start.character + 1}`,
  ]), 'findings');
}

function summaryRows(m: MirrorReport): string[][] {
  const rows: [string, string][] = [
    ['Iin', m.iin !== undefined ? si(m.iin, 'A', 4) : 'none (self-biased)'], ['Iout', `${si(m.iout, 'A', 4)} at Vout = ${si(m.vout, 'V')}`],
  ];
  if (m.ratio !== undefined) rows.push(['Ratio', m.ratioIdeal !== undefined ? `${plain(m.ratio)} (ideal ${plain(m.ratioIdeal)})` : plain(m.ratio)]);
  if (m.error !== undefined) {
    const s = m.errorSplit;
    const split = !s ? '' : isBipolarSplit(s) ? ` (base current ${pct(s.base, true)}, VCE ${pct(s.vce, true)}, geometry ${pct(s.geometry, true)})`
      : ` (VDS ${pct(s.vds, true)}, body ${pct(s.body, true)}${s.gate !== undefined ? `, gate ${pct(s.gate, true)}` : ''}, geometry ${pct(s.geometry, true)})`;
    rows.push(['Error', `${pct(m.error, true)}${split}`]);
  }
  if (m.reference) rows.push(['Reference', esc(referenceText(m.reference, (v, u) => si(v, u, 4)).replace(/^reference /, ''))]);
  rows.push(['Rout', m.routApprox !== undefined ? `${si(m.rout, 'Ω')} (textbook ${si(m.routApprox, 'Ω')})` : si(m.rout, 'Ω')]);
  rows.push(['Compliance', m.noCompliance ? `none: ${esc(m.noCompliance.device)} is out of saturation at every Vout`
    : `${si(m.compliance, 'V', 4)} (${sinksCurrent(m.type) ? 'works down to' : 'works up to'})`]);
  if (m.sigma !== undefined) rows.push(['σ(Iout)', `${pct(m.sigma)} (Pelgrom, 1σ)`]);
  if (m.supplySensitivity !== undefined) rows.push(['Supply sensitivity', `${plain(m.supplySensitivity, 3)} ((vdd/Iout)·∂Iout/∂vdd)`]);
  if (m.tc !== undefined) rows.push(['Temperature coefficient', `${ppm(m.tc)}${m.tcBox !== undefined ? ` (box ${ppm(m.tcBox)} over process.trange)` : ''}`]);
  if (m.noise) {
    const n = m.noise;
    const shares = Object.entries(n.shares).sort((a, b) => b[1] - a[1]).map(([k, v]) => `${esc(k)} ${pct(v)}`).join(', ');
    rows.push(['Noise', `${si(n.density, 'A/√Hz')} at ${si(n.f, 'Hz')} (${shares}); ${si(n.integrated, 'A')} rms over ${si(n.band[0], 'Hz')}…${si(n.band[1], 'Hz')}` +
      `${n.corner !== undefined ? `; flicker corner ${si(n.corner, 'Hz')}` : ''}`]);
  }
  if (m.vbias !== undefined) rows.push(['Vbias', `${si(m.vbias, 'V', 4)}${m.vbiasPicked ? ' (picked by qpoint)' : ''}`]);
  if (m.network !== undefined) {
    rows.push(['Network', m.fedBy !== undefined ? `fed by ${esc(m.fedBy)} (network ${esc(m.network)})` : `root of ${esc(m.network)}`]);
    if (m.feeds !== undefined) rows.push(['Feeds', `${esc(m.feeds)} at ${si(m.linkV ?? NaN, 'V', 4)}${m.headroom !== undefined ? ` (headroom ${si(m.headroom, 'V')} to the compliance limit)` : ''}`]);
    if (m.intended !== undefined) rows.push(['Intended', si(m.intended, 'A', 4)]);
    if (m.chainError !== undefined) rows.push(['Chain error', pct(m.chainError, true)]);
    if (m.chainSigma !== undefined) rows.push(['Chain σ', `${pct(m.chainSigma)} (every device from the root, 1σ)`]);
  }
  return rows.map(([k, v]) => [esc(k), v]);
}

function bipolarRow(d: BipolarDeviceReport): string[] {
  return [
    esc(d.name), `${+d.area.toPrecision(4)}·${d.m}`, si(d.ic, 'A'), si(d.ib, 'A'), si(d.vbe, 'V'), si(d.vce, 'V'),
    `<span class="${d.margin < 0 ? 'bad' : ''}">${d.margin >= 0 ? '+' : ''}${si(d.margin, 'V')}</span>`,
    `<span class="${d.region === 'forward-active' ? '' : 'bad'}">${d.region}</span>`, plain(d.beta, 4), si(d.gm, 'S'), si(d.rpi, 'Ω'), si(d.ro, 'Ω'),
  ];
}

function deviceRow(d: MosDeviceReport): string[] {
  return [
    esc(d.name), `${si(d.w, 'm')}/${si(d.l, 'm')}·${d.m}${d.sized ? '*' : ''}`, si(d.id, 'A'), si(d.vgs, 'V'), si(d.vds, 'V'),
    si(d.vdsat, 'V'), `<span class="${d.margin < 0 ? 'bad' : ''}">${d.margin >= 0 ? '+' : ''}${si(d.margin, 'V')}</span>`,
    `<span class="${d.region === 'saturation' ? '' : 'bad'}">${d.region}</span>`, plain(d.gmId, 3), plain(d.ic, 3), si(d.ro, 'Ω'),
  ];
}

function mirrorSection(m: MirrorReport, findings: Finding[], schematic: Schematic | undefined): string {
  const out: string[] = [`<section class="mirror-static" data-mirror="${esc(m.name)}"><h2>${esc(m.name)} <small>${m.kind} ${m.type.toUpperCase()}</small></h2>`];
  if (m.beyondRails || !m.converged) {
    out.push(`<p class="solve-note severity-error">${m.beyondRails ? 'No operating point within the supply' : 'The DC solve did not converge'}${m.solveNote ? `: ${esc(m.solveNote)}` : ''}.</p>`);
  }
  if (!m.beyondRails) {
    const figures = table(`Figures of ${m.name}`, ['Figure', 'Value'], summaryRows(m), 'figures');
    out.push(schematic ? `<div class="figures-schematic">${figures}<figure class="schematic-figure">${schematicSvg(schematic)}<figcaption>Schematic of ${esc(m.name)} at its operating point</figcaption></figure></div>` : figures);
    const mos = m.devices.filter((d): d is MosDeviceReport => !isBipolarReport(d));
    const bjt = m.devices.filter(isBipolarReport);
    const pnp = m.devices.some((d) => d.type === 'pnp');
    if (mos.length > 0 || bjt.length === 0) out.push(table(`Devices of ${m.name}`, ['Device', 'W/L·m', 'ID', 'VGS', 'VDS', 'VDSsat', 'Margin', 'Region', 'gm/ID', 'IC', 'ro'], mos.map(deviceRow), 'devices'));
    if (bjt.length > 0) out.push(table(`${mos.length > 0 ? 'Bipolar devices' : 'Devices'} of ${m.name}`, ['Device', 'Area·m', 'IC', 'IB', pnp ? 'VEB' : 'VBE', pnp ? 'VEC' : 'VCE', 'Margin', 'Region', 'β', 'gm', 'rπ', 'ro'], bjt.map(bipolarRow), 'devices'));
  }
  const own = findings.filter((f) => f.message.startsWith(`${m.name}: `) || f.message.startsWith(`${m.mirror}: `));
  if (own.length > 0) out.push(findingsTable(m.name, own));
  if (!m.beyondRails && m.curve && m.curve.length > 1) {
    const marker = { x: m.vout, label: 'nominal' };
    out.push('<div class="plots-static">',
      linePlotSvg({ title: `Iout versus Vout — ${m.name}`, xUnit: 'V', yUnit: 'A', marker,
        points: m.curve.map((p) => ({ x: p.vout, y: p.iout, ok: p.converged })) }),
      linePlotSvg({ title: `Rout versus Vout — ${m.name}`, xUnit: 'V', yUnit: 'Ω', logY: true, marker,
        points: m.curve.map((p) => ({ x: p.vout, y: p.rout, ok: p.converged })) }),
      '</div>');
  }
  if (!m.beyondRails) out.push(...m.devices.flatMap((d) => gmIdPlots(m, d)));
  if (!m.beyondRails) out.push(...driftPlots(m));
  if (m.corners && m.corners.length > 0) {
    out.push(table(`Corners of ${m.name}`, ['Corner', 'Iout', 'Ratio', 'Error', 'Rout', 'Compliance', 'σ', 'Min margin'], m.corners.map((c) => (c.converged ? [
      esc(c.name), si(c.iout, 'A', 4), plain(c.ratio), pct(c.error, true), si(c.rout, 'Ω'), si(c.compliance, 'V', 4),
      c.sigma === undefined ? '—' : pct(c.sigma), c.minMargin === undefined ? '—' : `${si(c.minMargin, 'V')}${c.minMarginDevice ? ` (${esc(c.minMarginDevice)})` : ''}`,
    ] : [esc(c.name), 'did not converge', '', '', '', '', '', ''])), 'corners'));
  }
  const mc = m.mc;
  if (mc) {
    const failing = mc.samples - Math.round(mc.yield * mc.samples);
    out.push(`<p class="mc-static">Monte Carlo: ${mc.samples} samples (seed ${mc.seed}), mean ${si(mc.mean, 'A', 4)}, σ ${pct(mc.sigma)}, ` +
      `${failing === 0 ? 'every sample saturated and within limits.tolerance' : `${failing} of ${mc.samples} samples fail`} (yield ${pct(mc.yield, false, 4)}).</p>`);
    if (mc.histogram) out.push(histogramSvg(`Monte Carlo Iout — ${m.name}`, mc.histogram.edges, mc.histogram.counts, 'A'));
  }
  out.push('</section>');
  return out.join('\n');
}

/** A table device's gm/ID view: gm/ID and ID/W (log) versus VGS at its L, VDS and VSB, the
 *  operating point marked. */
function gmIdPlots(m: MirrorReport, d: DeviceReport): string[] {
  if (isBipolarReport(d) || !d.tableCurve) return [];
  const c = d.tableCurve;
  const who = `${d.name} of ${m.name}`;
  const marker = { x: d.vgs, label: 'operating point' };
  const pts = (ys: number[]) => c.vgs.map((x: number, k: number) => ({ x, y: ys[k]!, ok: true }));
  return [
    `<p class="gmid-where">gm/ID view of ${esc(who)}: table ${esc(c.table)} at L ${si(c.l, 'm')}, VDS ${si(c.vds, 'V')}, VSB ${si(c.vsb, 'V')}; the dot is the operating point.</p>`,
    `<div class="plots-static gmid-static" data-device="${esc(d.name)}">`,
    linePlotSvg({ title: `gm/ID versus VGS — ${who}`, xUnit: 'V', yUnit: '/V', marker, point: { x: d.vgs, y: d.gmId }, points: pts(c.gmId) }),
    linePlotSvg({ title: `ID/W versus VGS — ${who}`, xUnit: 'V', yUnit: 'A/m', logY: true, marker, point: { x: d.vgs, y: d.id / (d.m * d.w) }, points: pts(c.idW) }),
    '</div>',
  ];
}

/** The noise density versus frequency (each element's part, the flicker corner) and Iout versus
 *  temperature over process.trange, when the report carries them. */
function driftPlots(m: MirrorReport): string[] {
  const plots: string[] = [];
  const sp = m.noise?.spectrum;
  if (sp && sp.f.length > 1) {
    const corner = m.noise!.corner;
    plots.push(linePlotSvg({
      title: `Noise density (A/√Hz) versus frequency — ${m.name}`, xUnit: 'Hz', yUnit: '', logX: true, logY: true,
      points: sp.f.map((f, k) => ({ x: f, y: sp.total[k]!, ok: true })),
      extra: visibleNoiseParts(sp).map(([label, ys]) => ({ label, points: sp.f.map((f, k) => ({ x: f, y: ys[k]!, ok: ys[k]! >= Math.min(...sp.total) * NOISE_PART_FLOOR })) })),
      marker: corner !== undefined ? { x: corner, label: 'flicker corner' } : undefined,
    }));
  }
  if (m.drift && m.drift.length > 1) {
    plots.push(linePlotSvg({
      title: `Iout (A) versus temperature — ${m.name}`, xUnit: '°C', yUnit: '',
      points: m.drift.map((p) => ({ x: p.t - ZERO_CELSIUS, y: p.iout, ok: p.converged })),
    }));
  }
  return plots.length ? ['<div class="plots-static">', ...plots, '</div>'] : [];
}

/** The whole static body. */
export function renderStaticReport(report: FileReport, stamp?: ReportStamp, schematics?: ReadonlyMap<string, Schematic>, trees?: readonly LaidTree[]): string {
  const parts = [
    `<h1>${esc(report.title ?? report.file)}</h1>`,
    stampLine(report, stamp),
    findingsTable(report.file, report.findings),
    ...report.mirrors.map((m) => mirrorSection(m, report.findings, schematics?.get(m.name))),
  ];
  if (report.networks?.length) {
    // Each network's tree, laid out beforehand by the panel's own layout (network-tree/).
    for (const t of trees ?? []) {
      parts.push(`<figure class="network-figure" data-network="${esc(t.tree.root)}">${networkTreeSvg(t)}<figcaption>${esc(t.tree.caption)}</figcaption></figure>`);
    }
    parts.push(table('Bias networks', ['Root', 'Members', 'Supply current', 'Power', 'Worst leaf'], report.networks.map((n) => [
      esc(n.root), esc(n.members.join(', ')), n.converged ? si(n.supplyCurrent.vdd, 'A', 4) : 'did not converge', si(n.power, 'W'), esc(n.worstLeaf ?? ''),
    ]), 'networks'));
  }
  if (report.withheld?.length) {
    parts.push(`<p class="note">Not solved until their errors are fixed: ${report.withheld.map((w) => esc(w.name ?? `mirror ${w.index + 1}`)).join(', ')}.</p>`);
  }
  return parts.join('\n');
}
