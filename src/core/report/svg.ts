/**
 * Plots as inline SVG for the printable report: a line over x with a linear or logarithmic y
 * axis, and a histogram. Pure strings, no DOM; colours are the report's `--vscode-charts-*`
 * variables, so the light set prints and the dark set follows a dark reader. Points that failed
 * (did not converge) break the line and are marked with a cross on the x axis, never dropped
 * silently.
 */
import { formatSI } from '../text/format';

export interface LinePoint { x: number; y: number; ok: boolean }

export interface LinePlot {
  title: string;
  xUnit: string;
  yUnit: string;
  points: LinePoint[];
  logY?: boolean;
  /** A logarithmic x axis (frequency). */
  logX?: boolean;
  /** A vertical marker (the nominal output voltage, the flicker corner). */
  marker?: { x: number; label: string };
  /** A dot on the plot (the operating point). */
  point?: { x: number; y: number };
  /** More lines on the same axes (each device's part), thinner, with a legend. */
  extra?: { label: string; points: LinePoint[] }[];
}

const EXTRA_COLOURS = ['green', 'purple', 'orange', 'yellow', 'red'];

const W = 560, H = 240;
const PAD = { left: 64, right: 16, top: 28, bottom: 40 };

const esc = (s: string): string => s.replace(/[&<>"]/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;' })[c] ?? c);
const num = (v: number): string => (Math.round(v * 10) / 10).toString();

/** About five round tick values spanning [lo, hi]. */
function ticks(lo: number, hi: number): number[] {
  const span = hi - lo;
  if (!(span > 0)) return [lo];
  const raw = span / 5;
  const mag = 10 ** Math.floor(Math.log10(raw));
  const step = [1, 2, 5, 10].map((k) => k * mag).find((s) => s >= raw) ?? 10 * mag;
  const out: number[] = [];
  for (let t = Math.ceil(lo / step) * step; t <= hi + step * 1e-9; t += step) out.push(Math.abs(t) < step * 1e-9 ? 0 : t);
  return out;
}

function frame(title: string, body: string[]): string {
  return [
    `<svg class="plot-svg" viewBox="0 0 ${W} ${H}" width="${W}" height="${H}" role="img" aria-label="${esc(title)}">`,
    `<title>${esc(title)}</title>`,
    `<text x="${PAD.left}" y="16" style="fill: var(--vscode-charts-foreground); font: 12px var(--vscode-font-family)">${esc(title)}</text>`,
    ...body,
    '</svg>',
  ].join('');
}

export function linePlotSvg(p: LinePlot): string {
  const usable = (q: LinePoint): boolean => q.ok && Number.isFinite(q.x) && Number.isFinite(q.y) && (!p.logY || q.y > 0) && (!p.logX || q.x > 0);
  const good = p.points.filter(usable);
  const extraGood = (p.extra ?? []).flatMap((e) => e.points.filter(usable));
  const xs = p.points.map((q) => q.x).filter((x) => Number.isFinite(x) && (!p.logX || x > 0));
  if (good.length < 2 || xs.length < 2) return frame(p.title, [`<text x="${W / 2}" y="${H / 2}" text-anchor="middle" style="fill: var(--vscode-descriptionForeground)">no converged points</text>`]);
  const fx = (x: number): number => (p.logX ? Math.log10(x) : x);
  const x0 = fx(Math.min(...xs)), x1 = fx(Math.max(...xs));
  const fy = (y: number): number => (p.logY ? Math.log10(y) : y);
  let y0 = Math.min(...[...good, ...extraGood].map((q) => fy(q.y))), y1 = Math.max(...good.map((q) => fy(q.y)));
  // Parts far below the total would stretch the axis over decades nobody reads: four at most.
  if (p.logY && p.extra) y0 = Math.max(y0, y1 - 4);
  if (p.logY) { y0 = Math.floor(y0); y1 = Math.ceil(y1); if (y1 === y0) y1 = y0 + 1; }
  else { if (y0 > 0 && y0 < 0.2 * y1) y0 = 0; if (y1 === y0) { y1 = y0 + (Math.abs(y0) || 1) * 0.1; } }
  const px = (x: number): number => PAD.left + ((fx(x) - x0) / (x1 - x0 || 1)) * (W - PAD.left - PAD.right);
  const py = (y: number): number => H - PAD.bottom - ((fy(y) - y0) / (y1 - y0)) * (H - PAD.top - PAD.bottom);
  const body: string[] = [];
  const axis = 'stroke: var(--vscode-charts-lines); stroke-width: 1';
  const label = 'fill: var(--vscode-charts-foreground); font: 10px var(--vscode-font-family)';
  const xTicks = p.logX ? Array.from({ length: Math.floor(x1) - Math.ceil(x0) + 1 }, (_, k) => 10 ** (Math.ceil(x0) + k)) : ticks(x0, x1);
  for (const t of xTicks) {
    // A label at the right edge ends there instead of running off the plot.
    const anchor = px(t) > W - PAD.right - 12 ? 'end' : 'middle';
    body.push(`<line x1="${num(px(t))}" y1="${H - PAD.bottom}" x2="${num(px(t))}" y2="${PAD.top}" style="${axis}; stroke-dasharray: 2 3"/>`,
      `<text x="${num(px(t))}" y="${H - PAD.bottom + 14}" text-anchor="${anchor}" style="${label}">${esc(formatSI(t, p.xUnit))}</text>`);
  }
  const yTicks = p.logY ? Array.from({ length: y1 - y0 + 1 }, (_, k) => 10 ** (y0 + k)) : ticks(y0, y1);
  // Enough digits that neighbouring ticks read differently (a drift of a few per mille).
  const yStep = yTicks.length > 1 ? Math.abs(yTicks[1]! - yTicks[0]!) : 0;
  const yMag = Math.max(Math.abs(y0), Math.abs(y1));
  const yDigits = p.logY || !(yStep > 0) ? 3 : Math.min(6, Math.max(3, Math.ceil(Math.log10(yMag / yStep)) + 1));
  for (const t of yTicks) {
    body.push(`<line x1="${PAD.left}" y1="${num(py(t))}" x2="${W - PAD.right}" y2="${num(py(t))}" style="${axis}; stroke-dasharray: 2 3"/>`,
      `<text x="${PAD.left - 6}" y="${num(py(t) + 3)}" text-anchor="end" style="${label}">${esc(formatSI(t, p.yUnit, yDigits))}</text>`);
  }
  body.push(`<rect x="${PAD.left}" y="${PAD.top}" width="${W - PAD.left - PAD.right}" height="${H - PAD.top - PAD.bottom}" style="fill: none; ${axis}"/>`);
  // One polyline per run of good points: a failed point breaks the line.
  let run: string[] = [];
  const flush = () => {
    if (run.length > 1) body.push(`<polyline points="${run.join(' ')}" style="fill: none; stroke: var(--vscode-charts-blue); stroke-width: 1.5"/>`);
    run = [];
  };
  for (const q of p.points) {
    const ok = q.ok && Number.isFinite(q.y) && (!p.logY || q.y > 0);
    if (ok) run.push(`${num(px(q.x))},${num(py(q.y))}`);
    else {
      flush();
      if (Number.isFinite(q.x)) {
        const x = px(q.x), y = H - PAD.bottom;
        body.push(`<path class="failed" d="M${num(x - 3)},${num(y - 3)}L${num(x + 3)},${num(y + 3)}M${num(x - 3)},${num(y + 3)}L${num(x + 3)},${num(y - 3)}" style="stroke: var(--vscode-charts-red); stroke-width: 1.5"/>`);
      }
    }
  }
  flush();
  (p.extra ?? []).forEach((e, k) => {
    const colour = `var(--vscode-charts-${EXTRA_COLOURS[k % EXTRA_COLOURS.length]})`;
    const pts = e.points.filter(usable).map((q) => `${num(px(q.x))},${num(Math.min(py(q.y), H - PAD.bottom))}`);
    if (pts.length > 1) body.push(`<polyline class="part" points="${pts.join(' ')}" style="fill: none; stroke: ${colour}; stroke-width: 1; stroke-dasharray: 4 2"/>`);
    body.push(`<text x="${W - PAD.right - 4}" y="${PAD.top + 12 + 12 * k}" text-anchor="end" style="fill: ${colour}; font: 10px var(--vscode-font-family)">${esc(e.label)}</text>`);
  });
  if (p.marker && fx(p.marker.x) >= x0 && fx(p.marker.x) <= x1) {
    const x = num(px(p.marker.x));
    body.push(`<line x1="${x}" y1="${PAD.top}" x2="${x}" y2="${H - PAD.bottom}" style="stroke: var(--vscode-charts-orange); stroke-width: 1"/>`,
      `<text x="${x}" y="${PAD.top - 3}" text-anchor="middle" style="${label}">${esc(p.marker.label)}</text>`);
  }
  const q = p.point;
  if (q && q.x >= x0 && q.x <= x1 && Number.isFinite(q.y) && (!p.logY || q.y > 0)) {
    body.push(`<circle class="operating-point" cx="${num(px(q.x))}" cy="${num(py(q.y))}" r="4" style="fill: var(--vscode-charts-orange)"/>`);
  }
  return frame(p.title, body);
}

/** Bars over bin edges (counts), x in the given unit. */
export function histogramSvg(title: string, edges: number[], counts: number[], unit: string): string {
  if (edges.length < 2 || counts.length === 0) return frame(title, []);
  const x0 = edges[0]!, x1 = edges[edges.length - 1]!;
  const top = Math.max(1, ...counts);
  const px = (x: number): number => PAD.left + ((x - x0) / (x1 - x0 || 1)) * (W - PAD.left - PAD.right);
  const py = (c: number): number => H - PAD.bottom - (c / top) * (H - PAD.top - PAD.bottom);
  const label = 'fill: var(--vscode-charts-foreground); font: 10px var(--vscode-font-family)';
  const body: string[] = [];
  counts.forEach((c, k) => {
    const a = px(edges[k]!), b = px(edges[k + 1] ?? x1);
    body.push(`<rect x="${num(a)}" y="${num(py(c))}" width="${num(Math.max(b - a - 1, 0.5))}" height="${num(H - PAD.bottom - py(c))}" style="fill: var(--vscode-charts-blue)"/>`);
  });
  for (const t of ticks(x0, x1)) body.push(`<text x="${num(px(t))}" y="${H - PAD.bottom + 14}" text-anchor="middle" style="${label}">${esc(formatSI(t, unit, 4))}</text>`);
  body.push(`<text x="${PAD.left - 6}" y="${num(py(top) + 3)}" text-anchor="end" style="${label}">${top}</text>`,
    `<text x="${PAD.left - 6}" y="${H - PAD.bottom}" text-anchor="end" style="${label}">0</text>`,
    `<line x1="${PAD.left}" y1="${H - PAD.bottom}" x2="${W - PAD.right}" y2="${H - PAD.bottom}" style="stroke: var(--vscode-charts-lines)"/>`);
  return frame(title, body);
}
