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
 * too, and the compliance of a linked output (its node solved, not held) is not tested.
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
import { deviceSigmas, mismatchBase, setMismatch } from '../circuit/elements/device';
import { buildMirror, nominalVout, outputCurrent, solveMirror, worstMargin } from '../analysis/solve';
import type { MonteCarloResult, Requirements } from '../types';
import { Xoshiro128 } from './prng';
import { jointForOutput } from '../network/index';

export interface MonteCarloOptions {
  /** Histogram bins (default: √N clamped to 10…60). */
  bins?: number;
  /** Called with the samples done so far, every PROGRESS_EVERY samples and at the end. */
  onSamples?: (done: number) => void;
}

/** Samples between progress calls: rare enough to cost nothing next to 1 024 Newton solves. */
const PROGRESS_EVERY = 1024;

/** A perturbed device: its nominal mismatch parameters and their 1σ. */
interface Perturbed { k: number; base: [number, number]; sVt: number; sBeta: number }

/** N samples, reproducible per seed; see the file comment for the statistics and the yield. */
export function runMonteCarlo(ctx: MirrorContext, samples: number, seed: number, opts: MonteCarloOptions = {}): MonteCarloResult {
  const n = Math.max(0, Math.floor(samples));
  const fail: MonteCarloResult = {
    samples: n, seed, mean: 0, sigma: 0, min: 0, max: 0, yield: 0, failed: n,
    failures: { convergence: n, saturation: 0, ratio: 0, compliance: 0 },
  };
  let mc;
  // An output of a bias network: the whole group is one circuit and every device of it draws.
  let joint: ReturnType<typeof jointForOutput>;
  try {
    joint = jointForOutput(ctx.spec, ctx.mirror.path[1] as number, ctx.outputIndex);
    mc = joint?.mc ?? buildMirror(ctx, nominalVout(ctx), vbiasFor(ctx)?.vbias);
  } catch {
    return fail;
  }
  const nominal = solveMirror(mc);
  if (!nominal.converged || n === 0) return fail;
  const c = mc.circuit;
  const xNom = Float64Array.from(mc.ws.v);
  const vNom = c.fixedV[c.outNode]!;

  const req = requirementsOf(ctx);
  const target = req.ratio ?? ratioIdealOf(ctx, mc, mc.iin());
  const errLimit = ctx.spec.limits.tolerance;
  // A linked output's node is the fed mirror's input, solved: it cannot be held elsewhere.
  const vComp = joint?.linked ? undefined : req.compliance;
  const solo = mc;
  const ioutOf = joint?.iout ?? (() => outputCurrent(solo));
  let xComp: Float64Array | undefined;
  if (vComp !== undefined) {
    c.fixedV[c.outNode] = vComp;
    const r = solveMirror(mc, xNom);
    xComp = r.converged ? Float64Array.from(mc.ws.v) : undefined;
    c.fixedV[c.outNode] = vNom;
  }

  const perturbed: Perturbed[] = [];
  c.devices.forEach((d, k) => {
    if (joint ? !joint.draw.has(k) : !d.measured) return;
    const s = deviceSigmas(d);
    if (!s || (s[0] === 0 && s[1] === 0)) return;
    perturbed.push({ k, base: mismatchBase(d), sVt: s[0], sBeta: s[1] });
  });

  const rng = Xoshiro128.fromSeed(seed);
  const values = new Float64Array(n);
  let count = 0, pass = 0, failed = 0;
  const failures = { convergence: 0, saturation: 0, ratio: 0, compliance: 0 };
  let mean = 0, m2 = 0, min = Infinity, max = -Infinity;
  const onSamples = opts.onSamples;
  for (let i = 0; i < n; i++) {
    if (onSamples && i > 0 && i % PROGRESS_EVERY === 0) onSamples(i);
    // Draw every deviation first, in device order, so a sample's numbers depend only on the seed.
    for (const p of perturbed) {
      const dvt = p.sVt * rng.nextGaussian();
      setMismatch(c.devices[p.k]!, p.base, dvt, p.sBeta * rng.nextGaussian());
    }
    const r = solveMirror(mc, xNom);
    if (!r.converged) { failed++; failures.convergence++; continue; }
    const iout = ioutOf();
    const iin = mc.iin();
    values[count++] = iout;
    // Welford's update: stable for 1e5 samples of nearly equal currents.
    const d = iout - mean;
    mean += d / count;
    m2 += d * (iout - mean);
    if (iout < min) min = iout;
    if (iout > max) max = iout;

    if (!(worstMargin(mc) >= 0)) { failures.saturation++; continue; }
    if (target !== undefined && target > 0 && !(Math.abs(iout / iin / target - 1) <= errLimit)) { failures.ratio++; continue; }
    if (vComp !== undefined) {
      c.fixedV[c.outNode] = vComp;
      const rc = solveMirror(mc, xComp ?? xNom);
      const ok = rc.converged && worstMargin(mc) >= 0;
      c.fixedV[c.outNode] = vNom;
      if (!ok) { failures.compliance++; continue; }
    }
    pass++;
  }
  for (const p of perturbed) setMismatch(c.devices[p.k]!, p.base, 0, 0);
  onSamples?.(n);

  if (count === 0) return fail;
  const std = count > 1 ? Math.sqrt(m2 / (count - 1)) : 0;
  const result: MonteCarloResult = {
    samples: n, seed, mean, sigma: mean !== 0 ? std / Math.abs(mean) : 0, min, max,
    yield: pass / n,
    histogram: histogram(values.subarray(0, count), min, max, opts.bins ?? Math.min(60, Math.max(10, Math.round(Math.sqrt(count))))),
  };
  if (failed > 0) result.failed = failed;
  if (pass < n) result.failures = failures;
  return result;
}

function requirementsOf(ctx: MirrorContext): Requirements {
  const m = ctx.mirror;
  if (m.kind === 'netlist') return m.require;
  return (m.outputs[ctx.outputIndex] ?? m.outputs[0])?.require ?? {};
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
