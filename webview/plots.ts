/**
 * The panel's plots, drawn with uPlot on canvas. Colours and fonts are read from the theme's
 * `--vscode-*` variables when a plot is built; the page rebuilds plots when the theme changes
 * (canvas pixels cannot follow CSS variables by themselves).
 */
import uPlot from 'uplot';
import type { MirrorReport } from '../src/core/types';
import { formatNumber, formatSI } from './format';
import { h } from './components';
import {
  curvePlotData, driftPlotData, gmIdPlotData, histogramPlotData, noisePlotData,
  type CurvePlotData, type DriftPlotData, type GmIdPlotData, type HistogramPlotData, type Mark, type NoisePlotData,
} from './plot-data';

const HEIGHT = 220;

interface Palette {
  fg: string; grid: string; line: string; accent: string; marker: string; edge: string; limit: string;
  font: string; labelFont: string;
}

function themeVar(name: string, ...fallbacks: string[]): string {
  const style = getComputedStyle(document.documentElement);
  const body = getComputedStyle(document.body);
  for (const n of [name, ...fallbacks]) {
    const v = (style.getPropertyValue(n) || body.getPropertyValue(n)).trim();
    if (v) return v;
  }
  return '';
}

function palette(): Palette {
  const fg = themeVar('--vscode-charts-foreground', '--vscode-foreground', '--vscode-editor-foreground');
  const family = themeVar('--vscode-font-family') || 'sans-serif';
  const size = Number.parseFloat(themeVar('--vscode-font-size')) || 13;
  return {
    fg,
    grid: themeVar('--vscode-charts-lines', '--vscode-panel-border', '--vscode-widget-border'),
    line: themeVar('--vscode-charts-blue', '--vscode-focusBorder'),
    accent: themeVar('--vscode-charts-purple', '--vscode-charts-blue'),
    marker: themeVar('--vscode-charts-orange', '--vscode-editorWarning-foreground'),
    edge: themeVar('--vscode-charts-red', '--vscode-editorError-foreground'),
    limit: themeVar('--vscode-charts-green', '--vscode-charts-yellow'),
    font: `${Math.max(10, size - 2)}px ${family}`,
    labelFont: `${size - 1}px ${family}`,
  };
}

/** A plot in a figure with a caption. `mount` builds the uPlot once the figure is in the DOM
 *  (uPlot measures its container); `update` feeds a newer report of the same mirror into the
 *  existing plot — far cheaper than building a new one — and says false when the plot must be
 *  rebuilt instead (its axis units changed, or the data is gone). */
export interface PlotHandle {
  id: string;
  element: HTMLElement;
  mount(): void;
  update(m: MirrorReport): boolean;
  destroy(): void;
}

interface PlotSpec<D> {
  id: string;
  caption: string;
  data: (m: MirrorReport) => D | undefined;
  /** Text that fixes the plot's options (axis units): a change means rebuild. */
  shape: (d: D) => string;
  legend: (m: MirrorReport, d: D) => (HTMLElement | undefined)[];
  series: (d: D) => uPlot.AlignedData;
  options: (p: Palette, d: () => D, width: number) => uPlot.Options;
}

function makePlot<D>(m: MirrorReport, spec: PlotSpec<D>): PlotHandle | undefined {
  let data = spec.data(m);
  if (data === undefined) return undefined;
  const shape = spec.shape(data);
  const container = h('div', { class: 'plot-canvas' });
  const caption = h('figcaption', {});
  const element = h('figure', { class: 'plot', id: spec.id, role: 'group', 'aria-label': spec.caption }, container, caption);
  const fillCaption = (mr: MirrorReport, d: D) => caption.replaceChildren(h('span', { class: 'plot-title' }, spec.caption),
    ...spec.legend(mr, d).filter((x): x is HTMLElement => x !== undefined));
  fillCaption(m, data);
  let plot: uPlot | undefined;
  let observer: ResizeObserver | undefined;
  return {
    id: spec.id,
    element,
    mount() {
      if (plot || data === undefined) return;
      plot = new uPlot(spec.options(palette(), () => data as D, widthOf(container)), spec.series(data), container);
      observer = new ResizeObserver(() => {
        const width = Math.floor(container.clientWidth);
        if (plot && width > 0 && width !== plot.width) plot.setSize({ width, height: HEIGHT });
      });
      observer.observe(container);
    },
    update(next) {
      const d = spec.data(next);
      if (d === undefined || spec.shape(d) !== shape || !plot) return false;
      data = d;
      fillCaption(next, d);
      plot.setData(spec.series(d));
      return true;
    },
    destroy() {
      observer?.disconnect();
      plot?.destroy();
      plot = undefined;
    },
  };
}

/** Grid lines at whole decades only: a log axis with all nine lines per decade reads as noise. */
const decades: uPlot.Axis.Filter = (_u, splits) =>
  splits.map((v) => (v > 0 && Math.abs(Math.log10(v) - Math.round(Math.log10(v))) < 1e-9 ? v : null));

function axis(p: Palette, label: string, format: (v: number) => string, log = false): uPlot.Axis {
  return {
    label, stroke: p.fg, font: p.font, labelFont: p.labelFont,
    // uPlot merges options key by key: an explicit `filter: undefined` would replace its default.
    grid: { stroke: p.grid, width: 1, ...(log ? { filter: decades } : {}) },
    ticks: { stroke: p.grid, width: 1, ...(log ? { filter: decades } : {}) },
    values: (_u, splits) => splits.map((v) => (v === null || v === undefined ? '' : format(v))),
  };
}

function widthOf(container: HTMLElement): number {
  return Math.max(240, Math.floor(container.clientWidth || 480));
}

/** Vertical lines at data positions along x, drawn over the plotting area. */
function drawVertical(u: uPlot, x: number, color: string, dash: number[], label?: string, p?: Palette, row = 0): void {
  const left = u.valToPos(x, 'x', true);
  const { top, height, left: bl, width } = u.bbox;
  if (!(left >= bl && left <= bl + width)) return;
  const ctx = u.ctx;
  ctx.save();
  ctx.strokeStyle = color;
  ctx.lineWidth = Math.max(1, devicePixelRatio);
  ctx.setLineDash(dash.map((d) => d * devicePixelRatio));
  ctx.beginPath();
  ctx.moveTo(left, top);
  ctx.lineTo(left, top + height);
  ctx.stroke();
  if (label && p) {
    ctx.setLineDash([]);
    ctx.fillStyle = color;
    ctx.font = p.font.replace(/^(\d+(?:\.\d+)?)px/, (_m, s: string) => `${Number(s) * devicePixelRatio}px`);
    ctx.textBaseline = 'top';
    ctx.fillText(label, left + 3 * devicePixelRatio, top + (2 + 14 * row) * devicePixelRatio);
  }
  ctx.restore();
}

function drawPoint(u: uPlot, x: number, y: number, scale: string, color: string): void {
  const cx = u.valToPos(x, 'x', true);
  const cy = u.valToPos(y, scale, true);
  if (!Number.isFinite(cx) || !Number.isFinite(cy)) return;
  const ctx = u.ctx;
  ctx.save();
  ctx.fillStyle = color;
  ctx.strokeStyle = color;
  ctx.beginPath();
  ctx.arc(cx, cy, 4.5 * devicePixelRatio, 0, 2 * Math.PI);
  ctx.fill();
  ctx.restore();
}

/** A cross on the x axis at each Vout with no operating point: the curve breaks there, and the
 *  cross says why it breaks rather than letting the line stop silently. */
function drawFailed(u: uPlot, xs: readonly number[], color: string): void {
  if (xs.length === 0) return;
  const { top, height, left, width } = u.bbox;
  const r = 4 * devicePixelRatio;
  const cy = top + height - r - 2 * devicePixelRatio;
  const ctx = u.ctx;
  ctx.save();
  ctx.strokeStyle = color;
  ctx.lineWidth = Math.max(1.5, 1.5 * devicePixelRatio);
  ctx.beginPath();
  for (const x of xs) {
    const cx = u.valToPos(x, 'x', true);
    if (!(cx >= left && cx <= left + width)) continue;
    ctx.moveTo(cx - r, cy - r); ctx.lineTo(cx + r, cy + r);
    ctx.moveTo(cx - r, cy + r); ctx.lineTo(cx + r, cy - r);
  }
  ctx.stroke();
  ctx.restore();
}

function failedLegend(d: CurvePlotData): HTMLElement | undefined {
  const n = d.failed.length;
  return n === 0 ? undefined : legendItem('legend-failed', `no operating point at ${n} Vout${n === 1 ? '' : 's'}`);
}

/** Shade the out-of-compliance side of the edge so the usable output range reads at a glance. */
function shadeOutside(u: uPlot, edge: number, side: 'below' | 'above', color: string): void {
  const x = u.valToPos(edge, 'x', true);
  const { top, height, left, width } = u.bbox;
  const from = side === 'below' ? left : Math.max(left, x);
  const to = side === 'below' ? Math.min(left + width, x) : left + width;
  if (to <= from) return;
  const ctx = u.ctx;
  ctx.save();
  ctx.globalAlpha = 0.08;
  ctx.fillStyle = color;
  ctx.fillRect(from, top, to - from, height);
  ctx.restore();
}

function legendItem(cls: string, text: string): HTMLElement {
  return h('span', { class: `legend-item ${cls}` }, h('span', { class: 'swatch', 'aria-hidden': 'true' }), text);
}

/** Iout versus Vout across the supply, with the nominal point and the compliance edge. */
export function ioutPlot(m: MirrorReport): PlotHandle | undefined {
  return makePlot<CurvePlotData>(m, {
    id: plotId('iout', m),
    caption: 'Iout versus Vout',
    data: curvePlotData,
    shape: (d) => d.iScale.unit,
    legend: (mr, d) => [
      legendItem('legend-line', 'Iout'),
      legendItem('legend-marker', `nominal ${formatSI(mr.vout, 'V')}, ${formatSI(mr.iout, 'A')}`),
      d.compliance === undefined ? undefined : legendItem('legend-edge', `compliance ${formatSI(d.compliance, 'V', 4)}`),
      failedLegend(d),
    ],
    series: (d) => [d.x, d.iout],
    options: (p, d, width) => ({
      width, height: HEIGHT,
      legend: { show: false },
      cursor: { drag: { x: false, y: false } },
      scales: { x: { time: false } },
      axes: [axis(p, 'Vout (V)', (v) => formatNumber(v)), axis(p, `Iout (${d().iScale.unit})`, (v) => formatNumber(v))],
      series: [{}, { label: 'Iout', stroke: p.line, width: 2, points: { show: false } }],
      hooks: {
        drawAxes: [(u) => { const c = d().compliance; if (c !== undefined) shadeOutside(u, c, d().outside, p.edge); }],
        draw: [(u) => {
          const c = d().compliance;
          if (c !== undefined) drawVertical(u, c, p.edge, [5, 4], 'compliance', p);
          drawPoint(u, d().nominal.x, d().nominal.iout, 'y', p.marker);
          drawFailed(u, d().failed, p.edge);
        }],
      },
    }),
  });
}

/** Rout versus Vout on a log axis, with the nominal point and the compliance edge. */
export function routPlot(m: MirrorReport): PlotHandle | undefined {
  return makePlot<CurvePlotData>(m, {
    id: plotId('rout', m),
    caption: 'Rout versus Vout',
    data: (mr) => {
      const d = curvePlotData(mr);
      return d && d.rout.some((r) => r !== null) ? d : undefined;
    },
    shape: (d) => d.rScale.unit,
    legend: (mr, d) => [
      legendItem('legend-line legend-accent', 'Rout (log)'),
      d.nominal.rout === null ? undefined : legendItem('legend-marker', `nominal ${formatSI(mr.rout, 'Ω')}`),
      d.compliance === undefined ? undefined : legendItem('legend-edge', `compliance ${formatSI(d.compliance, 'V', 4)}`),
      failedLegend(d),
    ],
    series: (d) => [d.x, d.rout],
    options: (p, d, width) => ({
      width, height: HEIGHT,
      legend: { show: false },
      cursor: { drag: { x: false, y: false } },
      scales: { x: { time: false }, y: { distr: 3, log: 10 } },
      axes: [axis(p, 'Vout (V)', (v) => formatNumber(v)), axis(p, `Rout (${d().rScale.unit})`, (v) => formatNumber(v), true)],
      series: [{}, { label: 'Rout', stroke: p.accent, width: 2, points: { show: false } }],
      hooks: {
        drawAxes: [(u) => { const c = d().compliance; if (c !== undefined) shadeOutside(u, c, d().outside, p.edge); }],
        draw: [(u) => {
          const c = d().compliance;
          if (c !== undefined) drawVertical(u, c, p.edge, [5, 4], 'compliance', p);
          const r = d().nominal.rout;
          if (r !== null) drawPoint(u, d().nominal.x, r, 'y', p.marker);
          drawFailed(u, d().failed, p.edge);
        }],
      },
    }),
  });
}

/** Monte Carlo histogram of Iout with mean, ±3σ and the requirement limits. */
export function histogramPlot(m: MirrorReport): PlotHandle | undefined {
  const markColor = (k: Mark['kind'], p: Palette) => (k === 'limit' ? p.limit : k === 'mean' ? p.marker : p.edge);
  return makePlot<HistogramPlotData>(m, {
    id: plotId('mc', m),
    caption: 'Monte Carlo: Iout',
    data: histogramPlotData,
    shape: (d) => d.scale.unit,
    legend: (_mr, d) => [
      legendItem('legend-line', `Iout (${d.counts.reduce((a, b) => a + b, 0)} samples)`),
      legendItem('legend-marker', 'mean'),
      legendItem('legend-edge', '±3σ'),
      d.marks.some((k) => k.kind === 'limit') ? legendItem('legend-limit', 'requirement') : undefined,
    ],
    series: (d) => [d.x, d.counts],
    options: (p, d, width) => ({
      width, height: HEIGHT,
      legend: { show: false },
      cursor: { drag: { x: false, y: false } },
      scales: {
        x: { time: false, range: () => {
          const xs = [...d().x, ...d().marks.map((k) => k.x)];
          return [Math.min(...xs) - d().width, Math.max(...xs) + d().width];
        } },
        y: { range: (_u, _min, max) => [0, Math.max(1, max * 1.1)] },
      },
      axes: [axis(p, `Iout (${d().scale.unit})`, (v) => formatNumber(v, 4)), axis(p, 'count', (v) => formatNumber(v))],
      series: [{}, {
        label: 'count', stroke: p.line, fill: p.line, width: 1,
        paths: uPlot.paths.bars?.({ size: [0.9, Infinity], align: 0 }), points: { show: false },
      }],
      hooks: {
        // Labels on alternating rows so neighbouring marks (−3σ beside −3σ max) stay legible.
        draw: [(u) => { d().marks.forEach((k, i) => drawVertical(u, k.x, markColor(k.kind, p), k.kind === 'mean' ? [] : [5, 4], k.label, p, i % 2)); }],
      },
    }),
  });
}

/** A table device's gm/ID view: the table's gm/ID (left axis) and ID/W (right, log) versus VGS
 *  at the device's L, VDS and VSB, the operating point marked on both. */
export function gmIdPlot(m: MirrorReport, device: string): PlotHandle | undefined {
  return makePlot<GmIdPlotData>(m, {
    id: gmIdPlotId(m, device),
    caption: `gm/ID of ${device}`,
    data: (mr) => gmIdPlotData(mr.devices.find((d) => d.name === device)),
    shape: (d) => d.table,
    legend: (_mr, d) => [
      legendItem('legend-line', 'gm/ID'),
      legendItem('legend-line legend-accent', 'ID/W (log)'),
      legendItem('legend-marker', `operating point ${formatSI(d.op.x, 'V')}, ${formatNumber(d.op.gmId, 3)} /V, ${formatSI(d.op.idW, 'A/m')}`),
      h('span', { class: 'legend-item gmid-where' }, `${d.table}, L ${formatSI(d.l, 'm')}, VDS ${formatSI(d.vds, 'V')}, VSB ${formatSI(d.vsb, 'V')}`),
    ],
    series: (d) => [d.x, d.gmId, d.idW],
    options: (p, d, width) => ({
      width, height: HEIGHT,
      legend: { show: false },
      cursor: { drag: { x: false, y: false } },
      scales: { x: { time: false }, gmid: { range: (_u, _min, max) => [0, max * 1.05] }, idw: { distr: 3, log: 10 } },
      axes: [
        axis(p, 'VGS (V)', (v) => formatNumber(v)),
        { ...axis(p, 'gm/ID (1/V)', (v) => formatNumber(v)), scale: 'gmid' },
        { ...axis(p, 'ID/W (A/m)', (v) => formatSI(v, ''), true), scale: 'idw', side: 1, grid: { show: false } },
      ],
      series: [{}, { label: 'gm/ID', scale: 'gmid', stroke: p.line, width: 2, points: { show: false } },
        { label: 'ID/W', scale: 'idw', stroke: p.accent, width: 2, points: { show: false } }],
      hooks: {
        draw: [(u) => {
          const op = d().op;
          drawVertical(u, op.x, p.marker, [5, 4], 'operating point', p);
          drawPoint(u, op.x, op.gmId, 'gmid', p.marker);
          if (op.idW > 0) drawPoint(u, op.x, op.idW, 'idw', p.marker);
        }],
      },
    }),
  });
}

/** Colours of the per-element parts of the noise plot, in order. */
const PART_VARS = ['--vscode-charts-green', '--vscode-charts-purple', '--vscode-charts-orange', '--vscode-charts-yellow', '--vscode-charts-red'];

/** Output noise density versus frequency, log–log: the total, each element's part (dashed) and
 *  the flicker corner. */
export function noisePlot(m: MirrorReport): PlotHandle | undefined {
  return makePlot<NoisePlotData>(m, {
    id: plotId('noise', m),
    caption: 'Noise density versus frequency',
    data: noisePlotData,
    shape: (d) => `${d.scale.unit}|${d.parts.map((x) => x.name).join(',')}`,
    legend: (_mr, d) => [
      legendItem('legend-line', 'total'),
      ...d.parts.map((x, k) => legendItem(`legend-part legend-part-${k % PART_VARS.length}`, x.name)),
      d.corner === undefined ? undefined : legendItem('legend-edge', `flicker corner ${formatSI(d.corner, 'Hz')}`),
    ],
    series: (d) => [d.x, d.total, ...d.parts.map((x) => x.y)],
    options: (p, d, width) => ({
      width, height: HEIGHT,
      legend: { show: false },
      cursor: { drag: { x: false, y: false } },
      scales: { x: { time: false, distr: 3, log: 10 }, y: { distr: 3, log: 10 } },
      axes: [axis(p, 'f (Hz)', (v) => formatSI(v, ''), true), axis(p, `density (${d().scale.unit})`, (v) => formatNumber(v), true)],
      series: [{}, { label: 'total', stroke: p.line, width: 2, points: { show: false } },
        ...d().parts.map((x, k) => ({ label: x.name, stroke: themeVar(PART_VARS[k % PART_VARS.length]!) || p.accent, width: 1, dash: [4, 3], points: { show: false } }))],
      hooks: {
        draw: [(u) => {
          const c = d().corner;
          if (c !== undefined && c >= d().x[0]! && c <= d().x[d().x.length - 1]!) drawVertical(u, c, p.edge, [5, 4], 'flicker corner', p);
          drawVertical(u, d().f, p.marker, [2, 3], 'f', p, 1);
        }],
      },
    }),
  });
}

/** Iout versus temperature over process.trange. */
export function driftPlot(m: MirrorReport): PlotHandle | undefined {
  return makePlot<DriftPlotData>(m, {
    id: plotId('drift', m),
    caption: 'Iout versus temperature',
    data: driftPlotData,
    shape: (d) => d.scale.unit,
    legend: (mr) => [
      legendItem('legend-line', 'Iout'),
      mr.tc === undefined ? undefined : legendItem('legend-marker', `tc ${formatNumber(mr.tc, 3)} ppm/°C`),
      mr.tcBox === undefined ? undefined : legendItem('legend-marker', `box ${formatNumber(mr.tcBox, 3)} ppm/°C`),
    ],
    series: (d) => [d.x, d.iout],
    options: (p, d, width) => ({
      width, height: HEIGHT,
      legend: { show: false },
      cursor: { drag: { x: false, y: false } },
      scales: { x: { time: false } },
      axes: [axis(p, 'T (°C)', (v) => formatNumber(v)), axis(p, `Iout (${d().scale.unit})`, (v) => formatNumber(v, 5))],
      series: [{}, { label: 'Iout', stroke: p.line, width: 2, points: { show: false } }],
    }),
  });
}

export type PlotKind = 'iout' | 'rout' | 'mc' | 'noise' | 'drift';

/** Element id of a mirror's plot; also the key a re-render uses to reuse the plot. */
export function plotId(kind: PlotKind, m: MirrorReport): string {
  return `plot-${kind}-${cssId(m.name)}`;
}

/** Element id of a device's gm/ID view. */
export function gmIdPlotId(m: MirrorReport, device: string): string {
  return `plot-gmid-${cssId(m.name)}-${cssId(device)}`;
}

export function cssId(name: string): string {
  return name.replace(/[^A-Za-z0-9_-]/g, '_');
}
