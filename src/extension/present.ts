/**
 * What the editor shows, as plain text: hover markdown, CodeLens titles, the status summary.
 * Pure (no `vscode`), so it is tested without an editor; convert.ts wraps the results in vscode
 * objects. No physics here: every number comes from the core's report.
 */
import { isBipolarReport, sinksCurrent, typeTitle, workingRegion } from '../core/device-types';
import type { DeviceType } from '../core/types';
import type { Anchor, DeviceReport, FileReport, MirrorReport, NetworkReport, Position, Range, SpecPath } from '../core/types';
import { CAUTION as CAUTION_TEXT, formatPercent, formatPlain, formatSI, formatSignedPercent } from '../core/text/format';


/** Output resistance, where an ideal source gives ∞. */
const formatOhm = (r: number): string => formatSI(r, 'Ω', 3);

// ───────────────────────────── hover: what is under the cursor ─────────────────────────────

export type HoverTarget =
  | { kind: 'device'; report: MirrorReport; device: DeviceReport }
  /** A `size:` or `devices:` block: every device it sizes. */
  | { kind: 'devices'; title: string; devices: DeviceReport[] }
  /** A mirror's name: all its outputs (one for a plain mirror, several for a bias bank). */
  | { kind: 'mirror'; mirror: string; reports: MirrorReport[] }
  | { kind: 'output'; report: MirrorReport };

export function contains(range: Range, pos: Position): boolean {
  const afterStart = pos.line > range.start.line || (pos.line === range.start.line && pos.character >= range.start.character);
  const beforeEnd = pos.line < range.end.line || (pos.line === range.end.line && pos.character <= range.end.character);
  return afterStart && beforeEnd;
}

function isPrefix(prefix: SpecPath, path: SpecPath): boolean {
  return prefix.length <= path.length && prefix.every((seg, i) => seg === path[i]);
}

const KIND_ORDER: Record<Anchor['kind'], number> = { device: 0, output: 1, mirror: 2 };

/**
 * The report part under the cursor. `cursorPath` is the spec path at the position (from
 * specPath.ts), when the text parses; without it only anchor ranges are used.
 */
export function hoverTarget(file: FileReport, pos: Position, cursorPath?: SpecPath): HoverTarget | undefined {
  const byName = (name: string) => file.mirrors.find((m) => m.name === name);
  const fromAnchor = (a: Anchor): HoverTarget | undefined => {
    const report = byName(a.report);
    if (!report) return undefined;
    if (a.kind === 'device') {
      const device = report.devices.find((d) => d.name === a.device);
      return device ? { kind: 'device', report, device } : undefined;
    }
    if (a.kind === 'output') return { kind: 'output', report };
    return { kind: 'mirror', mirror: report.mirror, reports: file.mirrors.filter((m) => m.mirror === report.mirror) };
  };

  // 1. The cursor on an anchor's own range (a device key, a mirror or output name).
  const hit = file.anchors.filter((a) => contains(a.range, pos)).sort((a, b) => KIND_ORDER[a.kind] - KIND_ORDER[b.kind])[0];
  if (hit) return fromAnchor(hit);
  if (!cursorPath) return undefined;

  // 2. Inside a device's mapping (a size value such as `w: 8u`): the device anchor whose path is
  //    the longest prefix of the cursor's path.
  const device = file.anchors
    .filter((a) => a.kind === 'device' && isPrefix(a.path, cursorPath))
    .sort((a, b) => b.path.length - a.path.length)[0];
  if (device) return fromAnchor(device);

  // 3. A `size:` or `devices:` block of a mirror or of a bank output: every device it sizes.
  const blockAt = ['size', 'devices'].map((k) => cursorPath.indexOf(k)).filter((i) => i >= 2).sort((a, b) => a - b)[0];
  if (blockAt !== undefined) {
    const owner = cursorPath.slice(0, blockAt);
    const reports = file.mirrors.filter((m) => isPrefix(owner, m.path) || isPrefix(m.path, owner));
    const devices: DeviceReport[] = [];
    for (const r of reports) for (const d of r.devices) if (!devices.some((x) => x.name === d.name)) devices.push(d);
    if (devices.length > 0) return { kind: 'devices', title: reports.length === 1 ? reports[0].name : reports[0].mirror, devices };
  }

  // 4. The mirror's or output's `name` key.
  if (cursorPath[cursorPath.length - 1] === 'name') {
    const owner = cursorPath.slice(0, -1);
    const a = file.anchors.find((x) => x.kind !== 'device' && x.path.length === owner.length && isPrefix(x.path, owner));
    if (a) return fromAnchor(a);
  }
  return undefined;
}

// ───────────────────────────── hover: markdown ─────────────────────────────

const CAUTION = `*${CAUTION_TEXT}*`;

function escapeMd(s: string): string {
  return s.replace(/[\\`*_{}[\]()#+\-.!|<>]/g, (c) => `\\${c}`);
}

function polarity(type: DeviceType): string {
  return typeTitle(type);
}

function sizeLine(d: DeviceReport): string {
  const m = d.m !== 1 ? ` · m = ${formatPlain(d.m, 4)}` : '';
  if (isBipolarReport(d)) return `area = ${formatPlain(d.area, 4)}${m}`;
  const sized = d.sized ? ' · sized by qpoint' : '';
  return `W/L = ${formatSI(d.w, 'm')} / ${formatSI(d.l, 'm')}${m}${sized}`;
}

function regionText(d: DeviceReport): string {
  return d.region === workingRegion(d.type) ? d.region : `**${d.region}**`;
}

/** The ten operating-point figures of one device, in the device's own polarity (VEB, VEC for
 *  a PNP, as VSG, VSD for a PMOS). */
export function deviceFigures(d: DeviceReport): [label: string, value: string][] {
  if (isBipolarReport(d)) {
    const p = d.type === 'pnp';
    return [
      ['region', regionText(d)],
      ['IC', formatSI(d.ic, 'A')],
      [p ? 'VEB' : 'VBE', formatSI(d.vbe, 'V')],
      [p ? 'VEC' : 'VCE', formatSI(d.vce, 'V')],
      ['IB', formatSI(d.ib, 'A')],
      ['margin', formatSI(d.margin, 'V')],
      ['gm', formatSI(d.gm, 'S')],
      ['ro', formatOhm(d.ro)],
      ['β', formatPlain(d.beta, 4)],
      ['rπ', formatOhm(d.rpi)],
    ];
  }
  const p = d.type === 'pmos';
  return [
    ['region', regionText(d)],
    ['ID', formatSI(d.id, 'A')],
    [p ? 'VSG' : 'VGS', formatSI(d.vgs, 'V')],
    [p ? 'VSD' : 'VDS', formatSI(d.vds, 'V')],
    ['VDSsat', formatSI(d.vdsat, 'V')],
    ['margin', formatSI(d.margin, 'V')],
    ['gm', formatSI(d.gm, 'S')],
    ['ro', formatOhm(d.ro)],
    ['gm/ID', `${formatPlain(d.gmId)} /V`],
    ['IC', `${formatPlain(d.ic)} (${d.inversion})`],
  ];
}

/** Pairs of figures side by side: a compact four-column table whose first pair is its header
 *  row (a markdown table needs one; a separate title row would cost the hover a line). */
function pairTable(rows: [string, string][]): string {
  const line = (i: number): string => {
    const a = rows[i]!;
    const b = rows[i + 1] ?? ['', ''];
    return `| **${a[0]}** | ${a[1]} | ${b[0] ? `**${b[0]}**` : ''} | ${b[1]} |`;
  };
  const lines = [line(0), '|:--|--:|:--|--:|'];
  for (let i = 2; i < rows.length; i += 2) lines.push(line(i));
  return lines.join('\n');
}

/** One title line, five table rows, the caution: short enough that the editor's hover shows it
 *  whole, below a diagnostic or two, without scrolling. */
function deviceHoverMarkdown(report: MirrorReport, d: DeviceReport): string {
  const head = `Operating point of **${escapeMd(d.name)}** · ${polarity(d.type)} · ${escapeMd(d.role)} of ${escapeMd(report.name)} · ${sizeLine(d)}${d.table ? ` · from table ${escapeMd(d.table)}` : ''}`;
  const note = report.converged ? '' : `\n\n**Did not converge**${report.solveNote ? `: ${escapeMd(report.solveNote)}` : ''} — the numbers are the last iterate.`;
  return `${head}${note}\n\n${pairTable(deviceFigures(d))}\n\n${CAUTION}`;
}

function devicesHoverMarkdown(title: string, devices: DeviceReport[]): string {
  const lines = [
    `**${escapeMd(title)}** · devices`,
    '',
    '| device | region | ID | VDS | margin | gm/ID | IC |',
    '|:--|:--|--:|--:|--:|--:|--:|',
  ];
  for (const d of devices) {
    // A bipolar device in the MOSFET columns: IC, VCE, margin, gm/IC, and β where IC would be.
    if (isBipolarReport(d)) {
      lines.push(`| ${escapeMd(d.name)} | ${regionText(d)} | ${formatSI(d.ic, 'A')} | ${formatSI(d.vce, 'V')} | ${formatSI(d.margin, 'V')} | ${formatPlain(d.ic !== 0 ? d.gm / d.ic : 0)} /V | β ${formatPlain(d.beta, 4)} |`);
      continue;
    }
    lines.push(`| ${escapeMd(d.name)} | ${regionText(d)} | ${formatSI(d.id, 'A')} | ${formatSI(d.vds, 'V')} | ${formatSI(d.margin, 'V')} | ${formatPlain(d.gmId)} /V | ${formatPlain(d.ic)} |`);
  }
  return `${lines.join('\n')}\n\n${CAUTION}`;
}

/** The measured figures of one output, textbook Rout beside the exact one. */
export function mirrorFigures(r: MirrorReport): [label: string, value: string][] {
  const rows: [string, string][] = [
    ['Iin', formatSI(r.iin ?? NaN, 'A')],
    ['Iout', formatSI(r.iout, 'A')],
    ['ratio', r.ratioIdeal !== undefined ? `${formatPlain(r.ratio ?? NaN, 4)} (ideal ${formatPlain(r.ratioIdeal, 4)})` : formatPlain(r.ratio ?? NaN, 4)],
  ];
  if (r.error !== undefined) rows.push(['error', formatSignedPercent(r.error)]);
  rows.push(['Rout', r.routApprox !== undefined ? `${formatOhm(r.rout)} (textbook ${formatOhm(r.routApprox)})` : formatOhm(r.rout)]);
  rows.push(['compliance', r.noCompliance ? complianceText(r) : `${formatSI(r.compliance, 'V')} (${sinksCurrent(r.type) ? 'lowest' : 'highest'} Vout)`]);
  if (r.sigma !== undefined) rows.push(['sigma', formatPercent(r.sigma)]);
  if (r.vbias !== undefined) rows.push(['vbias', `${formatSI(r.vbias, 'V')}${r.vbiasPicked ? ' (picked by qpoint)' : ''}`]);
  if (r.supplySensitivity !== undefined) rows.push(['supply sensitivity', formatPlain(r.supplySensitivity, 3)]);
  if (r.tc !== undefined) rows.push(['tc', `${formatPlain(r.tc, 3)} ppm/°C${r.tcBox !== undefined ? ` (box ${formatPlain(r.tcBox, 3)} over trange)` : ''}`]);
  if (r.noise) {
    const top = Object.entries(r.noise.shares).sort((a, b) => b[1] - a[1])[0];
    rows.push([`noise at ${formatSI(r.noise.f, 'Hz')}`, `${formatSI(r.noise.density, 'A/√Hz')}${top ? ` (${escapeMd(top[0])} ${formatPercent(top[1])})` : ''}`]);
  }
  return rows;
}

/** The compliance figure, or why there is none (a device out of saturation at every Vout). */
function complianceText(r: MirrorReport): string {
  return r.noCompliance ? `none (${escapeMd(r.noCompliance.device)} out of saturation at every Vout)` : formatSI(r.compliance, 'V');
}

function kindLine(r: MirrorReport): string {
  return `${r.kind} ${polarity(r.type)} mirror`;
}

function convergenceNote(reports: MirrorReport[]): string {
  const bad = reports.filter((r) => !r.converged);
  if (bad.length === 0) return '';
  return '\n\n' + bad.map((r) => `**${escapeMd(r.name)} did not converge**${r.solveNote ? `: ${escapeMd(r.solveNote)}` : ''}`).join('  \n');
}

function outputHoverMarkdown(r: MirrorReport): string {
  const rows = mirrorFigures(r);
  const table = ['| | |', '|:--|--:|', ...rows.map(([k, v]) => `| **${k}** | ${v} |`)].join('\n');
  return `**${escapeMd(r.name)}** · ${kindLine(r)} · Vout ${formatSI(r.vout, 'V')}${convergenceNote([r])}\n\n${table}\n\n${CAUTION}`;
}

export function mirrorHoverMarkdown(mirror: string, reports: MirrorReport[]): string {
  if (reports.length === 1) return outputHoverMarkdown(reports[0]);
  const first = reports[0];
  const lines = [
    `**${escapeMd(mirror)}** · ${first ? kindLine(first) : 'mirror'} · bias bank of ${reports.length} outputs${convergenceNote(reports)}`,
    '',
    '| output | Iout | ratio | error | Rout (textbook) | compliance | sigma |',
    '|:--|--:|--:|--:|--:|--:|--:|',
  ];
  for (const r of reports) {
    const rout = r.routApprox !== undefined ? `${formatOhm(r.rout)} (${formatOhm(r.routApprox)})` : formatOhm(r.rout);
    lines.push(`| ${escapeMd(r.output ?? r.name)} | ${formatSI(r.iout, 'A')} | ${formatPlain(r.ratio ?? NaN, 4)} | ${r.error !== undefined ? formatSignedPercent(r.error) : '–'} | ${rout} | ${complianceText(r)} | ${r.sigma !== undefined ? formatPercent(r.sigma) : '–'} |`);
  }
  return `${lines.join('\n')}\n\n${CAUTION}`;
}

export function hoverMarkdown(t: HoverTarget): string {
  switch (t.kind) {
    case 'device': return deviceHoverMarkdown(t.report, t.device);
    case 'devices': return devicesHoverMarkdown(t.title, t.devices);
    case 'output': return outputHoverMarkdown(t.report);
    case 'mirror': return mirrorHoverMarkdown(t.mirror, t.reports);
  }
}

// ───────────────────────────── CodeLens and status bar ─────────────────────────────

/** One line above a mirror (or bank output): Iout, error, Rout, compliance. */
export function lensTitle(r: MirrorReport): string {
  if (r.beyondRails) return `${r.name}: no operating point within the supply`;
  if (!r.converged) return `${r.name}: did not converge`;
  const parts = [`Iout ${formatSI(r.iout, 'A')}`];
  if (r.error !== undefined) parts.push(`error ${formatSignedPercent(r.error)}`);
  parts.push(`Rout ${formatOhm(r.rout)}`, r.noCompliance ? `no compliance: ${r.noCompliance.device} out of saturation at every Vout` : `compliance ${formatSI(r.compliance, 'V')}`);
  return parts.join(' · ');
}

/** Lenses: one per anchor of kind mirror (single output) or output (bank), and one on each
 *  mirror set aside for its errors. */
export function lensPlacements(file: FileReport): { range: Range; report?: MirrorReport; title: string }[] {
  const out: { range: Range; report?: MirrorReport; title: string }[] = [];
  for (const w of file.withheld ?? []) out.push({ range: w.range, title: 'not solved until this mirror\'s errors are fixed' });
  for (const a of file.anchors) {
    if (a.kind === 'device') continue;
    const report = file.mirrors.find((m) => m.name === a.report);
    if (!report) continue;
    if (a.kind === 'mirror') {
      const outputs = file.mirrors.filter((m) => m.mirror === report.mirror);
      // A bank's outputs carry their own lenses; the mirror line names how many.
      const title = outputs.length > 1 ? `${report.mirror}: bias bank of ${outputs.length} outputs` : lensTitle(report);
      out.push({ range: a.range, report, title });
    } else {
      out.push({ range: a.range, report, title: lensTitle(report) });
    }
  }
  // A network's root gets one more lens on its name: the whole network's figures.
  for (const n of file.networks ?? []) {
    const a = file.anchors.find((x) => x.kind === 'mirror' && x.path[1] === n.rootIndex);
    if (a) out.push({ range: a.range, title: networkLensTitle(n, file) });
  }
  return out;
}

// ───────────────────────────── bias networks (design §9.3) ─────────────────────────────

/** The report of output `output` of the mirror at file index `mirror`. */
export function reportAt(file: FileReport, mirror: number, output: number): MirrorReport | undefined {
  return file.mirrors.find((m) => m.mirrorIndex === mirror && m.outputIndex === output);
}

/** The upstream output's device whose VDS the link sets: the output-side device (role `out…`)
 *  with the least margin. */
export function linkDevice(r: MirrorReport): DeviceReport | undefined {
  const outs = r.devices.filter((d) => /^out/.test(d.role));
  return (outs.length > 0 ? outs : r.devices).reduce<DeviceReport | undefined>((a, d) => (!a || d.margin < a.margin ? d : a), undefined);
}

/** Hover on a `from` value: what arrives through the link, from the upstream output's report. */
export function linkHoverMarkdown(up: MirrorReport, fed: MirrorReport | undefined): string {
  const rows: [string, string][] = [['current that arrives', formatSI(up.iout, 'A')]];
  if (up.intended !== undefined) rows.push(['intended', formatSI(up.intended, 'A')]);
  if (up.chainError !== undefined) rows.push(['chain error', formatSignedPercent(up.chainError)]);
  if (up.chainSigma !== undefined) rows.push(['chain sigma', formatPercent(up.chainSigma)]);
  if (up.linkV !== undefined) rows.push(['node voltage', formatSI(up.linkV, 'V')]);
  if (up.headroom !== undefined) rows.push(['headroom', formatSI(up.headroom, 'V')]);
  const d = linkDevice(up);
  if (d) rows.push([`margin of ${escapeMd(d.name)}`, `${formatSI(d.margin, 'V')} (${regionText(d)})`]);
  const table = ['| | |', '|:--|--:|', ...rows.map(([k, v]) => `| **${k}** | ${v} |`)].join('\n');
  const into = fed ? ` → input of **${escapeMd(fed.mirror)}**` : '';
  return `Link from **${escapeMd(up.name)}** · ${kindLine(up)}${into}${convergenceNote([up])}\n\n${table}\n\n${CAUTION}`;
}

/** One line above a network's root: what the network draws and its worst leaf. */
function networkLensTitle(n: NetworkReport, file: FileReport): string {
  if (!n.converged) return `network ${n.root}: did not converge`;
  const { vdd, vss } = n.supplyCurrent;
  const supply = Math.abs(vdd - vss) <= 1e-9 * Math.max(Math.abs(vdd), Math.abs(vss))
    ? `supply ${formatSI(vdd, 'A')}` : `supply ${formatSI(vdd, 'A')} from vdd, ${formatSI(vss, 'A')} into vss`;
  const parts = [`network of ${n.members.length}`, supply, `${formatSI(n.power, 'W')}`];
  const worst = n.worstLeaf !== undefined ? file.mirrors.find((m) => m.name === n.worstLeaf) : undefined;
  if (worst?.chainError !== undefined) parts.push(`worst leaf ${worst.name}: chain error ${formatSignedPercent(worst.chainError)}`);
  return parts.join(' · ');
}

export interface Counts { mirrors: number; errors: number; warnings: number; infos: number }

export function countFindings(file: FileReport): Counts {
  const c: Counts = { mirrors: new Set(file.mirrors.map((m) => m.mirror)).size, errors: 0, warnings: 0, infos: 0 };
  for (const f of file.findings) {
    if (f.severity === 'error') c.errors++;
    else if (f.severity === 'warning') c.warnings++;
    else c.infos++;
  }
  return c;
}

function plural(n: number, word: string): string {
  return `${n} ${word}${n === 1 ? '' : 's'}`;
}

/** Status bar text (with a codicon) and tooltip. */
export function statusSummary(file: FileReport): { text: string; tooltip: string; hasErrors: boolean } {
  const c = countFindings(file);
  const icon = !file.parsed || c.errors > 0 ? '$(error)' : c.warnings > 0 ? '$(warning)' : '$(pass)';
  // Mirrors set aside for their errors (the others are solved): "7 of 8 mirrors".
  const aside = file.withheld?.length ?? 0;
  const mirrors = aside > 0 ? `${c.mirrors} of ${plural(c.mirrors + aside, 'mirror')}` : plural(c.mirrors, 'mirror');
  const text = file.parsed
    ? `${icon} qpoint: ${mirrors}, ${plural(c.errors, 'error')}`
    : `${icon} qpoint: spec does not parse`;
  const asideLine = aside > 0 ? `\n${plural(aside, 'mirror')} with errors not solved until they are fixed` : '';
  const tooltip = `${file.title ?? file.file}\n${mirrors} · ${plural(c.errors, 'error')} · ${plural(c.warnings, 'warning')} · ${c.infos} info${asideLine}\nClick to open the bias panel`;
  return { text, tooltip, hasErrors: !file.parsed || c.errors > 0 };
}
