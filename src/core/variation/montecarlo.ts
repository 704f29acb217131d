/**
 * Monte Carlo mismatch: N samples of independent per-device deviations, each solved with the
 * full nonlinear circuit (Newton warm-started from the nominal solution).
 *
 * Per device (design §4, Pelgrom per device = pair coefficient/√2):
 *   ΔVT ~ N(0, avt/√(2·m·W·L)),  Δβ/β ~ N(0, abeta/√(2·m·W·L)),  independent.
 * Only the devices that can move the measured output (the shared reference and the measured
 * output's own devices) are perturbed: another output of a bank is held at its own voltage and
 * its gates draw no current, so it cannot change this output's current. An output of a bias
 * network is measured in its whole group's circuit with every device of the group drawn once per
 * sample (design §9.1): a leaf's spread includes every stage above it, an intermediate output's
 * too, and the compliance of a linked output (its node solved, not held) is not tested. The
 * outputs of a network are sampled together (runNetworkMonteCarlo): one solve of the group per
 * sample serves every output, each reading the same solution it would have been solved to alone.
 *
 * Yield: the fraction of samples that meet every requirement checkable per sample, cheaply and
 * without a linearization:
 *   - the solve converges;
 *   - every counted device is saturated (VDS ≥ VDSsat) at the nominal output voltage;
 *   - the ratio iout/iin is within limits.tolerance (systematic + random) of require.ratio
 *     (else of the geometric ratio); limits.error is the systematic budget alone;
 *   - with require.compliance: every device is still saturated with the output held there
 *     (one more warm-started solve per sample).
 * Not per sample: rout (mismatch moves it far less than its own tolerance; it is a systematic
 * check), and require.sigma, which is a property of the population that `sigma` itself answers.
 */
import type { MirrorContext } from '../analysis/index';
import { designRatio } from '../circuit/templates';
import { vbiasFor } from '../analysis/vbias';
import { deviceMargin, deviceSigmas, mismatchBase, setMismatch } from '../circuit/elements/device';
import type { MirrorCircuit } from '../circuit/mirrorCircuit';
import { newChannelEval } from '../models/core';
import { buildMirror, nominalVout, outputCurrent, solveMirror, worstMargin } from '../analysis/solve';
import type { MonteCarloResult, Requirements, ResolvedSpec } from '../types';
import { mirrorAt } from '../mirror-at';
import { Xoshiro128 } from './prng';
import { networkSampling, type SampledOutput } from '../network/sampling';

export interface MonteCarloOptions {
  /** Histogram bins (default: √N clamped to 10…60). */
  bins?: number;
  /** Called with the samples done so far, every PROGRESS_EVERY output-samples and at the end. */
  onSamples?: (done: number) => void;
}

/** Output-samples between progress calls: rare enough to cost nothing next to 1 024 Newton
 *  solves. A network's sample covers every output sampled with it, so its calls come that many
 *  times sooner (the editor's worker passes on at most a few a second). */
const PROGRESS_EVERY = 1024;

/** A perturbed device: its nominal mismatch parameters and their 1σ. */
interface Perturbed { k: number; base: [number, number]; sVt: number; sBeta: number }

/** One measured output: what it reads at each sample's solution, and its running figures. */
interface Reading {
  iout: () => number;
  iin: () => number;
  /** V, the worst saturation margin of the devices counted for this output, at ws.v. */
  margin: () => number;
  target: number | undefined;
  /** With require.compliance: the held node, the voltage to hold it at, and the nominal
   *  solution there (the warm start of every sample's compliance solve). */
  comp?: { node: number; v: number; x: Float64Array | undefined };
  values: Float64Array;
  count: number;
  pass: number;
  failed: number;
  failures: { convergence: number; saturation: number; ratio: number; compliance: number };
  mean: number;
  m2: number;
  min: number;
  max: number;
}

function failed(n: number, seed: number): MonteCarloResult {
  return {
    samples: n, seed, mean: 0, sigma: 0, min: 0, max: 0, yield: 0, failed: n,
    failures: { convergence: n, saturation: 0, ratio: 0, compliance: 0 },
  };
}

const sampleCount = (samples: number): number => Math.max(0, Math.floor(samples));

/** N samples of one output, reproducible per seed; see the file comment for the statistics and
 *  the yield. An output of a bias network is sampled in its group's circuit. */
export function runMonteCarlo(ctx: MirrorContext, samples: number, seed: number, opts: MonteCarloOptions = {}): MonteCarloResult {
  const i = ctx.mirror.path[1] as number;
  const inNetwork = runNetworkMonteCarlo(ctx.spec, [[i, ctx.outputIndex]], samples, seed, opts);
  if (inNetwork) return inNetwork[0]!;
  const n = sampleCount(samples);
  let mc: MirrorCircuit;
  try {
    mc = buildMirror(ctx, nominalVout(ctx), vbiasFor(ctx)?.vbias);
  } catch {
    return failed(n, seed);
  }
  const nominal = solveMirror(mc);
  if (!nominal.converged || n === 0) return failed(n, seed);
  const c = mc.circuit;
  const xNom = Float64Array.from(mc.ws.v);
  const req = requirementsOf(ctx.mirror, ctx.outputIndex);
  // The designed ratio at the nominal input (a Widlar's depends on it), before the compliance solve.
  const target = req.ratio ?? ratioIdealOf(ctx, mc, mc.iin());
  const solo = mc;
  const reading = newReading(n, () => outputCurrent(solo), () => solo.iin(), () => worstMargin(solo),
    target, compliance(mc, c.outNode, req.compliance, xNom));
  const perturbed: Perturbed[] = [];
  c.devices.forEach((d, k) => { if (d.measured) addPerturbed(perturbed, d, k); });
  sample(mc, perturbed, [reading], n, seed, ctx.spec.limits.tolerance, xNom, opts.onSamples);
  return resultOf(reading, n, seed, opts.bins);
}

/**
 * N samples of outputs of one bias network (`outputs`: mirror and output index, all of one
 * group), from one solve per sample of the whole group's circuit: every
 * device of the group is drawn once per sample, and each output reads the same solution, so
 * each result equals that output's own run (runMonteCarlo) sample for sample. Undefined when the
 * mirror is in no network or an output is not in its group. `onSamples` counts samples of the
 * group (each covers every output).
 */
export function runNetworkMonteCarlo(
  spec: ResolvedSpec, outputs: readonly (readonly [mirror: number, output: number])[], samples: number, seed: number,
  opts: MonteCarloOptions = {},
): MonteCarloResult[] | undefined {
  const mirrorIndex = outputs[0]?.[0];
  if (mirrorIndex === undefined) return undefined;
  const n = sampleCount(samples);
  let net: ReturnType<typeof networkSampling>;
  try {
    net = networkSampling(spec, mirrorIndex);
  } catch {
    return spec.networks?.some((g) => g.members.includes(mirrorIndex)) ? outputs.map(() => failed(n, seed)) : undefined;
  }
  if (!net) return undefined;
  const byKey = new Map(net.outputs.map((o) => [`${o.mirrorIndex}:${o.outputIndex}`, o] as const));
  const chosen: SampledOutput[] = [];
  for (const [m, o] of outputs) {
    const s = byKey.get(`${m}:${o}`);
    if (!s) return undefined;
    chosen.push(s);
  }
  const mc = net.mc;
  const nominal = solveMirror(mc);
  if (!nominal.converged || n === 0) return outputs.map(() => failed(n, seed));
  const c = mc.circuit;
  const xNom = Float64Array.from(mc.ws.v);
  const ch = newChannelEval();
  // Each output's requirements and designed ratio at the nominal solution (a Widlar's depends on
  // its input current), all read before any compliance solve moves ws.
  const nominalOf = chosen.map((s) => {
    const m = mirrorAt(spec, s.mirrorIndex);
    const req = m ? requirementsOf(m, s.outputIndex) : {};
    const target = req.ratio ?? (m && m.kind !== 'netlist' ? designRatio(m, s.outputIndex, s.iin(), spec.process.temperature) : undefined);
    return { req, target };
  });
  const readings = chosen.map((s, k) => {
    const { req, target } = nominalOf[k]!;
    const counted = s.counted;
    const margin = (): number => {
      let worst = Infinity;
      for (const k of counted) {
        const x = deviceMargin(c.devices[k]!, mc.ws.v, ch);
        if (x < worst) worst = x;
      }
      return worst;
    };
    // A linked output's node is the fed mirror's input, solved: it cannot be held elsewhere.
    const comp = s.node === undefined ? undefined : compliance(mc, s.node, req.compliance, xNom);
    return newReading(n, s.iout, s.iin, margin, target, comp);
  });
  const perturbed: Perturbed[] = [];
  c.devices.forEach((d, k) => addPerturbed(perturbed, d, k));
  sample(mc, perturbed, readings, n, seed, spec.limits.tolerance, xNom, opts.onSamples);
  return readings.map((r) => resultOf(r, n, seed, opts.bins));
}

function addPerturbed(list: Perturbed[], d: MirrorCircuit['circuit']['devices'][number], k: number): void {
  const s = deviceSigmas(d);
  if (!s || (s[0] === 0 && s[1] === 0)) return;
  list.push({ k, base: mismatchBase(d), sVt: s[0], sBeta: s[1] });
}

function newReading(n: number, iout: () => number, iin: () => number, margin: () => number, target: number | undefined, comp: Reading['comp']): Reading {
  const r: Reading = {
    iout, iin, margin, target, values: new Float64Array(n), count: 0, pass: 0, failed: 0,
    failures: { convergence: 0, saturation: 0, ratio: 0, compliance: 0 }, mean: 0, m2: 0, min: Infinity, max: -Infinity,
  };
  if (comp) r.comp = comp;
  return r;
}

/** With require.compliance at `v`: the nominal solution with `node` held there (undefined when
 *  it does not converge; the samples then start from the nominal point). */
function compliance(mc: MirrorCircuit, node: number, v: number | undefined, xNom: Float64Array): Reading['comp'] {
  if (v === undefined) return undefined;
  const fixed = mc.circuit.fixedV;
  const held = fixed[node]!;
  fixed[node] = v;
  const r = solveMirror(mc, xNom);
  const x = r.converged ? Float64Array.from(mc.ws.v) : undefined;
  fixed[node] = held;
  return { node, v, x };
}

/** The sample loop: draw every perturbed device, solve once from the nominal point, read every
 *  output at that solution; then each output that asks for it, its compliance solve (each moves
 *  ws, so every output has read the sample first). */
function sample(mc: MirrorCircuit, perturbed: Perturbed[], readings: Reading[], n: number, seed: number,
  errLimit: number, xNom: Float64Array, onSamples: ((done: number) => void) | undefined): void {
  const c = mc.circuit;
  const devices = c.devices;
  const rng = Xoshiro128.fromSeed(seed);
  const pending = new Int32Array(readings.length);
  const every = Math.max(1, Math.floor(PROGRESS_EVERY / readings.length));
  for (let i = 0; i < n; i++) {
    if (onSamples && i > 0 && i % every === 0) onSamples(i);
    // Draw every deviation first, in device order, so a sample's numbers depend only on the seed.
    for (const p of perturbed) {
      const dvt = p.sVt * rng.nextGaussian();
      setMismatch(devices[p.k]!, p.base, dvt, p.sBeta * rng.nextGaussian());
    }
    const r = solveMirror(mc, xNom);
    if (!r.converged) {
      for (const s of readings) { s.failed++; s.failures.convergence++; }
      continue;
    }
    let waiting = 0;
    for (let q = 0; q < readings.length; q++) {
      const s = readings[q]!;
      const iout = s.iout();
      const iin = s.iin();
      s.values[s.count++] = iout;
      // Welford's update: stable for 1e5 samples of nearly equal currents.
      const d = iout - s.mean;
      s.mean += d / s.count;
      s.m2 += d * (iout - s.mean);
      if (iout < s.min) s.min = iout;
      if (iout > s.max) s.max = iout;

      if (!(s.margin() >= 0)) { s.failures.saturation++; continue; }
      const target = s.target;
      if (target !== undefined && target > 0 && !(Math.abs(iout / iin / target - 1) <= errLimit)) { s.failures.ratio++; continue; }
      if (s.comp) pending[waiting++] = q;
      else s.pass++;
    }
    for (let w = 0; w < waiting; w++) {
      const s = readings[pending[w]!]!;
      const comp = s.comp!;
      const held = c.fixedV[comp.node]!;
      c.fixedV[comp.node] = comp.v;
      const rc = solveMirror(mc, comp.x ?? xNom);
      const ok = rc.converged && s.margin() >= 0;
      c.fixedV[comp.node] = held;
      if (ok) s.pass++; else s.failures.compliance++;
    }
  }
  for (const p of perturbed) setMismatch(devices[p.k]!, p.base, 0, 0);
  onSamples?.(n);
}

function resultOf(s: Reading, n: number, seed: number, bins: number | undefined): MonteCarloResult {
  const count = s.count;
  if (count === 0) return failed(n, seed);
  const { mean, min, max } = s;
  const std = count > 1 ? Math.sqrt(s.m2 / (count - 1)) : 0;
  const result: MonteCarloResult = {
    samples: n, seed, mean, sigma: mean !== 0 ? std / Math.abs(mean) : 0, min, max,
    yield: s.pass / n,
    histogram: histogram(s.values.subarray(0, count), min, max, bins ?? Math.min(60, Math.max(10, Math.round(Math.sqrt(count))))),
  };
  if (s.failed > 0) result.failed = s.failed;
  if (s.pass < n) result.failures = s.failures;
  return result;
}

function requirementsOf(m: MirrorContext['mirror'], outputIndex: number): Requirements {
  if (m.kind === 'netlist') return m.require;
  return (m.outputs[outputIndex] ?? m.outputs[0])?.require ?? {};
}

/** The ratio a sample is judged against without require.ratio: the one the mirror is designed
 *  to give at its nominal input (a Widlar's law; the geometry's otherwise). */
function ratioIdealOf(ctx: MirrorContext, mc: ReturnType<typeof buildMirror>, iin: number): number | undefined {
  if (ctx.mirror.kind !== 'netlist') return designRatio(ctx.mirror, ctx.outputIndex, iin, ctx.spec.process.temperature);
  if (!mc.pair) return undefined;
  const a = mc.circuit.devices[mc.pair.ref]!.size, b = mc.circuit.devices[mc.pair.out]!.size;
  const r = (b.m * b.w / b.l) / (a.m * a.w / a.l);
  return Number.isFinite(r) ? r : undefined;
}

/** Equal-width bins over [min, max]; the last bin includes max. A population of one value gets
 *  a hair-wide range around it so the edges stay in amperes and increasing. */
export function histogram(values: ArrayLike<number>, min: number, max: number, bins: number): { edges: number[]; counts: number[] } {
  const nb = Math.max(1, Math.floor(bins));
  let lo = min, hi = max;
  if (!(hi > lo)) {
    const h = Math.abs(min) * 1e-9 || 1e-18;
    lo = min - h; hi = min + h;
  }
  const width = (hi - lo) / nb;
  const edges = Array.from({ length: nb + 1 }, (_, k) => (k === nb ? hi : lo + k * width));
  const counts = new Array<number>(nb).fill(0);
  for (let i = 0; i < values.length; i++) {
    const k = Math.min(nb - 1, Math.max(0, Math.floor((values[i]! - lo) / width)));
    counts[k]!++;
  }
  return { edges, counts };
}
