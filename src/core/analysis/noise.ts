/**
 * Output current noise (design §12): every element's noise sources (circuit/elements/noise.ts)
 * carried to the output (probe.ts) through the circuit linearized at its operating point. Without
 * a capacitor the transfer is the DC adjoint (the same λ as Rout and sigma) and the band integral
 * is exact; with a gate filter the transfer is an AC solve (G + jωC, as a real system of twice
 * the size) at each frequency and the band is integrated by trapezoids in ln f.
 */
import { DEFAULTS, DRIFT } from '../defaults';
import type { Circuit } from '../circuit/circuit';
import type { CapacitorElement } from '../circuit/elements/element';
import { elementNoise, NoiseSources } from '../circuit/elements/noise';
import { luFactor, luSolve } from '../circuit/lu';
import type { Workspace } from '../circuit/workspace';
import type { AnalysisSpec, NoiseReport } from '../types';
import { owns, type OutputProbe, type Probed } from './probe';

/** The noise analysis when the spec has no `analysis:`. */
export const DEFAULT_ANALYSIS: AnalysisSpec = { noise: { f: DEFAULTS.noise.f, band: DEFAULTS.noise.band } };

/** |d iout / d i_k|² of each source at one frequency. */
type Transfer = (f: number) => Float64Array;

/** |gain|² of each source: a current leaving node k moves the output by −λ(k) through the node
 *  voltages, and by 1 more when it flows through the probed elements out of the probed node. */
function gainOf(p: OutputProbe, n: number, re: Float64Array, im: Float64Array | undefined, sources: NoiseSources, out: Float64Array): void {
  const wRe = (k: number): number => (k < n ? -re[k]! : 0);
  const wIm = (k: number): number => (im && k < n ? -im[k]! : 0);
  const { element, from, to } = sources;
  for (let i = 0; i < sources.length; i++) {
    const f = from[i]!, t = to[i]!;
    const direct = owns(p, element[i]!) ? (f === p.node ? 1 : 0) - (t === p.node ? 1 : 0) : 0;
    const a = direct + wRe(f) - wRe(t), b = wIm(f) - wIm(t);
    out[i] = a * a + b * b;
  }
}

/** The DC transfer's buffer, kept from one output to the next (its first sources.length entries
 *  are an output's; a network reads 2 000 outputs). */
let dcGains = new Float64Array(256);

/** The DC transfer from the output adjoint λ (capacitors open), in dcGains (valid until the
 *  next call). */
function dcTransfer(ws: Workspace, pr: Probed, sources: NoiseSources): Float64Array {
  if (dcGains.length < sources.length) dcGains = new Float64Array(2 * sources.length);
  gainOf(pr.probe, ws.n, pr.lam, undefined, sources, dcGains);
  return dcGains;
}

/** Each element's part of the density at f, in order of first appearance (what a Map by name
 *  summed source by source gives, without one): names and values, kept from one call to the
 *  next. */
const partNames: string[] = [];
let partValues = new Float64Array(64);

/** An empty plain object that keeps its properties in a hash table from the start (deleting a
 *  property other than the last makes V8 leave its hidden classes): the shares of each output
 *  of a network are named by a path of their own, and as hidden-class properties every new
 *  set of names made classes that outlived the analysis (most of the noise figure's cost). The
 *  same object to every reader: the same keys in the same order. */
function dictionary(): Record<string, number> {
  const o: Record<string, number> = { a: 0, b: 0 };
  delete o.a; delete o.b;
  return o;
}

/** A², Σ_k |H_k(f)|²·(white_k + flicker_k/f), in the order psd adds it, each element's part into
 *  partNames/partValues (returns their count in `count`). `distinct`: no element name comes back
 *  after another element's sources (each element's are consecutive and names are unique), so a
 *  name is looked for only among the parts just before it. */
function psdParts(sources: NoiseSources, h: Float64Array, f: number, distinct: boolean, count: { n: number }): number {
  let total = 0, n = 0, last = -1;
  let lastName: string | undefined;
  const { element, white, flicker } = sources;
  for (let i = 0; i < sources.length; i++) {
    const p = h[i]! * (white[i]! + flicker[i]! / f);
    total += p;
    const name = element[i]!;
    if (name !== lastName) {
      last = -1;
      if (!distinct) for (let k = 0; k < n; k++) if (partNames[k] === name) { last = k; break; }
      if (last < 0) {
        last = n++;
        partNames[last] = name;
        if (partValues.length < n) { const b = new Float64Array(2 * n); b.set(partValues); partValues = b; }
        partValues[last] = 0;
      }
      lastName = name;
    }
    partValues[last] = partValues[last]! + p;
  }
  count.n = n;
  return total;
}

/** The AC transfer: Yᵀ·λ = y_out with Y = G + jωC over the free nodes, solved as the real
 *  system [[A, −B], [B, A]] of twice the size. */
function acTransfer(ws: Workspace, pr: Probed, caps: CapacitorElement[], sources: NoiseSources): Transfer {
  const n = ws.n, m = 2 * n;
  const { colPtr, rowIdx, freeEnd } = ws.pattern;
  const a = new Float64Array(m * m), perm = new Int32Array(m), tmp = new Float64Array(m), rhs = new Float64Array(m);
  const h = new Float64Array(sources.length);
  return (f) => {
    const w = 2 * Math.PI * f;
    a.fill(0); rhs.fill(0);
    // Aᵀ: entry (i, j) of Y goes to (j, i).
    for (let j = 0; j < n; j++) {
      for (let p = colPtr[j]!; p < freeEnd[j]!; p++) {
        const i = rowIdx[p]!, g = ws.G[p]!;
        a[j * m + i] += g; a[(j + n) * m + i + n] += g;
      }
      rhs[j] = pr.row[j]!;
    }
    const p = pr.probe;
    for (const cap of caps) {
      const b = w * cap.c, own = owns(p, cap.name);
      // Y(i, j) += j·b: transposed into row j, column i of the imaginary blocks; a capacitor of
      // the probed current on the probed node adds to the right-hand side.
      const put = (i: number, j: number, x: number): void => {
        if (i < n && j < n) { a[(j + n) * m + i] += x; a[j * m + i + n] -= x; }
        else if (i === p.node && j < n && own) rhs[j + n] += x;
      };
      put(cap.a, cap.a, b); put(cap.b, cap.b, b); put(cap.a, cap.b, -b); put(cap.b, cap.a, -b);
    }
    if (!luFactor(a, m, perm)) return h.fill(NaN);
    luSolve(a, m, perm, rhs, tmp);
    gainOf(p, n, rhs.subarray(0, n), rhs.subarray(n, m), sources, h);
    return h;
  };
}

/** A², Σ_k |H_k(f)|²·(white_k + flicker_k/f), and each element's part into `parts` when given. */
function psd(sources: NoiseSources, h: Float64Array, f: number, parts?: Map<string, number>): number {
  let total = 0;
  const { element, white, flicker } = sources;
  for (let i = 0; i < sources.length; i++) {
    const p = h[i]! * (white[i]! + flicker[i]! / f);
    total += p;
    if (parts) parts.set(element[i]!, (parts.get(element[i]!) ?? 0) + p);
  }
  return total;
}

function logGrid(f1: number, f2: number, perDecade: number): number[] {
  const steps = Math.max(2, Math.ceil(Math.log10(f2 / f1) * perDecade));
  return Array.from({ length: steps + 1 }, (_, k) => f1 * Math.pow(f2 / f1, k / steps));
}

/** The circuit's noise sources at ws.v and its capacitors: what every output of one solution
 *  shares (network/drift.ts computes them once for a group's outputs). */
export interface NoiseParts {
  sources: NoiseSources; caps: CapacitorElement[];
  /** Each element's sources are consecutive and no two elements share a name (a network's
   *  sources by element, drift.ts): a part is then found without a search. */
  distinct?: boolean;
}

export function noiseParts(c: Circuit, ws: Workspace, temperature: number): NoiseParts {
  const sources = new NoiseSources();
  for (const e of c.elements) elementNoise(e, ws.v, ws.ch, temperature, sources);
  return { sources, caps: c.elements.filter((e): e is CapacitorElement => e.kind === 'capacitor') };
}

/**
 * The output noise of a converged circuit (ws assembled at the solution; `pr` its output and
 * that output's adjoint), at temperature T (K). Undefined when the AC system is singular.
 * `given`: the sources and capacitors when the caller has them (noiseParts; sources whose
 * transfer to this output is exactly zero may be left out: they add nothing anywhere).
 * `rename`: the name each element's part is reported under (a network member's own devices by
 * their own names), where the caller names them otherwise than the circuit does.
 */
export function outputNoise(
  c: Circuit, ws: Workspace, pr: Probed, temperature: number, analysis: AnalysisSpec, spectrum: boolean, given?: NoiseParts,
  rename?: (element: string) => string,
): NoiseReport | undefined {
  const { sources, caps } = given ?? noiseParts(c, ws, temperature);
  const { f, band } = analysis.noise;
  const h0 = dcTransfer(ws, pr, sources);
  const transfer: Transfer = caps.length === 0 ? () => h0 : acTransfer(ws, pr, caps, sources);

  const count = { n: 0 };
  const s = psdParts(sources, transfer(f), f, given?.distinct === true, count);
  if (!Number.isFinite(s)) return undefined;
  const shares = rename ? dictionary() : {};
  // Elements that cannot reach this output (a bank's other outputs) are left out.
  for (let k = 0; k < count.n; k++) {
    const name = partNames[k]!, p = partValues[k]!;
    if (p > 0) shares[rename ? rename(name) : name] = s > 0 ? p / s : 0;
  }
  partNames.length = 0;

  // The DC transfer's white and flicker sums (the integral without capacitors, and the corner).
  let white0 = 0, flicker0 = 0;
  for (let i = 0; i < sources.length; i++) { white0 += h0[i]! * sources.white[i]!; flicker0 += h0[i]! * sources.flicker[i]!; }
  let integrated: number;
  const [f1, f2] = band;
  if (caps.length === 0) {
    integrated = white0 * (f2 - f1) + flicker0 * Math.log(f2 / f1);
  } else {
    const grid = logGrid(f1, f2, DRIFT.integralPerDecade);
    integrated = 0;
    let prev = psd(sources, transfer(grid[0]!), grid[0]!) * grid[0]!;
    for (let k = 1; k < grid.length; k++) {
      const now = psd(sources, transfer(grid[k]!), grid[k]!) * grid[k]!;
      integrated += 0.5 * (prev + now) * Math.log(grid[k]! / grid[k - 1]!);
      prev = now;
    }
  }

  const report: NoiseReport = { f, density: Math.sqrt(s), band: [f1, f2], integrated: Math.sqrt(Math.max(integrated, 0)), shares };
  if (flicker0 > 0 && white0 > 0) report.corner = flicker0 / white0;
  if (spectrum) {
    const fs = logGrid(f1, f2, DRIFT.spectrumPerDecade);
    const total: number[] = [];
    const byName: Record<string, number[]> = {};
    for (const name of Object.keys(shares)) byName[name] = [];
    for (const x of fs) {
      const pm = new Map<string, number>();
      total.push(Math.sqrt(psd(sources, transfer(x), x, pm)));
      for (const [name, p] of pm) byName[rename ? rename(name) : name]?.push(Math.sqrt(p));
    }
    report.spectrum = { f: fs, total, parts: byName };
  }
  return report;
}
