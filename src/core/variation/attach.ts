/**
 * Convenience for the analyze step: attach corner results and Monte Carlo results to every
 * report of a spec, in the order analyzeSpec produced them (mirrors, then outputs).
 */
import type { MirrorReport, ResolvedSpec } from '../types';
import { runCorners } from './corners';
import { runMonteCarlo } from './montecarlo';
import { mirrorAt } from '../mirror-at';

export interface VariationOptions {
  corners?: boolean;
  mc?: { samples: number; seed: number };
  /** Monte Carlo samples done of all outputs, and the total (for a progress bar). */
  mcProgress?: (done: number, total: number) => void;
}

/** Reports with `corners` and/or `mc` filled (new objects; the inputs are not changed). A
 *  report whose path does not lead back to a mirror output is passed through. */
export function attachVariation(spec: ResolvedSpec, reports: MirrorReport[], opts: VariationOptions): MirrorReport[] {
  if (!opts.corners && !opts.mc) return reports;
  const perOutput = opts.mc && opts.mc.samples > 0 ? Math.max(0, Math.floor(opts.mc.samples)) : 0;
  const total = perOutput * reports.filter((r) => mirrorAt(spec, r.mirrorIndex)).length;
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
      out.mc = runMonteCarlo({ spec, mirror, outputIndex: j }, opts.mc.samples, opts.mc.seed,
        progress ? { onSamples: (done) => progress(before + done, total) } : {});
      before += perOutput;
    }
    return out;
  });
}
