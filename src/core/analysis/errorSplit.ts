/**
 * Split of the systematic ratio error into causes, from model evaluations of the output device
 * of the mirror pair (b) moved step by step from the reference device's (a) bias to its own:
 *   geometry = I_b(V_a) / (ratioIdeal·I_a(V_a)) − 1   b at a's bias: what W/L alone does not
 *              explain, e.g. a different L and so a different λ(L), or a different type
 *   body     = I_b(VGS_b, VDS_a, VBS_b) / I_b(V_a) − 1   a's VGS/VBS replaced by b's (VSB
 *              differences of the pair; zero for the templates, whose pair shares its source)
 *   vds      = I_b(V_b) / I_b(VGS_b, VDS_a, VBS_b) − 1   the VDS mismatch via length modulation
 * The factors multiply to ratio/ratioIdeal, so they add up to the error to first order. A
 * Wilson's body effect shows in `vds`: it raises VGS of `out`, and so VDS of `in`.
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
  const s1 = current(b, gb, da, bb);
  const s2 = current(b, gb, db, bb);
  return { geometry: rel(s0, ratioIdeal * ia), body: rel(s1, s0), vds: rel(s2, s1) };
}
