/**
 * Plot series from a mirror report, scaled to readable SI units. Pure (tested in vitest): the
 * curve itself is computed by the core; this picks points, drops the ones a plot cannot show
 * (unconverged solves, Rout ≤ 0 or infinite on a log axis), lists the Vouts with no operating
 * point so the plot marks them instead of stopping silently, and chooses axis prefixes.
 */
import { isBipolarReport, sinksCurrent } from '../src/core/device-types';
import type { DeviceReport, MirrorReport } from '../src/core/types';
import { ZERO_CELSIUS } from '../src/core/defaults';
import { NOISE_PART_FLOOR, visibleNoiseParts } from '../src/core/report/noise-parts';
import { axisScale } from './format';

export interface Scaled { factor: number; unit: string }

export interface CurvePlotData {
  /** Vout (V), ascending. */
  x: number[];
  /** Iout in `iScale` units; null where the solve did not converge. */
  iout: (number | null)[];
  iScale: Scaled;
  /** Rout in `rScale` units; null where it cannot sit on a log axis. */
  rout: (number | null)[];
  rScale: Scaled;
  /** The nominal operating point (Vout, Iout and Rout in the scaled units). */
  nominal: { x: number; iout: number; rout: number | null };
  /** Vout (V) of the points with no operating point (the sweep did not converge there). */
  failed: number[];
  /** The compliance edge (V) when it is a finite number. */
  compliance?: number;
  /** Which side of the edge is out of compliance: below it for NMOS, above it for PMOS. */
  outside: 'below' | 'above';
}

export function curvePlotData(m: MirrorReport): CurvePlotData | undefined {
  const points = (m.curve ?? []).filter((p) => Number.isFinite(p.vout)).sort((a, b) => a.vout - b.vout);
  if (points.length < 2) return undefined;
  const iScale = axisScale([...points.map((p) => p.iout), m.iout], 'A');
  const routs = points.map((p) => (p.converged && p.rout > 0 && Number.isFinite(p.rout) ? p.rout : NaN));
  const rScale = axisScale([...routs, m.rout > 0 && Number.isFinite(m.rout) ? m.rout : NaN], 'Ω');
  return {
    x: points.map((p) => p.vout),
    iout: points.map((p) => (p.converged && Number.isFinite(p.iout) ? p.iout / iScale.factor : null)),
    iScale,
    rout: routs.map((r) => (Number.isNaN(r) ? null : r / rScale.factor)),
    rScale,
    nominal: {
      x: m.vout,
      iout: m.iout / iScale.factor,
      rout: m.rout > 0 && Number.isFinite(m.rout) ? m.rout / rScale.factor : null,
    },
    failed: points.filter((p) => !p.converged).map((p) => p.vout),
    compliance: Number.isFinite(m.compliance) ? m.compliance : undefined,
    outside: sinksCurrent(m.type) ? 'below' : 'above',
  };
}

export interface Mark { x: number; label: string; kind: 'mean' | 'sigma' | 'limit' }

export interface HistogramPlotData {
  /** Bin centres in `scale` units. */
  x: number[];
  counts: number[];
  /** Bin width in `scale` units. */
  width: number;
  scale: Scaled;
  marks: Mark[];
}

/** The Monte Carlo histogram with the mean, mean ± 3σ (measured) and the requirement limits:
 *  mean ± 3·require.sigma (the spread the spec allows) and the target Iout = ratio·Iin. */
export function histogramPlotData(m: MirrorReport): HistogramPlotData | undefined {
  const h = m.mc?.histogram;
  const mc = m.mc;
  if (!mc || !h || h.counts.length === 0 || h.edges.length !== h.counts.length + 1) return undefined;
  const scale = axisScale([...h.edges, mc.mean], 'A');
  const x = h.counts.map((_, i) => (h.edges[i] + h.edges[i + 1]) / 2 / scale.factor);
  const width = (h.edges[h.edges.length - 1] - h.edges[0]) / h.counts.length / scale.factor;
  const mean = mc.mean / scale.factor;
  const spread = 3 * mc.sigma * mean;
  const marks: Mark[] = [
    { x: mean, label: 'mean', kind: 'mean' },
    { x: mean - spread, label: '-3σ', kind: 'sigma' },
    { x: mean + spread, label: '+3σ', kind: 'sigma' },
  ];
  const allowed = m.require?.sigma;
  if (allowed !== undefined) {
    marks.push({ x: mean * (1 - 3 * allowed), label: '-3σ max', kind: 'limit' },
      { x: mean * (1 + 3 * allowed), label: '+3σ max', kind: 'limit' });
  }
  if (m.require?.ratio !== undefined && m.iin !== undefined) marks.push({ x: (m.require.ratio * m.iin) / scale.factor, label: 'target', kind: 'limit' });
  return { x, counts: [...h.counts], width, scale, marks };
}

export interface GmIdPlotData {
  /** VGS (V) at the table's vgs points, ascending. */
  x: number[];
  /** gm/ID (1/V) and ID/W (A/m, log axis) of the table at the device's L, VDS and VSB. */
  gmId: number[];
  idW: number[];
  /** The device's operating point on both curves. */
  op: { x: number; gmId: number; idW: number };
  table: string; l: number; vds: number; vsb: number;
}

/** A table device's gm/ID view (DeviceReport.tableCurve, computed by the core), or undefined
 *  for an analytic device or a report without curves. */
export function gmIdPlotData(d: DeviceReport | undefined): GmIdPlotData | undefined {
  if (!d || isBipolarReport(d) || !d.tableCurve || d.tableCurve.vgs.length < 2) return undefined;
  const c = d.tableCurve;
  return {
    x: c.vgs, gmId: c.gmId, idW: c.idW,
    op: { x: d.vgs, gmId: d.gmId, idW: d.m * d.w > 0 ? d.id / (d.m * d.w) : NaN },
    table: c.table, l: c.l, vds: c.vds, vsb: c.vsb,
  };
}

export interface NoisePlotData {
  /** Hz, ascending. */
  x: number[];
  /** Total density and each element's part, in `scale` units (A/√Hz scaled). */
  total: number[];
  parts: { name: string; y: (number | null)[] }[];
  scale: Scaled;
  /** Hz, the flicker corner, when there is flicker noise. */
  corner?: number;
  /** Hz, where the reported density is read. */
  f: number;
}

/** The noise spectrum (design §12) when the report carries it; parts that are zero are left
 *  off the log axis. */
export function noisePlotData(m: MirrorReport): NoisePlotData | undefined {
  const sp = m.noise?.spectrum;
  if (!sp || sp.f.length < 2 || !sp.total.every((v) => v > 0 && Number.isFinite(v))) return undefined;
  const scale = axisScale(sp.total, 'A/√Hz');
  const floor = Math.min(...sp.total) * NOISE_PART_FLOOR;
  const parts = visibleNoiseParts(sp).map(([name, ys]) => ({ name, y: ys.map((v) => (v >= floor ? v / scale.factor : null)) }));
  const d: NoisePlotData = { x: sp.f, total: sp.total.map((v) => v / scale.factor), parts, scale, f: m.noise!.f };
  if (m.noise!.corner !== undefined) d.corner = m.noise!.corner;
  return d;
}

export interface DriftPlotData {
  /** °C, ascending. */
  x: number[];
  iout: (number | null)[];
  scale: Scaled;
}

/** Iout versus temperature over process.trange, when the report carries it. */
export function driftPlotData(m: MirrorReport): DriftPlotData | undefined {
  const pts = m.drift ?? [];
  if (pts.length < 2) return undefined;
  const scale = axisScale([...pts.map((p) => p.iout), m.iout], 'A');
  return {
    x: pts.map((p) => p.t - ZERO_CELSIUS),
    iout: pts.map((p) => (p.converged && Number.isFinite(p.iout) ? p.iout / scale.factor : null)),
    scale,
  };
}
