/**
 * Lays the view model out as DOM. Two modes: `panel` (the live webview: a mirror list, the
 * selected mirror's detail, rows reveal their source) and `report` (the self-contained HTML
 * file: every mirror in turn, nothing to reveal).
 */
import type { FileReport, MirrorReport, Range } from '../src/core/types';
import { badge, button, divider, figures, h, section, severityLabel, table, tag, type TableRow } from './components';
import { cssId, histogramPlot, ioutPlot, plotId, routPlot, type PlotHandle, type PlotKind } from './plots';
import { markSchematicDevice, schematicFigure } from './schematic';
import type { PanelState } from './state';
import { networkFigures } from './network-tree';
import { mirrorGroups } from '../src/core/network-tree';
import {
  CORNER_COLUMNS, cornerRows, deviceColumns, deviceRow, fileFindings, findingRows, findingsFor,
  mirrorAnchor, mirrorList, monteCarloFigures, requirementViews, summaryFigures, type FindingRowView,
} from './view-model';

export interface RenderContext {
  mode: 'panel' | 'report';
  onSelect(name: string): void;
  onReveal(range: Range): void;
  /** Panel only: ask the host for a Monte Carlo run of the shown spec. */
  onRunMonteCarlo?(): void;
}

/** Replace `root`'s content. `previous` are the plots of the last render: a plot of the same
 *  mirror is fed the new data in place instead of being rebuilt (the costly part of a render);
 *  the ones not reused are destroyed. Returns the plots now shown. */
export function renderPage(root: HTMLElement, state: PanelState, ctx: RenderContext, previous: readonly PlotHandle[] = []): PlotHandle[] {
  const focusKey = (document.activeElement as HTMLElement | null)?.dataset?.key;
  const plots = new PlotSet(previous);
  const content = h('div', { class: state.stale ? 'page stale' : 'page' });
  const report = state.report;
  if (!report) {
    content.append(h('p', { class: 'notice', id: 'notice' }, state.notice ?? ''));
  } else {
    content.append(header(report, state.notice));
    const general = fileFindings(report);
    if (general.length > 0) content.append(section('file-findings', 'File', findingsTable(general, ctx)));
    if (report.mirrors.length === 0 && !report.withheld?.length) {
      content.append(h('p', { class: 'notice', id: 'notice' }, report.parsed ? 'This spec has no mirrors yet.' : 'The spec could not be read; see the findings above.'));
    } else {
      content.append(section('mirrors', 'Mirrors', h('div', { class: 'scroll-x' }, overview(report, state.selected, ctx))));
      if (report.networks?.length) {
        content.append(section('networks', 'Bias networks', ...networkFigures(report, (select, reveal) => {
          if (ctx.mode !== 'panel') return;
          ctx.onSelect(select);
          if (reveal) ctx.onReveal(reveal);
        }), h('p', { class: 'note' }, 'Each edge: the current it carries and its chain error (every stage compounded from the root). ⚠ and a dashed line in the error colour mark a link in trouble; a dotted line in the warning colour, a leaf whose chain error is over the limit. Click a mirror to show it in the spec.')));
      }
      const shown = ctx.mode === 'report' ? report.mirrors : report.mirrors.filter((m) => m.name === state.selected);
      for (const m of shown) content.append(mirrorDetail(report, m, ctx, plots));
    }
  }
  root.replaceChildren(content);
  plots.finish();
  if (focusKey) root.querySelector<HTMLElement>(`[data-key="${CSS.escape(focusKey)}"]`)?.focus();
  return plots.shown;
}

const MAKERS: Record<PlotKind, (m: MirrorReport) => PlotHandle | undefined> = { iout: ioutPlot, rout: routPlot, mc: histogramPlot };

class PlotSet {
  readonly shown: PlotHandle[] = [];
  private readonly old: Map<string, PlotHandle>;
  constructor(previous: readonly PlotHandle[]) {
    this.old = new Map(previous.map((p) => [p.id, p]));
  }
  get(kind: PlotKind, m: MirrorReport): PlotHandle | undefined {
    const id = plotId(kind, m);
    const old = this.old.get(id);
    this.old.delete(id);
    if (old?.update(m)) {
      this.shown.push(old);
      return old;
    }
    old?.destroy();
    const fresh = MAKERS[kind](m);
    if (fresh) this.shown.push(fresh);
    return fresh;
  }
  /** Mount the new plots (now in the DOM) and drop the ones no longer shown. */
  finish(): void {
    for (const p of this.shown) p.mount();
    for (const p of this.old.values()) p.destroy();
    this.old.clear();
  }
}

function header(report: FileReport, notice: string | undefined): HTMLElement {
  const counts = { error: 0, warning: 0, info: 0 };
  for (const f of report.findings) counts[f.severity]++;
  return h('header', { class: 'file-header' },
    h('h2', { id: 'file-title' }, report.title ?? baseName(report.file)),
    h('div', { class: 'file-meta' },
      h('span', { class: 'file-name', title: report.file }, baseName(report.file)),
      ...(['error', 'warning', 'info'] as const).map((s) =>
        h('span', { class: `count count-${s}`, title: `${counts[s]} ${s}${counts[s] === 1 ? '' : 's'}` }, badge(String(counts[s])), ` ${s}`))),
    notice ? h('p', { class: 'notice stale' }, notice) : undefined);
}

function baseName(file: string): string {
  return file.split(/[\\/]/).pop() ?? file;
}

function overview(report: FileReport, selected: string | undefined, ctx: RenderContext): HTMLElement {
  const items = mirrorList(report);
  // Each row with the mirror's place in the file, so a set-aside mirror sits where it is written.
  const placed: Placed[] = items.map((it, k) => ({ at: report.mirrors[k]?.mirrorIndex ?? Number.MAX_SAFE_INTEGER, mirror: report.mirrors[k]?.mirror, row: {
    key: `mirror:${it.name}`,
    className: it.worst ? `has-${it.worst}` : undefined,
    selected: ctx.mode === 'panel' ? it.name === selected : undefined,
    actionLabel: ctx.mode === 'panel' ? `Show mirror ${it.name}` : undefined,
    onActivate: ctx.mode === 'panel' ? () => ctx.onSelect(it.name) : undefined,
    cells: [
      { text: ctx.mode === 'report' ? h('a', { href: `#mirror-${cssId(it.name)}` }, it.name) : it.name },
      { text: `${it.kind} ${it.type}` },
      { text: it.iout }, { text: it.error }, { text: it.compliance },
      { text: findingCounts(it.counts, it.converged) },
    ],
  } }));
  // Mirrors set aside for their errors: a row each, so the list still names every mirror.
  for (const w of report.withheld ?? []) {
    const name = w.name ?? `mirror ${w.index + 1}`;
    placed.push({ at: w.index, row: {
      key: `aside:${w.index}`,
      className: 'has-error',
      actionLabel: ctx.mode === 'panel' ? `Show mirror ${name} in the editor` : undefined,
      onActivate: ctx.mode === 'panel' ? () => ctx.onReveal(w.range) : undefined,
      cells: [
        { text: name }, { text: '—' }, { text: '—' }, { text: '—' }, { text: '—' },
        { text: h('span', { class: 'finding-counts' }, h('span', { class: 'severity severity-error' }, 'not solved: fix its errors')) },
      ],
    } });
  }
  placed.sort((a, b) => a.at - b.at);  // stable: a bank's outputs keep their order
  const rows = grouped(report, placed);
  return table('Mirrors of this spec', [
    // Kind and polarity share a column: the list must fit an editor split in two.
    { label: 'Mirror', numeric: false }, { label: 'Kind', numeric: false },
    { label: 'Iout', numeric: true }, { label: 'Error', numeric: true }, { label: 'Compliance', numeric: true },
    { label: 'Findings', numeric: false },
  ], rows, { id: 'mirror-list' });
}

interface Placed { at: number; row: TableRow; mirror?: string }

/** With bias networks, the rows under one heading per network (its members in network order),
 *  then the mirrors in no network and those set aside; without, the rows as they are. */
function grouped(report: FileReport, placed: Placed[]): TableRow[] {
  const groups = mirrorGroups(report);
  if (groups.length === 1 && groups[0]!.network === undefined) return placed.map((p) => p.row);
  const out: TableRow[] = [];
  for (const g of groups) {
    const order = new Map(g.mirrors.map((m, i) => [m, i] as const));
    const mine = placed.filter((p) => (p.mirror !== undefined && order.has(p.mirror)) || (g.network === undefined && p.mirror === undefined));
    // Network order (root first, each after its feeder); a bank's outputs keep theirs (stable sort).
    if (g.network !== undefined) mine.sort((a, b) => order.get(a.mirror!)! - order.get(b.mirror!)!);
    if (mine.length === 0) continue;
    out.push({ key: `group:${g.network ?? ''}`, group: g.network !== undefined ? `Network of ${g.network}` : 'Not in a network', cells: [] });
    out.push(...mine.map((p) => p.row));
  }
  return out;
}

function findingCounts(counts: Record<'error' | 'warning' | 'info', number>, converged: boolean): HTMLElement {
  const parts: (HTMLElement | string)[] = [];
  if (!converged) parts.push(h('span', { class: 'severity severity-error' }, 'not converged'));
  for (const s of ['error', 'warning', 'info'] as const) {
    if (counts[s] > 0) parts.push(h('span', { class: `severity severity-${s}` }, `${counts[s]} ${s}${counts[s] === 1 ? '' : 's'}`));
  }
  if (parts.length === 0) parts.push(h('span', { class: 'ok' }, 'none'));
  return h('span', { class: 'finding-counts' }, ...parts);
}

function mirrorDetail(report: FileReport, m: MirrorReport, ctx: RenderContext, plots: PlotSet): HTMLElement {
  const id = cssId(m.name);
  const own = findingsFor(report, m);
  const anchor = mirrorAnchor(report, m);
  const title = h('div', { class: 'mirror-title' },
    h('h2', { id: `mirror-${id}-name` }, m.name),
    tag(m.kind), tag(m.type.toUpperCase()),
    m.converged ? undefined : tag(m.beyondRails ? 'no operating point' : 'not converged', { class: 'tag-error' }),
    ctx.mode === 'panel' && anchor ? button('Show in editor', () => ctx.onReveal(anchor.range), { appearance: 'secondary', 'data-key': `reveal:${m.name}` }) : undefined);
  if (m.beyondRails) {
    // No operating point: the numbers of the last iterate describe nothing, so only the finding shows.
    return h('article', { class: 'mirror', id: `mirror-${id}`, 'data-mirror': m.name, 'aria-labelledby': `mirror-${id}-name` },
      divider(), title,
      h('p', { class: 'solve-note severity-error' }, `No operating point within the supply${m.solveNote ? `: ${m.solveNote}` : ''}.`),
      section(`find-${id}`, 'Findings', own.length > 0 ? findingsTable(own, ctx) : h('p', { class: 'note' }, 'No findings.')));
  }
  // A device clicked in the schematic: its row selected, and revealed in the spec.
  const onDevice = (name: string): void => {
    const table = document.querySelector(`table.devices[data-mirror="${CSS.escape(m.name)}"]`);
    const key = `dev:${m.name}:${name}`;
    for (const tr of table?.querySelectorAll<HTMLElement>('tr[data-key]') ?? []) {
      const on = tr.dataset.key === key;
      tr.classList.toggle('selected', on);
      tr.setAttribute('aria-selected', String(on));
      if (on) tr.scrollIntoView({ block: 'nearest' });
    }
    markSchematicDevice(document, m.name, name);
    const d = m.devices.find((x) => x.name === name);
    const reveal = d ? deviceRow(report, m, d, own).reveal : undefined;
    if (reveal && ctx.mode === 'panel') ctx.onReveal(reveal);
  };
  const body: (HTMLElement | undefined)[] = [
    m.converged ? undefined : h('p', { class: 'solve-note severity-error' }, `The DC solve did not converge${m.solveNote ? `: ${m.solveNote}` : ''}.`),
    h('div', { class: 'figures-schematic' }, figures(summaryFigures(m), { 'data-figures': 'summary' }), schematicFigure(report, m, onDevice)),
  ];
  const reqs = requirementViews(m, own);
  if (reqs.length > 0) {
    body.push(section(`req-${id}`, 'Requirements', table(`Requirements of ${m.name}`, [
      { label: 'Requirement', numeric: false }, { label: 'Target', numeric: true }, { label: 'Actual', numeric: true }, { label: 'Met', numeric: false },
    ], reqs.map((r) => {
      const fnd = r.finding;
      return {
        key: `req:${m.name}:${r.key}`,
        className: r.met ? 'met' : 'unmet',
        actionLabel: fnd && ctx.mode === 'panel' ? `Reveal why ${r.label} is not met` : undefined,
        onActivate: fnd && ctx.mode === 'panel' ? () => ctx.onReveal(fnd.range) : undefined,
        cells: [{ text: r.label }, { text: r.target }, { text: r.actual },
          { text: r.met ? h('span', { class: 'ok' }, '✓ met') : h('span', { class: 'severity severity-error' }, '✗ not met'), title: fnd?.message }],
      };
    }), { class: 'grid requirements' })));
  }
  const columns = deviceColumns(m.type);
  const devices = m.devices;
  body.push(section(`dev-${id}`, 'Devices', h('div', { class: 'scroll-x' }, table(`Devices of ${m.name}`, columns,
    devices.map((d) => {
      const row = deviceRow(report, m, d, own);
      const reveal = row.reveal;
      return {
        key: `dev:${m.name}:${d.name}`,
        className: row.severity ? `has-${row.severity}` : undefined,
        actionLabel: reveal && ctx.mode === 'panel' ? `Reveal device ${d.name}` : undefined,
        onActivate: reveal && ctx.mode === 'panel' ? () => ctx.onReveal(reveal) : undefined,
        cells: row.cells.map((c) => ({ text: c.text, title: c.title, className: c.flag })),
      };
    }), { class: 'grid devices', 'data-mirror': m.name })),
    devices.some((d) => d.sized) ? h('p', { class: 'note' }, h('span', { class: 'sized' }, 'Italic'), ' sizes are computed by qpoint.') : undefined));
  body.push(section(`find-${id}`, 'Findings', own.length > 0 ? findingsTable(own, ctx) : h('p', { class: 'ok' }, 'No findings: every check passes.')));
  const plotList = [plots.get('iout', m), plots.get('rout', m)].filter((p): p is PlotHandle => p !== undefined);
  body.push(section(`plots-${id}`, 'Plots', plotList.length > 0
    ? h('div', { class: 'plots' }, ...plotList.map((p) => p.element))
    : h('p', { class: 'note' }, 'No Iout/Rout sweep in this report.')));
  const runMc = ctx.mode === 'panel' && ctx.onRunMonteCarlo && m.sigma !== undefined
    ? button(m.mc ? 'Run Monte Carlo again' : 'Run Monte Carlo', () => ctx.onRunMonteCarlo?.(), { appearance: 'secondary', 'data-key': `mc-run:${m.name}` })
    : undefined;
  if (m.mc) {
    const hist = plots.get('mc', m);
    body.push(section(`mc-${id}`, 'Monte Carlo', figures(monteCarloFigures(m), { 'data-figures': 'mc' }), hist ? h('div', { class: 'plots' }, hist.element) : undefined, runMc));
  } else if (runMc) {
    body.push(section(`mc-${id}`, 'Monte Carlo', h('p', { class: 'note' }, 'Not run yet: samples every output\'s mismatch with the full nonlinear solve (samples and seed from the settings).'), runMc));
  }
  if (m.corners && m.corners.length > 0) {
    body.push(section(`corners-${id}`, 'Corners', h('div', { class: 'scroll-x' }, table(`Corners of ${m.name}`, CORNER_COLUMNS,
      cornerRows(m, report.limits).map((r) => ({ key: `corner:${m.name}:${r.name}`, cells: r.cells.map((c) => ({ text: c.text, title: c.title, className: c.flag })) })),
      { class: 'grid corners' })), h('p', { class: 'note' }, 'The worst value of each column is in bold; a value in the error colour fails a requirement.')));
  }
  return h('article', { class: 'mirror', id: `mirror-${id}`, 'data-mirror': m.name, 'aria-labelledby': `mirror-${id}-name` },
    divider(), title, ...body);
}

function findingsTable(findings: Parameters<typeof findingRows>[0], ctx: RenderContext): HTMLElement {
  const rows = findingRows(findings);
  return table('Findings', [
    { label: 'Severity', numeric: false }, { label: 'Code', numeric: false }, { label: 'Message', numeric: false }, { label: 'Line', numeric: true },
  ], rows.map((f: FindingRowView, i) => ({
    key: `finding:${i}:${f.code}:${f.location}`,
    className: `has-${f.severity}`,
    actionLabel: ctx.mode === 'panel' ? `Reveal ${f.severity} ${f.code} at line ${f.location}` : undefined,
    onActivate: ctx.mode === 'panel' ? () => ctx.onReveal(f.reveal) : undefined,
    cells: [{ text: severityLabel(f.severity) }, { text: h('code', {}, f.code) }, { text: f.message, className: 'message' }, { text: f.location }],
  })), { class: 'grid findings' });
}
