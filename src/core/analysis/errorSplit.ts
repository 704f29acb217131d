/**
 * Split of the systematic ratio error into causes, from model evaluations of the output device
 * of the mirror pair (b) moved one terminal voltage at a time from the reference device's (a)
 * bias to its own:
 *   geometry = I_b(V_a) / (ratioIdeal·I_a(V_a)) − 1   b at a's bias: what W/L alone does not
 *              explain, e.g. a different L and so a different λ(L), or a different type
 *   body     = I_b(VGS_a, VDS_a, VBS_b) / I_b(V_a) − 1   a's VBS replaced by b's: the threshold
 *              shift of a source above the bulk; exactly zero when the pair's VBS agree
 *   gate     = I_b(VGS_b, VDS_a, VBS_b) / I_b(VGS_a, VDS_a, VBS_b) − 1   a's VGS replaced by
 *              b's (a gate or source on another node: degeneration, an offset, a wiring fault);
 *              exactly zero for the templates, whose pair shares gate and source
 *   vds      = I_b(V_b) / I_b(VGS_b, VDS_a, VBS_b) − 1   the VDS mismatch via length modulation
 * The factors multiply to ratio/ratioIdeal, so they add up to the error to first order. A term
 * is computed only from its own voltage difference, so a cause whose voltage is the same for both
 * devices is zero and is never named. A Wilson's body effect shows in `vds`: it raises VGS of
 * `out`, and so VDS of `in`.
 */
import type { MosElement } from '../circuit/elements/element';
import { mosFrame as frameVoltages } from '../circuit/elements/mosfet';
import { newChannelEval } from '../models/core';
import { evalFrame } from '../models/terminal';
import type { ErrorSplit } from '../types';

const ch = newChannelEval();

function current(m: MosElement, vgs: number, vds: number, vbs: number): number {
  evalFrame(m.dev, vgs, vds, vbs, ch);
  return ch.id;
}

function rel(a: number, b: number): number {
  return b !== 0 && Number.isFinite(a / b) ? a / b - 1 : 0;
}

export function splitError(a: MosElement, b: MosElement, ratioIdeal: number, v: Float64Array): ErrorSplit {
  const [ga, da, ba] = frameVoltages(a, v);
  const [gb, db, bb] = frameVoltages(b, v);
  const ia = current(a, ga, da, ba);
  const s0 = current(b, ga, da, ba);
  const s1 = bb === ba ? s0 : current(b, ga, da, bb);
  const s2 = gb === ga ? s1 : current(b, gb, da, bb);
  const s3 = db === da ? s2 : current(b, gb, db, bb);
  const split: ErrorSplit = { geometry: rel(s0, ratioIdeal * ia), body: rel(s1, s0), vds: rel(s3, s2) };
  if (gb !== ga) split.gate = rel(s2, s1);
  return split;
}
