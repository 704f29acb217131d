/**
 * DC operating point by Newton on the nodal equations: analytic Jacobian, step limiting, then
 * source stepping and gmin stepping when plain Newton fails. Bounded by an iteration cap per
 * attempt and, for a large circuit or with an injected clock, a wall-clock budget read every
 * iteration (a small circuit's result never depends on the clock); a failure is data (converged: false,
 * with what was tried). A converged point is polished without gmin (SOLVER.gminFinal), so the
 * figures at nanoampere currents carry no trace of it.
 */
import { SOLVER } from '../defaults';
import { assemble } from './assemble';
import type { Circuit } from './circuit';
import type { Workspace } from './workspace';

export interface DcOptions {
  /** ms clock; injected so tests and hosts can control time (default Date.now). */
  clock?: () => number;
  /** ms budget for the whole solve including retries (default SOLVER.timeBudgetMs). */
  budgetMs?: number;
  /** Skip the retries (continuation steps inside the compliance search and sweeps use plain
   *  Newton first and fall back to a full solve from the topology guess themselves). */
  plainOnly?: boolean;
  /** Newton iterations per attempt (default SOLVER.maxIterations). */
  maxIterations?: number;
  /** Polish a converged point without gmin (default true); a solve read only for saturation
   *  margins (the compliance search) skips it. */
  polish?: boolean;
}

export interface DcResult {
  converged: boolean;
  /** Newton iterations over every attempt. */
  iterations: number;
  /** A, largest KCL residual over the free nodes at the returned point. */
  residual: number;
  /** What was tried, when it did not converge (or which fallback succeeded). */
  note?: string;
}

/** Relative part of the KCL tolerance, against the sum of |currents| at the node. */
const RESIDUAL_REL_TOL = 1e-9;

interface Attempt { ok: boolean; iterations: number; residual: number; reason: string }

/** Put the held nodes at vss + alpha·(v − vss). */
function setHeld(c: Circuit, ws: Workspace, alpha: number): void {
  for (let k = c.nFree; k < ws.nt; k++) ws.v[k] = c.vss + alpha * (c.fixedV[k]! - c.vss);
}

function maxResidual(ws: Workspace): number {
  let r = 0;
  for (let k = 0; k < ws.n; k++) { const a = Math.abs(ws.F[k]!); if (a > r || a !== a) r = a !== a ? Infinity : a; }
  return r;
}

/** Work limits of one solve, checked every iteration: a hard cap on the iterations of all
 *  attempts, and a wall-clock deadline. The deadline ends a solve only once it has done a fixed
 *  amount of work (GRACE_WORK), so a host that stalls the thread for a moment does not turn an
 *  easy solve of a small circuit into a failure (it gets a whole attempt's iterations first),
 *  while a large circuit is held to the clock from its first iterations. */
class Budget {
  private readonly deadline: number;
  private readonly grace: number;
  iterations = 0;
  constructor(private readonly clock: () => number, ms: number, readonly maxIterations: number, workPerIteration: number) {
    this.deadline = clock() + ms;
    this.grace = Math.max(1, Math.min(maxIterations, Math.floor(GRACE_WORK / Math.max(1, workPerIteration))));
  }
  expired(): boolean {
    if (this.iterations >= TOTAL_ITERATIONS_FACTOR * this.maxIterations) return true;
    return this.iterations >= this.grace && this.clock() > this.deadline;
  }
}

/** Every attempt of one solve together: at most this many times SOLVER.maxIterations. */
const TOTAL_ITERATIONS_FACTOR = 25;

/** Work (units of workOf) up to which a solve's iteration cap alone bounds it when no clock is
 *  injected: every template and bias-network circuit, whose whole cap costs a few milliseconds.
 *  Its result then depends on the equations alone, never on how busy the machine is, so an
 *  analysis, and a fix verified by one, comes out the same on every run (the fix searches
 *  compare a local and a whole-file re-read, test/fuzz/verify-local.test.ts). */
const CLOCKLESS_WORK = 5_000_000;

/** A clock that never moves: the deadline never passes. */
const NEVER = (): number => 0;

/** Work a solve may do before the clock can end it, in the units of workOf (about a
 *  millisecond here): every template circuit gets SOLVER.maxIterations iterations of grace. */
const GRACE_WORK = 200_000;

/** Work of one Newton iteration: one stamp per element, and the factorization (dense: n³/3;
 *  sparse: about ten operations per unknown on the trees and stars of bias circuits). */
function workOf(c: Circuit): number {
  const n = c.nFree;
  return c.elements.length + (c.ordering ? 10 * n : (n * n * n) / 3);
}

/** Iterations of the polish without gmin: it starts at the solution with gmin. */
const POLISH_ITERATIONS = 20;

/** Newton at one (alpha, gmin). On success ws.G/F hold the equations at the solution. */
function newton(c: Circuit, ws: Workspace, alpha: number, gmin: number, budget: Budget, track: boolean,
  bestRes: { value: number }): Attempt {
  const maxIterations = budget.maxIterations;
  const { n, v, F, dx } = ws;
  const halfSpan = c.vmid - c.vss;
  let small = false;
  ws.factored = false;
  for (let it = 0; it <= maxIterations; it++) {
    assemble(c, ws, alpha, gmin);
    let okRes = true;
    let res = 0;
    for (let k = 0; k < n; k++) {
      const f = Math.abs(F[k]!);
      if (!(f <= SOLVER.absTol + RESIDUAL_REL_TOL * ws.absI[k]!)) okRes = false;
      if (f > res || f !== f) res = f !== f ? Infinity : f;
    }
    if (!Number.isFinite(res)) return { ok: false, iterations: it, residual: res, reason: 'non-finite currents' };
    if (track && res < bestRes.value) { bestRes.value = res; ws.best.set(v); }
    if (okRes && (small || n === 0)) return { ok: true, iterations: it, residual: res, reason: '' };
    if (it === maxIterations) return { ok: false, iterations: it, residual: res, reason: `${it} iterations` };
    if (!ws.solver.factor(ws.G)) return { ok: false, iterations: it, residual: res, reason: 'singular Jacobian' };
    for (let k = 0; k < n; k++) dx[k] = -F[k]!;
    ws.solver.solve(dx);
    // Step limiting: no node moves more than SOLVER.maxStep, plus half of how far it already
    // sits outside the supplies, so a runaway node (a current with no path) still gets far
    // enough in a few dozen iterations to be recognised, while normal nodes creep.
    let scale = 1;
    for (let k = 0; k < n; k++) {
      const a = Math.abs(dx[k]!);
      if (!Number.isFinite(a)) return { ok: false, iterations: it, residual: res, reason: 'non-finite step' };
      const limit = SOLVER.maxStep + 0.5 * Math.max(0, Math.abs(v[k]! - c.vmid) - halfSpan);
      if (a * scale > limit) scale = limit / a;
    }
    small = scale === 1;
    for (let k = 0; k < n; k++) {
      const step = scale * dx[k]!;
      if (Math.abs(step) > SOLVER.vTol + SOLVER.relTol * Math.abs(v[k]!)) small = false;
      v[k] = v[k]! + step;
    }
    budget.iterations++;
    if (budget.expired()) return { ok: false, iterations: it + 1, residual: res, reason: 'time budget' };
  }
  return { ok: false, iterations: maxIterations, residual: Infinity, reason: 'iteration cap' };
}

/** Solves so far that a clock could end (a large circuit, or a clock injected). */
let clockedSolves = 0;

/**
 * How many solves so far could have been ended by a clock: work between two readings that did
 * not move this count depended on its equations alone, converged or not (analysis/repeats.ts
 * keeps such reports for the next analysis).
 */
export function clockedSolveCount(): number {
  return clockedSolves;
}

/** Solve from the free-node voltages already in ws.v (the initial guess). */
export function solveDc(c: Circuit, ws: Workspace, opts: DcOptions = {}): DcResult {
  const maxIterations = opts.maxIterations ?? SOLVER.maxIterations;
  const clock = opts.clock ?? (TOTAL_ITERATIONS_FACTOR * maxIterations * workOf(c) <= CLOCKLESS_WORK ? NEVER : Date.now);
  if (clock !== NEVER) clockedSolves++;
  const budgetMs = opts.budgetMs ?? SOLVER.timeBudgetMs;
  const budget = new Budget(clock, budgetMs, maxIterations, workOf(c));
  const r = solveWithGmin(c, ws, opts, budget);
  if (!r.converged || opts.polish === false || !gminMatters(c, ws)) return r;
  // The polish's iterations are not counted: `iterations` says how hard the point was to find.
  const p = polish(c, ws, new Budget(clock, budgetMs, POLISH_ITERATIONS, workOf(c)));
  if (p.ok) r.residual = p.residual;
  return r;
}

/** Whether gmin could show in a reported figure (six significant digits): its current is more
 *  than POLISH_SHARE of a node's currents, or it is more than POLISH_SHARE of a conducting
 *  channel's own conductance (Rout). At microamperes neither holds; at nanoamperes both do. */
function gminMatters(c: Circuit, ws: Workspace): boolean {
  const g = SOLVER.gmin;
  if (g > POLISH_SHARE * ws.gdsFloor) return true;
  for (let k = 0; k < c.nFree; k++) {
    if (g * Math.abs(ws.v[k]! - c.vmid) > POLISH_SHARE * ws.absI[k]!) return true;
  }
  return false;
}

const POLISH_SHARE = 1e-6;

/** Newton again from the solution with gmin, with gmin lowered to SOLVER.gminFinal: a few
 *  iterations move the point by gmin's share of each node's currents. If it fails (a node held
 *  only by gmin that now wanders), the solution with gmin stands. */
function polish(c: Circuit, ws: Workspace, budget: Budget): Attempt {
  ws.best.set(ws.v);
  const a = newton(c, ws, 1, SOLVER.gminFinal, budget, false, { value: Infinity });
  if (a.ok) return a;
  ws.v.set(ws.best);
  assemble(c, ws, 1, SOLVER.gmin);
  ws.factored = false;
  return a;
}

function solveWithGmin(c: Circuit, ws: Workspace, opts: DcOptions, budget: Budget): DcResult {
  const gmin = SOLVER.gmin;
  const bestRes = { value: Infinity };
  ws.saved.set(ws.v);
  setHeld(c, ws, 1);
  const plain = newton(c, ws, 1, gmin, budget, true, bestRes);
  let iterations = plain.iterations;
  if (plain.ok) return { converged: true, iterations, residual: plain.residual };
  const tried = [`Newton (${plain.reason})`];
  if (opts.plainOnly) return finishFailed(c, ws, iterations, bestRes.value, tried);

  // Source stepping: ramp the current sources up from a small fraction, halving the step on a
  // failure. Held voltages stay put (a mirror is driven by its currents: at a small current
  // every device sits just above threshold, an easy start); a circuit without current sources
  // (resistor input) ramps its held voltages from vss instead.
  const rampVoltages = !c.hasCurrentSources;
  if (!budget.expired()) {
    for (let k = 0; k < c.nFree; k++) ws.v[k] = rampVoltages ? c.vss + (ws.saved[k]! - c.vss) / SOLVER.sourceSteps : c.vmid;
    let alpha = 0;
    let step = 1 / SOLVER.sourceSteps;
    let ok = true;
    const last = new Float64Array(ws.nt);
    last.set(ws.v);
    while (alpha < 1 && !budget.expired()) {
      const next = Math.min(1, alpha + step);
      setHeld(c, ws, rampVoltages ? next : 1);
      const a = newton(c, ws, next, gmin, budget, next === 1, bestRes);
      iterations += a.iterations;
      if (a.ok) {
        alpha = next; last.set(ws.v); step = Math.min(step * 1.5, 0.25);
      } else {
        ws.v.set(last);
        step /= 2;
        if (step < 1e-4) { ok = false; tried.push(`source stepping (stalled at ${(100 * alpha).toFixed(1)} %: ${a.reason})`); break; }
      }
    }
    if (ok && alpha >= 1) return { converged: true, iterations, residual: maxResidual(ws), note: 'converged by source stepping' };
    if (ok) tried.push('source stepping (time budget)');
  } else {
    tried.push('no time left for source stepping');
  }

  // gmin stepping: a large conductance to the midpoint everywhere makes the problem nearly
  // linear; lower it a decade at a time, each solve starting from the previous one.
  if (!budget.expired()) {
    // Start at mid-supply, where a large gmin puts the solution anyway.
    for (let k = 0; k < c.nFree; k++) ws.v[k] = c.vmid;
    setHeld(c, ws, 1);
    let g = 1e-2;
    let ok = true;
    while (g >= gmin * 0.999 && !budget.expired()) {
      const a = newton(c, ws, 1, g, budget, g <= gmin * 1.001, bestRes);
      iterations += a.iterations;
      if (!a.ok) { ok = false; tried.push(`gmin stepping (failed at ${g.toExponential(0)} S: ${a.reason})`); break; }
      if (g <= gmin * 1.001) return { converged: true, iterations, residual: a.residual, note: 'converged by gmin stepping' };
      g = Math.max(g / 10, gmin);
    }
    if (ok) tried.push('gmin stepping (time budget)');
  } else {
    tried.push('no time left for gmin stepping');
  }
  return finishFailed(c, ws, iterations, bestRes.value, tried);
}

/** Leave the best iterate of the true equations in ws.v, with G/F assembled there. */
function finishFailed(c: Circuit, ws: Workspace, iterations: number, best: number, tried: string[]): DcResult {
  if (Number.isFinite(best)) ws.v.set(ws.best); else ws.v.set(ws.saved);
  setHeld(c, ws, 1);
  assemble(c, ws, 1, SOLVER.gmin);
  ws.factored = false;
  return { converged: false, iterations, residual: maxResidual(ws), note: `tried ${tried.join(', then ')}` };
}
