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
import type { BjtElement, MosElement } from '../circuit/elements/element';
import { bjtFrame } from '../circuit/elements/bjt';
import { mosFrame as frameVoltages } from '../circuit/elements/mosfet';
import { evalBipolar, newBipolarEval } from '../models/bipolar';
import { newChannelEval } from '../models/core';
import { evalFrame } from '../models/terminal';
import type { BipolarErrorSplit, MosErrorSplit } from '../types';

const ch = newChannelEval();

function current(m: MosElement, vgs: number, vds: number, vbs: number): number {
  evalFrame(m.dev, vgs, vds, vbs, ch);
  return ch.id;
}

function rel(a: number, b: number): number {
  return b !== 0 && Number.isFinite(a / b) ? a / b - 1 : 0;
}

export function splitError(a: MosElement, b: MosElement, ratioIdeal: number, v: Float64Array): MosErrorSplit {
  const [ga, da, ba] = frameVoltages(a, v);
  const [gb, db, bb] = frameVoltages(b, v);
  const ia = current(a, ga, da, ba);
  const s0 = current(b, ga, da, ba);
  const s1 = bb === ba ? s0 : current(b, ga, da, bb);
  const s2 = gb === ga ? s1 : current(b, gb, da, bb);
  const s3 = db === da ? s2 : current(b, gb, db, bb);
  const split: MosErrorSplit = { geometry: rel(s0, ratioIdeal * ia), body: rel(s1, s0), vds: rel(s3, s2) };
  if (gb !== ga) split.gate = rel(s2, s1);
  return split;
}

const bev = newBipolarEval();

function bjtCurrent(q: BjtElement, vbe: number, vce: number): number {
  evalBipolar(q.dev, vbe, vbe - vce, bev);
  return bev.ic;
}

/**
 * The bipolar pair's split, by the same one-voltage-at-a-time evaluation:
 *   geometry = IC_b(V_a) / (ratioIdeal·IC_a(V_a)) − 1   b at a's bias
 *   vce      = IC_b(VBE_a, VCE_b) / IC_b(V_a) − 1        the VCE mismatch through the Early effect
 *   base     = (ratio/ratioIdeal) / ((1 + geometry)·(1 + vce)·(1 + emitter)) − 1   what the
 *              base currents take from the input (and anything else the collector currents of
 *              the pair do not explain: a VBE difference, a degenerated emitter, counted there)
 * A Widlar's pair runs at different VBE on purpose; its `base` then holds that ln-law ratio too,
 * so the split is read against its own kind (the ratio check leaves a degenerated pair alone).
 */
export function splitBipolarError(a: BjtElement, b: BjtElement, ratioIdeal: number, ratio: number, v: Float64Array): BipolarErrorSplit {
  const [vbeA, vbcA] = bjtFrame(a, v);
  const [vbeB, vbcB] = bjtFrame(b, v);
  const vceA = vbeA - vbcA, vceB = vbeB - vbcB;
  const ia = bjtCurrent(a, vbeA, vceA);
  const s0 = bjtCurrent(b, vbeA, vceA);
  const s1 = vceB === vceA ? s0 : bjtCurrent(b, vbeA, vceB);
  const s2 = vbeB === vbeA ? s1 : bjtCurrent(b, vbeB, vceB);
  const geometry = rel(s0, ratioIdeal * ia);
  const vce = rel(s1, s0);
  const rest = (1 + geometry) * (1 + vce) * (s2 !== 0 && s1 !== 0 ? s2 / s1 : 1);
  const base = Number.isFinite(ratio) && rest !== 0 ? ratio / ratioIdeal / rest - 1 : 0;
  return { base, vce, geometry };
}
