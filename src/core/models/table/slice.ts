/**
 * One table at one device length and temperature: the 3-D grid (vsb × vds × vgs) of ln(id/W)
 * with its monotone vgs slopes, and the evaluation of id, gm, gds and ∂id/∂vsb from it.
 *
 * Between grid lengths and temperatures ln(id) is interpolated linearly (exact at the grid's
 * own lengths and temperatures; neither is a Newton unknown, so no slope is needed there).
 * Within the slice: ln(id) by monotone cubic Hermite along vgs (weak inversion stays within
 * the grid's own accuracy: linear interpolation of id is several percent off there) and along
 * vsb (the body effect is exponential in weak inversion too), then id itself by cubic Hermite
 * along vds (id is 0 on a vds = 0 row, so its logarithm is not). Every step is C¹.
 */
import type { DeviceTable } from '../../types';
import { axisOf, intervalOf, monotoneSlopes, newWeights, weightsAt, type Axis, type Weights } from './hermite';

export interface TableSlice {
  table: DeviceTable;
  /** m, the length the slice was taken at. */
  l: number;
  vgs: Float64Array; vds: Axis; vsb: Axis;
  /** ln(id/W) at [k vsb][j vds][i vgs]; rows with vds = 0 hold 0 and are skipped (id = 0).
   *  A grid line (k, j) is filled on first use (`lineOf`): a device reads a few of them. */
  ln: Float64Array;
  /** ∂ln(id)/∂vgs at the nodes (monotone slopes), same layout. */
  slope: Float64Array;
  /** vds node j carries no current (vds = 0). */
  zero: Uint8Array;
  /** Line k·nD + j of ln and slope has been filled. */
  filled: Uint8Array;
  /** The grid planes (offset into table.id, weight) the slice interpolates between. */
  planes: [number, number][];
}

/** Fractional place of v on an ascending axis: lower index and weight of the upper, clamped. */
function bracket(axis: readonly number[], v: number): [number, number] {
  if (axis.length === 1 || v <= axis[0]!) return [0, 0];
  if (v >= axis[axis.length - 1]!) return [axis.length - 2, 1];
  let k = 0;
  while (axis[k + 1]! < v) k++;
  return [k, (v - axis[k]!) / (axis[k + 1]! - axis[k]!)];
}

const cache = new WeakMap<DeviceTable, Map<string, TableSlice>>();
const CACHE_SLICES = 64;

/** K, the temperature a slice at `temperature` is interpolated at: clamped to the table's own
 *  temperatures (the slice beyond them is the end one's), and one for every temperature when
 *  the table has a single one or none (the slice does not depend on it then). */
function sliceTemperature(table: DeviceTable, temperature: number): number {
  const temps = table.temperature;
  if (!temps || temps.length < 2) return NaN;
  return Math.min(Math.max(temperature, temps[0]!), temps[temps.length - 1]!);
}

/** The slice at length l (m) and temperature (K), clamped to the grid; cached per table and
 *  per length and the temperature it depends on (a drift analysis asks for thirteen
 *  temperatures of each length: a table without a temperature column makes one slice of them),
 *  the oldest slice dropped first beyond CACHE_SLICES. */
export function sliceAt(table: DeviceTable, l: number, temperature: number): TableSlice {
  let byKey = cache.get(table);
  if (!byKey) cache.set(table, byKey = new Map());
  const t = sliceTemperature(table, temperature);
  const key = `${l}|${t}`;
  const hit = byKey.get(key);
  if (hit) return hit;
  if (byKey.size >= CACHE_SLICES) byKey.delete(byKey.keys().next().value!);
  const s = makeSlice(table, l, Number.isNaN(t) ? temperature : t);
  byKey.set(key, s);
  return s;
}

function makeSlice(table: DeviceTable, l: number, temperature: number): TableSlice {
  const nG = table.vgs.length, nD = table.vds.length, nS = table.vsb.length, nL = table.l.length;
  const per = nG * nD * nS;
  const [il, al] = bracket(table.l, l);
  const temps = table.temperature ?? [temperature];
  const [it, at] = bracket(temps, temperature);
  const planes: [number, number][] = [];
  const add = (t: number, lk: number, w: number): void => { if (w > 0) planes.push([(t * nL + lk) * per, w]); };
  for (const [t, wt] of [[it, 1 - at], [it + 1, at]] as const) {
    if (wt <= 0) continue;
    add(t, il, wt * (1 - al));
    add(t, il + 1, wt * al);
  }
  const zero = new Uint8Array(nD);
  table.vds.forEach((v, j) => { zero[j] = v > 0 ? 0 : 1; });
  return {
    table, l, vgs: Float64Array.from(table.vgs), vds: axisOf(table.vds), vsb: axisOf(table.vsb),
    ln: new Float64Array(per), slope: new Float64Array(per), zero, filled: new Uint8Array(nS * nD), planes,
  };
}

/** Offset of grid line `line` (k·nD + j) in ln and slope, filled first if it is not yet: ln(id)
 *  interpolated between the planes, then its monotone vgs slopes (each line on its own). */
function lineOf(s: TableSlice, line: number): number {
  const nG = s.vgs.length, at = line * nG;
  if (s.filled[line]) return at;
  s.filled[line] = 1;
  if (s.zero[line % s.zero.length]) return at;
  const { ln } = s, id = s.table.id;
  for (const [base, w] of s.planes) {
    for (let p = at, end = p + nG; p < end; p++) ln[p]! += w * Math.log(id[base + p]!);
  }
  monotoneSlopes(s.vgs, ln, at, 1, s.slope);
  return at;
}

/** Result of one slice evaluation, per metre of width: A/m and its partial derivatives. */
export interface SlicePoint { id: number; gm: number; gds: number; dvsb: number }

const wD: Weights = newWeights();
const wS: Weights = newWeights();
/** The axes and voltages wD and wS were last filled for: a gate-drive search and the Newton
 *  loop's repeated calls at one VDS and VSB skip recomputing them. */
let lastD: Axis | undefined, lastVds = NaN, lastS: Axis | undefined, lastVsb = NaN;

/**
 * id/W and its derivatives at (vgs, vds, vsb). Beyond the grid along vgs the curve continues
 * along its end tangent: in ln(id) below the lowest vgs (subthreshold decay), in id above the
 * highest (constant gm), so Newton always has a slope. Does not allocate.
 */
export function evalSlice(s: TableSlice, vgs: number, vds: number, vsb: number, out: SlicePoint): void {
  const x = s.vgs;
  const nG = x.length, nD = s.vds.x.length;
  // vgs basis, shared by every grid line
  let mode = 0, i = 0, h00 = 0, h10 = 0, h01 = 0, h11 = 0, d00 = 0, d10 = 0, d01 = 0, d11 = 0, dv = 0;
  if (vgs < x[0]!) { mode = -1; dv = vgs - x[0]!; }
  else if (vgs > x[nG - 1]!) { mode = 1; dv = vgs - x[nG - 1]!; }
  else {
    i = intervalOf(x, vgs);
    const h = x[i + 1]! - x[i]!;
    const t = (vgs - x[i]!) / h, t2 = t * t, t3 = t2 * t;
    h00 = 2 * t3 - 3 * t2 + 1; h10 = (t3 - 2 * t2 + t) * h; h01 = -2 * t3 + 3 * t2; h11 = (t3 - t2) * h;
    d00 = (6 * t2 - 6 * t) / h; d10 = 3 * t2 - 4 * t + 1; d01 = (-6 * t2 + 6 * t) / h; d11 = 3 * t2 - 2 * t;
  }
  if (s.vds !== lastD || vds !== lastVds) { weightsAt(s.vds, vds, wD); lastD = s.vds; lastVds = vds; }
  if (s.vsb !== lastS || vsb !== lastVsb) { weightsAt(s.vsb, vsb, wS); lastS = s.vsb; lastVsb = vsb; }
  let id = 0, gm = 0, gds = 0, dsb = 0;
  for (let a = 0; a < wD.count; a++) {
    const j = wD.first + a;
    const wj = wD.w[a]!, dwj = wD.dw[a]!;
    if (j < 0 || j >= nD || s.zero[j] || (wj === 0 && dwj === 0)) continue;
    // ln(id) at this vds node: Hermite along vsb of the vgs-interpolated grid lines
    let L = 0, Lg = 0, Ls = 0;
    for (let b = 0; b < wS.count; b++) {
      const k = wS.first + b;
      if (k < 0 || k >= s.vsb.x.length) continue;
      const base = lineOf(s, k * nD + j);
      let v: number, g: number;
      if (mode === -1) {
        v = s.ln[base]! + s.slope[base]! * dv; g = s.slope[base]!;
      } else if (mode === 1) {
        const e = base + nG - 1, q = Math.max(1 + s.slope[e]! * dv, 1e-9);
        v = s.ln[e]! + Math.log(q); g = s.slope[e]! / q;
      } else {
        const p = base + i;
        v = h00 * s.ln[p]! + h10 * s.slope[p]! + h01 * s.ln[p + 1]! + h11 * s.slope[p + 1]!;
        g = d00 * s.ln[p]! + d10 * s.slope[p]! + d01 * s.ln[p + 1]! + d11 * s.slope[p + 1]!;
      }
      L += wS.w[b]! * v; Lg += wS.w[b]! * g; Ls += wS.dw[b]! * v;
    }
    const e = Math.exp(L);
    id += wj * e; gm += wj * e * Lg; dsb += wj * e * Ls; gds += dwj * e;
  }
  out.id = id; out.gm = gm; out.gds = gds; out.dvsb = dsb;
}

/** VGS where ln(id/W) on the grid at the largest vds crosses `lnId`, linear between the vgs
 *  nodes and between the two nearest vsb lines: a starting point for a gate-drive search,
 *  within a fraction of a grid step of the interpolant's own crossing. */
export function vgsNear(s: TableSlice, lnId: number, vsb: number): number {
  const x = s.vgs, nG = x.length, nD = s.vds.x.length, sb = s.vsb.x, nS = sb.length;
  const k = nS > 1 ? intervalOf(sb, vsb) : 0;
  const a = nS > 1 ? Math.min(Math.max((vsb - sb[k]!) / (sb[k + 1]! - sb[k]!), 0), 1) : 0;
  const b0 = lineOf(s, k * nD + nD - 1), b1 = nS > 1 ? lineOf(s, (k + 1) * nD + nD - 1) : b0;
  const at = (i: number): number => (1 - a) * s.ln[b0 + i]! + a * s.ln[b1 + i]!;
  if (lnId <= at(0)) return x[0]!;
  if (lnId >= at(nG - 1)) return x[nG - 1]!;
  let lo = 0, hi = nG - 1;
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1;
    if (at(mid) <= lnId) lo = mid; else hi = mid;
  }
  const l0 = at(lo), l1 = at(hi);
  return l1 > l0 ? x[lo]! + ((lnId - l0) / (l1 - l0)) * (x[hi]! - x[lo]!) : x[lo]!;
}
