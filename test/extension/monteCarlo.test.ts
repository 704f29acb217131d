/**
 * Monte Carlo off the main thread, with the real worker bundle (dist/worker.js, built by
 * `npm test`): a cancelled run really stops (its thread exits), a job without time limit is not
 * treated as hung, and the command's pure text and argument handling.
 *
 * The spec is the Razavi level-1 device D (docs/references.md; set from memory) as a simple NMOS
 * mirror, W/L = 10, IREF = 100 µA, VOUT = 1.5 V, with Pelgrom coefficients avt = 4 mV·µm and
 * abeta = 1 %·µm. Expected sigma by hand (Pelgrom 1989; design §4: one device carries 1/√2 of
 * the pair coefficient): σVT = 4e-9/√(2·10e-12) = 0.894 mV, σβ/β = 1e-8/√(2e-11) = 0.224 %;
 * with gm/ID = 2/VOV = 2/0.3672 V (square law, docs/references.md §9), each device contributes
 * (gm/ID·σVT)² + (σβ/β)², two devices: σ = √(2·(0.487² + 0.224²)) % = 0.758 %.
 */
import { describe, expect, it } from 'vitest';
import { D_SPEC, trackedAnalyzers, WORKER } from './worker-fixtures';
import { MC_SAMPLES } from '../../src/core/defaults';
import { groupDigits, monteCarloRun, percentDone, progressMessage, sampledOutputs, summaryMessage } from '../../src/extension/monteCarloText';
import type { FileReport, MirrorReport } from '../../src/core/types';
import { isPageMessage, isRunMonteCarloMessage } from '../../src/protocol/messages';

const SPEC = D_SPEC('100u', ', avt: 4 mV·µm, abeta: 1 %·µm');
const makeAnalyzer = trackedAnalyzers(0);
const make = (jobTimeoutMs = 0) => makeAnalyzer(WORKER, jobTimeoutMs);

/** Resolve once `probe` is true, polling every 10 ms, or fail at the deadline. */
async function until(what: string, probe: () => boolean, ms: number): Promise<void> {
  const end = Date.now() + ms;
  while (!probe()) {
    if (Date.now() > end) throw new Error(`timed out after ${ms} ms waiting for ${what}`);
    await new Promise((r) => setTimeout(r, 10));
  }
}

describe('Monte Carlo in the worker', () => {
  it('samples the D mirror: sigma near the hand Pelgrom estimate and the linearized one; same seed, same mean', async () => {
    const a = make();
    const opts = { mc: { samples: 4000, seed: 7 } };
    const r1 = (await a.analyze('mc', SPEC, 'd.bias.yaml', opts))!.mirrors[0];
    const r2 = (await a.analyze('mc', SPEC, 'd.bias.yaml', opts))!.mirrors[0];
    expect(r1.mc?.samples).toBe(4000);
    expect(r1.mc?.seed).toBe(7);
    // Hand estimate from the file comment, 5 % (λ makes the diode's gm/ID slightly smaller).
    expect(Math.abs(r1.sigma! / 0.00758 - 1)).toBeLessThan(0.05);
    // Sampled against linearized: 4000 samples estimate σ to about 1/√(2N) = 1.1 %; 15 % is the
    // mc-nonlinear threshold (docs/findings.md).
    expect(Math.abs(r1.mc!.sigma / r1.sigma! - 1)).toBeLessThan(0.15);
    expect(r2.mc!.mean).toBe(r1.mc!.mean);
  });

  it('cancel stops a long run at once: the thread exits and the next run starts a fresh one', async () => {
    const a = make();
    // 3·10⁶ samples of one output take several seconds (about 2 µs each here).
    let done = 0;
    const long = a.analyze('run:1', SPEC, 'd.bias.yaml', { mc: { samples: 3_000_000, seed: 1 } }, (d) => { done = d; });
    await until('the first samples of the run', () => done > 0, 30_000);
    expect(a.busy('run:1')).toBe(true);
    const stopped = await a.cancel('run:1');
    expect(stopped).toBe(true);
    // Stopped, not finished: no report, and far fewer samples heard than asked for.
    await expect(long).resolves.toBeUndefined();
    expect(done).toBeLessThan(3_000_000);
    expect(a.busy()).toBe(false);
    // Nothing running any more: cancelling again stops nothing.
    expect(await a.cancel('run:1')).toBe(false);
    const next = await a.analyze('run:2', SPEC, 'd.bias.yaml', { mc: { samples: 200, seed: 1 } });
    expect(next?.mirrors[0].mc?.samples).toBe(200);
  });

  it('cancel leaves a finished or unknown job alone', async () => {
    const a = make();
    await a.analyze('run:1', SPEC, 'd.bias.yaml', { mc: { samples: 100, seed: 1 } });
    expect(await a.cancel('run:1')).toBe(false);
    const p = a.analyze('run:2', SPEC, 'd.bias.yaml', { mc: { samples: 100, seed: 1 } });
    expect(await a.cancel('other')).toBe(false);
    expect((await p)?.mirrors[0].mc?.samples).toBe(100);
  });

  it('reports samples done while it runs, rising to the total, before the report arrives', async () => {
    const a = make();
    const heard: { done: number; total: number; at: number }[] = [];
    const two = SPEC.replace('    output: { v: 1.5 }\n', '    output: { v: 1.5 }\n  - name: copy2\n    kind: simple\n    type: nmos\n' +
      '    input: 50u\n    size: { w: 10u, l: 1u }\n    output: { v: 1.2 }\n');
    const job = a.analyze('mc', two, 'd.bias.yaml', { mc: { samples: 400_000, seed: 2 } }, (done, total) => heard.push({ done, total, at: Date.now() }));
    const r = await job;
    const arrived = Date.now();
    expect(r?.mirrors.map((m) => m.mc?.samples)).toEqual([400_000, 400_000]);
    // Two outputs × 400 000 samples; the worker sends at most one message per 150 ms, and the last.
    expect(heard.length).toBeGreaterThan(2);
    expect(heard.every((h) => h.total === 800_000)).toBe(true);
    for (let k = 1; k < heard.length; k++) expect(heard[k]!.done).toBeGreaterThan(heard[k - 1]!.done);
    expect(heard.at(-1)!.done).toBe(800_000);
    expect(heard.some((h) => h.done > 0 && h.done < 800_000)).toBe(true);
    expect(heard[0]!.at).toBeLessThanOrEqual(arrived);
  });

  it('with jobTimeoutMs 0 a long job is not taken for a hung worker', async () => {
    // A timer of 0 ms would fail the job at once; "no limit" must let it run to its end.
    const a = make(0);
    const r = await a.analyze('run', SPEC, 'd.bias.yaml', { mc: { samples: 200_000, seed: 3 } });
    expect(r?.mirrors[0].mc?.samples).toBe(200_000);
    await until('no job left', () => !a.busy(), 1_000);
  });
});

function mirror(name: string, sigma: number | undefined, yieldFraction?: number): MirrorReport {
  return {
    name, mirror: name, kind: 'simple', type: 'nmos', converged: true, iterations: 3, residual: 0,
    vout: 1, iin: 1e-5, iout: 1e-5, ratio: 1, rout: 1e6, compliance: 0.3, nodes: {}, devices: [], path: ['mirrors', 0], mirrorIndex: 0, outputIndex: 0,
    sigma, mc: yieldFraction === undefined ? undefined : { samples: 10_000, seed: 1, mean: 1e-5, sigma: 0.01, min: 0, max: 0, yield: yieldFraction },
  };
}

function file(mirrors: MirrorReport[]): FileReport {
  return { file: 'a.bias.yaml', parsed: true, mirrors, findings: [], anchors: [] };
}

describe('Monte Carlo command text and arguments', () => {
  it('takes samples and seed from the caller when valid, else from the settings', () => {
    const settings = { samples: 10_000, seed: 1 };
    expect(monteCarloRun({}, settings)).toEqual(settings);
    expect(monteCarloRun({ samples: 2500.4, seed: 9 }, settings)).toEqual({ samples: 2500, seed: 9 });
    expect(monteCarloRun({ samples: 1, seed: -3 }, settings)).toEqual({ samples: MC_SAMPLES.min, seed: 1 });
    expect(monteCarloRun({ samples: 1e12 }, settings).samples).toBe(MC_SAMPLES.max);
    expect(monteCarloRun({ samples: Number.NaN, seed: '4' }, settings)).toEqual(settings);
  });

  it('counts the outputs that have something to vary', () => {
    expect(sampledOutputs(undefined)).toBeUndefined();
    expect(sampledOutputs(file([mirror('a', 0.01), mirror('b', undefined), mirror('c', 0.02)]))).toBe(2);
  });

  it('writes the progress line: what runs, how far, for how long', () => {
    expect(groupDigits(1_000_000)).toBe('1\u2009000\u2009000');
    expect(progressMessage({ samples: 10_000, seed: 1 }, 9, 3_100, { done: 41_000, total: 90_000 }))
      .toBe('9 outputs × 10\u2009000 samples, seed 1 — 45 % (41\u2009000 of 90\u2009000), 3 s');
    expect(percentDone({ done: 0, total: 0 })).toBe(0);
    expect(percentDone({ done: 89_999, total: 90_000 })).toBe(99);   // 100 % only when done
    expect(percentDone({ done: 90_000, total: 90_000 })).toBe(100);
    expect(progressMessage({ samples: 10_000, seed: 1 }, 9, 2_400)).toBe('9 outputs × 10\u2009000 samples, seed 1 — 2 s');
    expect(progressMessage({ samples: 500, seed: 3 }, 1, 0)).toBe('1 output × 500 samples, seed 3 — 0 s');
    expect(progressMessage({ samples: 500, seed: 3 }, undefined, 61_000)).toBe('500 samples per output, seed 3 — 61 s');
  });

  it('summarises a run by its lowest yield', () => {
    const s = summaryMessage(file([mirror('a', 0.01, 1), mirror('b', 0.01, 0.9624), mirror('c', undefined)]), { samples: 10_000, seed: 1 }, 1234);
    expect(s).toBe('qpoint: Monte Carlo of 2 outputs × 10\u2009000 samples (seed 1) in 1.2 s; lowest yield 96.24 % (b).');
    expect(summaryMessage(file([]), { samples: 10, seed: 1 }, 0)).toContain('nothing to sample');
  });
});

describe('the panel\'s Monte Carlo request (page → host)', () => {
  it('is accepted with a uri and rejected otherwise', () => {
    expect(isRunMonteCarloMessage({ type: 'runMonteCarlo', uri: 'file:///a.bias.yaml' })).toBe(true);
    expect(isPageMessage({ type: 'runMonteCarlo', uri: 'file:///a.bias.yaml' })).toBe(true);
    for (const m of [{ type: 'runMonteCarlo' }, { type: 'runMonteCarlo', uri: 3 }, { type: 'runMontecarlo', uri: 'u' }, null, 'runMonteCarlo']) {
      expect(isPageMessage(m)).toBe(false);
    }
  });
});
