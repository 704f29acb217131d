/**
 * Output compliance (design §4): for an NMOS mirror the lowest, for a PMOS mirror the highest
 * output voltage at which every device counted for the measured output is saturated
 * (VDS ≥ VDSsat), re-solving the whole circuit at each trial voltage.
 *
 * The search runs in the polarity frame u = sign·(vout − rail), where margins grow with u.
 * Until the root is bracketed, each trial is predicted per device: every device's margin is
 * extrapolated linearly (from the last two trials; the first trial assumes the device at the
 * output moves one-for-one with vout) and the compliance is the largest of the devices' zero
 * crossings, since all of them must be saturated. Once bracketed, false position with the
 * Illinois modification refines the worst margin; the search stops when the bracket is
 * narrower than SOLVER.complianceTol or the margin is within a tenth of it.
 *
 * When no output voltage within the supplies saturates every device (a reference device in
 * triode, say), the limit is reported as the far rail (NMOS: vdd, PMOS: vss): nothing works.
 */
import { SOLVER } from '../defaults';
import { carriesNode } from '../circuit/elements/device';
import type { MirrorCircuit } from '../circuit/mirrorCircuit';
import { setVout, solveMirror, TRIAL, worstMargin } from './solve';

/** The trials are read for saturation margins only: no polish without gmin. */
const MARGINS_ONLY = { ...TRIAL, polish: false };

export interface ComplianceResult {
  /** V, absolute. */
  compliance: number;
  /** False when no output voltage within the supplies saturates every device. */
  found: boolean;
  solves: number;
  /** Index into circuit.mos of the device that sets the limit: the one out of saturation just
   *  past it (found), or the worst one at the far rail (not found: it is out of saturation at
   *  every output voltage). Absent when the mirror works all the way to its rail. */
  limiter?: number;
}

interface Point { u: number; f: number; x: Float64Array; each: Float64Array }

/** V: a device this close to the edge counts as saturated, so a bias placed exactly at
 *  VDS = VDSsat (margin 0) is not lost to rounding. Far below the search accuracy. */
const SLACK = 1e-6;

/** Below this slope (V/V) a device's margin counts as independent of the output voltage. */
const FLAT = 0.02;

export function findCompliance(mc: MirrorCircuit, uNom: number, xNom: Float64Array): ComplianceResult {
  const span = Math.abs(mc.span);
  const tol = SOLVER.complianceTol;
  const nDev = mc.circuit.devices.length;
  const toV = (u: number): number => mc.rail + mc.sign * u;
  let solves = 0;
  const evalAt = (u: number, warm: Float64Array | undefined): Point => {
    setVout(mc, toV(u));
    const r = solveMirror(mc, warm, MARGINS_ONLY);
    solves++;
    const each = new Float64Array(nDev);
    // A trial that does not converge counts as not saturated.
    const f = r.converged ? worstMargin(mc, each) + SLACK : -Infinity;
    if (!r.converged) each.fill(-Infinity); else for (let k = 0; k < nDev; k++) each[k] = each[k]! + SLACK;
    return { u, f, x: mc.ws.v.slice(), each };
  };
  const nom: Point = { u: uNom, f: 0, x: xNom, each: new Float64Array(nDev) };
  mc.ws.v.set(xNom);
  nom.f = worstMargin(mc, nom.each) + SLACK;
  for (let k = 0; k < nDev; k++) nom.each[k] = nom.each[k]! + SLACK;

  /** The largest per-device zero crossing predicted from points a (older) and b. */
  const predict = (a: Point | undefined, b: Point): number => {
    let t = -Infinity;
    for (let k = 0; k < nDev; k++) {
      const mb = b.each[k]!;
      if (Number.isNaN(mb)) continue;
      let slope: number;
      if (a) {
        const ma = a.each[k]!;
        slope = Number.isFinite(ma) && Number.isFinite(mb) ? (mb - ma) / (b.u - a.u) : 1;
      } else {
        slope = carriesNode(mc.circuit.devices[k]!, mc.circuit.outNode) ? 1 : 0;
      }
      if (!Number.isFinite(mb)) { t = Math.max(t, b.u + 0.25 * span); continue; }
      if (slope > FLAT) t = Math.max(t, b.u - mb / slope);
      else if (mb < 0) t = Math.max(t, span + 1);   // stuck below zero: nothing in range works
    }
    return Number.isFinite(t) ? t : b.u - b.f;
  };

  let lo: Point | undefined;   // f < 0
  let hi: Point | undefined;   // f ≥ 0
  if (nom.f >= 0) hi = nom; else lo = nom;
  let last = nom;
  let before: Point | undefined;
  let side = 0;                 // Illinois: which end was replaced last (−1 lo, +1 hi)
  let loF = lo?.f ?? 0, hiF = hi?.f ?? 0;

  for (let k = 0; k < 60; k++) {
    let t: number;
    if (lo && hi) {
      if (hi.u - lo.u <= tol) break;
      const fl = Number.isFinite(loF) ? loF : -Math.max(hiF, tol);
      t = hiF !== fl ? (lo.u * hiF - hi.u * fl) / (hiF - fl) : 0.5 * (lo.u + hi.u);
      if (!(t > lo.u && t < hi.u)) t = 0.5 * (lo.u + hi.u);
    } else if (hi) {
      if (hi.u <= 0) return { compliance: toV(0), found: true, solves };
      t = Math.min(Math.max(predict(before, last), 0), hi.u - 0.5 * tol);
    } else {
      const l = lo!;
      if (l.u >= span) return { compliance: toV(span), found: false, solves, ...worstOf(l) };
      t = Math.min(Math.max(predict(before, last), l.u + 0.5 * tol), span);
    }
    const warm = lo && hi ? (t - lo.u < hi.u - t ? lo.x : hi.x) : last.x;
    const p = evalAt(t, warm);
    before = last;
    last = p;
    if (p.f >= 0) {
      hi = p; hiF = p.f;
      if (side === 1) loF /= 2;
      side = 1;
    } else {
      lo = p; loF = p.f;
      if (side === -1) hiF /= 2;
      side = -1;
    }
    if (Number.isFinite(p.f) && Math.abs(p.f) < 0.1 * tol) return { compliance: toV(p.u), found: true, solves, ...limiterNear(p, lo) };
  }
  if (hi) return { compliance: toV(hi.u), found: true, solves, ...limiterNear(hi, lo) };
  return { compliance: toV(span), found: false, solves, ...worstOf(last) };
}

/** The device with the smallest margin at a point (finite margins only). */
function worstOf(p: Point): { limiter?: number } {
  let k0 = -1;
  for (let k = 0; k < p.each.length; k++) {
    const m = p.each[k]!;
    if (Number.isFinite(m) && (k0 < 0 || m < p.each[k0]!)) k0 = k;
  }
  return k0 < 0 ? {} : { limiter: k0 };
}

/** The limiting device at compliance `at`: the worst one just past it (lo), else the one at
 *  the edge there. */
function limiterNear(at: Point, lo: Point | undefined): { limiter?: number } {
  return lo && lo.each.some((m) => Number.isFinite(m)) ? worstOf(lo) : worstOf(at);
}
