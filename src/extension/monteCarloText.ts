/**
 * Pure parts of the Monte Carlo command (tested without vscode): which samples and seed a run
 * uses, and the progress and summary lines the designer reads.
 */
import type { FileReport } from '../core/types';
import { MC_SAMPLES } from '../core/defaults';
import { formatPercent } from '../core/text/format';
export const MC_SEED_DEFAULT = 1;

export interface MonteCarloRun { samples: number; seed: number }

/** Samples and seed of a run: the caller's (scripts, tests) when valid, else the settings.
 *  Samples are clamped to the setting's bounds, seeds to whole numbers ≥ 0. */
export function monteCarloRun(arg: { samples?: unknown; seed?: unknown }, settings: MonteCarloRun): MonteCarloRun {
  const finite = (x: unknown): x is number => typeof x === 'number' && Number.isFinite(x);
  const samples = finite(arg.samples) ? Math.min(Math.max(Math.round(arg.samples), MC_SAMPLES.min), MC_SAMPLES.max) : settings.samples;
  const seed = finite(arg.seed) && arg.seed >= 0 ? Math.trunc(arg.seed) : settings.seed;
  return { samples, seed };
}

/** 10 000 → "10 000" (thin grouping, as in the panel). */
export function groupDigits(n: number): string {
  return Math.round(n).toString().replace(/\B(?=(\d{3})+(?!\d))/g, '\u2009');
}

/** The outputs a run will sample: those with a Pelgrom sigma (avt/abeta given). Undefined
 *  without a report yet. */
export function sampledOutputs(report: FileReport | undefined): number | undefined {
  return report ? report.mirrors.filter((m) => m.sigma !== undefined).length : undefined;
}

/** Samples done over all outputs of a running job, as the worker reports them. */
export interface SampleCount { done: number; total: number }

/** The progress line: what runs, how far it is (once the worker has reported samples) and for
 *  how long. */
export function progressMessage(run: MonteCarloRun, outputs: number | undefined, elapsedMs: number, count?: SampleCount): string {
  const what = outputs === undefined ? `${groupDigits(run.samples)} samples per output`
    : `${outputs} output${outputs === 1 ? '' : 's'} × ${groupDigits(run.samples)} samples`;
  const far = count && count.total > 0 ? ` ${percentDone(count)} % (${groupDigits(count.done)} of ${groupDigits(count.total)})` : '';
  return `${what}, seed ${run.seed} —${far}${far ? ',' : ''} ${Math.floor(elapsedMs / 1000)} s`;
}

/** Whole percent done, 0…100 (100 only when every sample is done). */
export function percentDone(count: SampleCount): number {
  if (!(count.total > 0)) return 0;
  const p = Math.floor((100 * Math.min(count.done, count.total)) / count.total);
  return count.done >= count.total ? 100 : Math.min(p, 99);
}

/** One line after a run: what ran and the lowest yield, with its output. */
export function summaryMessage(report: FileReport, run: MonteCarloRun, ms: number): string {
  const sampled = report.mirrors.filter((m) => m.mc);
  const head = `qpoint: Monte Carlo of ${sampled.length} output${sampled.length === 1 ? '' : 's'} × ${groupDigits(run.samples)} samples (seed ${run.seed}) in ${(ms / 1000).toFixed(1)} s`;
  if (sampled.length === 0) return `${head}: nothing to sample.`;
  const worst = sampled.reduce((a, b) => (b.mc!.yield < a.mc!.yield ? b : a));
  const y = worst.mc!.yield;
  return `${head}; lowest yield ${formatPercent(y, 4)} (${worst.name}).`;
}
