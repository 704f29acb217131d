/**
 * What the analyses ask of a transistor, whatever its kind: its report, its saturation margin
 * (compliance), its mismatch sigmas and the derivatives of its current with respect to them
 * (Pelgrom sigma, Monte Carlo). Exhaustive switches: a new device kind is named here by the
 * compiler.
 */
import { newChannelEval, type ChannelEval } from '../../models/core';
import { evalTerminal } from '../../models/terminal';
import type { DeviceReport } from '../../types';
import { assertNever, type DeviceElement } from './element';
import { mosMargin, mosMismatchDerivatives, mosReport, mosSigmas } from './mosfet';

export function deviceReport(d: DeviceElement, v: Float64Array): DeviceReport {
  switch (d.kind) {
    case 'mos': return mosReport(d, v);
    default: return assertNever(d.kind);
  }
}

/** V, how far the device is inside its saturation (forward-active) region; < 0 outside. */
export function deviceMargin(d: DeviceElement, v: Float64Array, ch: ChannelEval): number {
  switch (d.kind) {
    case 'mos': return mosMargin(d, v, ch);
    default: return assertNever(d.kind);
  }
}

/** 1σ of the device's two mismatch parameters (MOSFET: ΔVT in V, Δβ/β), or undefined. */
export function deviceSigmas(d: DeviceElement): [number, number] | undefined {
  switch (d.kind) {
    case 'mos': return mosSigmas(d);
    default: return assertNever(d.kind);
  }
}

/** Derivatives of the device's main current (through it from currentNodes(d)[0] to [1]) with
 *  respect to its two mismatch parameters, into out[0], out[1]. */
export function deviceMismatchDerivatives(d: DeviceElement, v: Float64Array, ch: ChannelEval, out: Float64Array): void {
  switch (d.kind) {
    case 'mos': mosMismatchDerivatives(d, v, ch, out); return;
    default: assertNever(d.kind);
  }
}

/** The device's two mismatch parameters as they stand (MOSFET: VT0 in V, β in A/V²). */
export function mismatchBase(d: DeviceElement): [number, number] {
  switch (d.kind) {
    case 'mos': return [d.dev.vt0, d.dev.beta];
    default: return assertNever(d.kind);
  }
}

/** Move the parameters from `base` by d1 (MOSFET: ΔVT, V) and d2 (relative: Δβ/β). */
export function setMismatch(d: DeviceElement, base: readonly [number, number], d1: number, d2: number): void {
  switch (d.kind) {
    case 'mos': d.dev.vt0 = base[0] + d1; d.dev.beta = base[1] * (1 + d2); return;
    default: assertNever(d.kind);
  }
}

/** The nodes the main current flows between, through the device: [from, to] (MOSFET: drain,
 *  source). */
export function currentNodes(d: DeviceElement): [number, number] {
  switch (d.kind) {
    case 'mos': return [d.d, d.s];
    default: return assertNever(d.kind);
  }
}

/** Whether the terminal at node k is where the main current flows (compliance: a device whose
 *  drain or source is the output moves one-for-one with it). */
export function carriesNode(d: DeviceElement, k: number): boolean {
  const [a, b] = currentNodes(d);
  return a === k || b === k;
}

const evalScratch = newChannelEval();

/** A, the device's main current in its own polarity (positive when it conducts as wired: drain
 *  to source for NMOS, source to drain for PMOS) at node voltages v. */
export function channelCurrent(d: DeviceElement, v: Float64Array): number {
  switch (d.kind) {
    case 'mos': {
      const vs = v[d.s]!;
      evalTerminal(d.dev, v[d.g]! - vs, v[d.d]! - vs, v[d.b]! - vs, evalScratch);
      return d.dev.sign * evalScratch.id;
    }
    default: return assertNever(d.kind);
  }
}

/**
 * The device's controlled source as the nodal equations see it: the current from `from` to `to`
 * (currentNodes) grows by `g`·(v_ctrl − v_ref) (MOSFET: gm, gate over source). The loop gain is
 * the return difference of this one term (analysis/loop-gain.ts).
 */
export function controlledSource(d: DeviceElement, v: Float64Array): { g: number; ctrl: number; ref: number } {
  switch (d.kind) {
    case 'mos': {
      const vs = v[d.s]!;
      evalTerminal(d.dev, v[d.g]! - vs, v[d.d]! - vs, v[d.b]! - vs, evalScratch);
      return { g: evalScratch.gm, ctrl: d.g, ref: d.s };
    }
    default: return assertNever(d.kind);
  }
}

/**
 * The device's cutoff condition, linear in node voltages, for the zero-current state test
 * (analysis/startup.ts): it is off while v[ctrl] − v[ref] ≤ `bound` (MOSFET: VGS ≤ VT0 for NMOS,
 * VSG ≤ |VT0| for PMOS; VT0 without body effect, the lowest threshold a bulk at its rail gives, so
 * a state found off here is off for every body bias).
 */
export function cutoffBound(d: DeviceElement): { ctrl: number; ref: number; bound: number } {
  switch (d.kind) {
    case 'mos':
      return d.dev.sign > 0 ? { ctrl: d.g, ref: d.s, bound: d.dev.vt0 } : { ctrl: d.s, ref: d.g, bound: d.dev.vt0 };
    default: return assertNever(d.kind);
  }
}
