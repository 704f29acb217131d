/**
 * Convenience for the analyze step: attach corner results and Monte Carlo results to every
 * report of a spec, in the order analyzeSpec produced them (mirrors, then outputs).
 */
import type { MirrorReport, MonteCarloResult, ResolvedSpec } from '../types';
import { runCorners } from './corners';
import { runMonteCarlo, runNetworkMonteCarlo } from './montecarlo';
import { mirrorAt } from '../mirror-at';

export interface VariationOptions {
  corners?: boolean;
  mc?: { samples: number; seed: number };
  /** Monte Carlo samples done of all outputs, and the total (for a progress bar). */
  mcProgress?: (done: number, total: number) => void;
}

/** Reports with `corners` and/or `mc` filled (new objects; the inputs are not changed). A
 *  report whose path does not lead back to a mirror output is passed through. The outputs of a
 *  bias network are sampled together, one solve of the group per sample (network/sampling.ts). */
export function attachVariation(spec: ResolvedSpec, reports: MirrorReport[], opts: VariationOptions): MirrorReport[] {
  if (!opts.corners && !opts.mc) return reports;
  const perOutput = opts.mc && opts.mc.samples > 0 ? Math.max(0, Math.floor(opts.mc.samples)) : 0;
  const total = perOutput * reports.filter((r) => mirrorAt(spec, r.mirrorIndex)).length;
  const networkMc = opts.mc && opts.mc.samples > 0 ? networkRuns(spec, reports) : undefined;
  let before = 0;  // samples of the outputs already finished
  return reports.map((r) => {
    const i = r.mirrorIndex;
    const j = r.outputIndex;
    const mirror = mirrorAt(spec, i);
    if (!mirror) return r;
    const out: MirrorReport = { ...r };
    if (opts.corners && spec.corners.length > 0) out.corners = runCorners(spec, i, j);
    if (opts.mc && opts.mc.samples > 0) {
      const progress = opts.mcProgress;
      const group = networkMc?.get(`${i}:${j}`);
      if (group && !group.results) {
        // The first output of a network samples the whole group: each sample covers them all.
        const size = group.outputs.length;
        group.results = runNetworkMonteCarlo(spec, group.outputs, opts.mc.samples, opts.mc.seed,
          progress ? { onSamples: (done) => progress(before + done * size, total) } : {}) ?? null;
        if (group.results) before += perOutput * size;
      }
      const mine = group?.results?.[group.outputs.findIndex(([m, o]) => m === i && o === j)];
      if (mine) out.mc = mine;
      else {
        out.mc = runMonteCarlo({ spec, mirror, outputIndex: j }, opts.mc.samples, opts.mc.seed,
          progress ? { onSamples: (done) => progress(before + done, total) } : {});
        before += perOutput;
      }
    }
    return out;
  });
}

/** The reported outputs of each bias network, shared by every output of the group (by
 *  `mirror:output`); its results once sampled (null: the group could not be sampled together). */
interface NetworkRun { outputs: [number, number][]; results?: MonteCarloResult[] | null }

function networkRuns(spec: ResolvedSpec, reports: MirrorReport[]): Map<string, NetworkRun> | undefined {
  const networks = spec.networks;
  if (!networks || networks.length === 0) return undefined;
  const runOf = new Map<number, NetworkRun>();
  for (const net of networks) {
    const run: NetworkRun = { outputs: [] };
    for (const m of net.members) runOf.set(m, run);
  }
  const byOutput = new Map<string, NetworkRun>();
  for (const r of reports) {
    const run = runOf.get(r.mirrorIndex);
    if (!run || !mirrorAt(spec, r.mirrorIndex)) continue;
    run.outputs.push([r.mirrorIndex, r.outputIndex]);
    byOutput.set(`${r.mirrorIndex}:${r.outputIndex}`, run);
  }
  return byOutput;
}
