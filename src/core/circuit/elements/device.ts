/**
 * What the analyses ask of a transistor, whatever its kind: its report, its working-region
 * margin (compliance), its mismatch sigmas and the derivatives of its terminal currents with
 * respect to them (mismatch sigma, Monte Carlo). Exhaustive switches: a new device kind is named
 * here by the compiler.
 */
import { newChannelEval, type ChannelEval } from '../../models/core';
import { evalTerminal } from '../../models/terminal';
import type { DeviceReport } from '../../types';
import { evalBipolar, newBipolarEval, vbeCutoff } from '../../models/bipolar';
import { bjtFrame, bjtMargin, bjtMismatchCurrents, bjtReport, bjtSigmas } from './bjt';
import { assertNever, type DeviceElement } from './element';
import { mosMargin, mosMismatchDerivatives, mosReport, mosSigmas } from './mosfet';

export function deviceReport(d: DeviceElement, v: Float64Array): DeviceReport {
  switch (d.kind) {
    case 'mos': return mosReport(d, v);
    case 'bjt': return bjtReport(d, v);
    default: return assertNever(d);
  }
}

/** V, how far the device is inside its working region (MOSFET saturation, bipolar
 *  forward-active); < 0 outside. */
export function deviceMargin(d: DeviceElement, v: Float64Array, ch: ChannelEval): number {
  switch (d.kind) {
    case 'mos': return mosMargin(d, v, ch);
    case 'bjt': return bjtMargin(d, v);
    default: return assertNever(d);
  }
}

/** 1σ of the device's two mismatch parameters (MOSFET: ΔVT in V, Δβ/β; bipolar: ΔIS/IS,
 *  Δβ/β), or undefined. */
export function deviceSigmas(d: DeviceElement): [number, number] | undefined {
  switch (d.kind) {
    case 'mos': return mosSigmas(d);
    case 'bjt': return bjtSigmas(d);
    default: return assertNever(d);
  }
}

const der = new Float64Array(2);

/** Derivatives of the currents leaving each of the device's nodes through it with respect to
 *  its two mismatch parameters (MOSFET: ΔVT and ln β, through the channel; bipolar: ln IS and
 *  ln βF, at collector, base and emitter), one terminal per `emit`. */
export function deviceMismatchCurrents(d: DeviceElement, v: Float64Array, ch: ChannelEval, emit: (node: number, d1: number, d2: number) => void): void {
  switch (d.kind) {
    case 'mos':
      mosMismatchDerivatives(d, v, ch, der);
      emit(d.d, der[0]!, der[1]!);
      emit(d.s, -der[0]!, -der[1]!);
      return;
    case 'bjt': bjtMismatchCurrents(d, v, emit); return;
    default: assertNever(d);
  }
}

/** The device's two mismatch parameters as they stand (MOSFET: VT0 in V, β in A/V²; bipolar:
 *  IS in A, βF). */
export function mismatchBase(d: DeviceElement): [number, number] {
  switch (d.kind) {
    case 'mos': return [d.dev.vt0, d.dev.beta];
    case 'bjt': return [d.dev.is, d.dev.bf];
    default: return assertNever(d);
  }
}

/** Move the parameters from `base` by d1 (MOSFET: ΔVT, V; bipolar: ΔIS/IS) and d2 (relative:
 *  Δβ/β). */
export function setMismatch(d: DeviceElement, base: readonly [number, number], d1: number, d2: number): void {
  switch (d.kind) {
    case 'mos': d.dev.vt0 = base[0] + d1; d.dev.beta = base[1] * (1 + d2); return;
    case 'bjt': d.dev.is = base[0] * (1 + d1); d.dev.bf = base[1] * (1 + d2); return;
    default: assertNever(d);
  }
}

/** The nodes the main current flows between, through the device: [from, to] (MOSFET: drain,
 *  source; bipolar: collector, emitter). */
export function currentNodes(d: DeviceElement): [number, number] {
  switch (d.kind) {
    case 'mos': return [d.d, d.s];
    case 'bjt': return [d.c, d.e];
    default: return assertNever(d);
  }
}

/** The node that sets the main current (gate, base): its drop to the source or emitter is the
 *  device's own VGS or VBE. */
export function controlNode(d: DeviceElement): number {
  switch (d.kind) {
    case 'mos': return d.g;
    case 'bjt': return d.b;
    default: return assertNever(d);
  }
}

/** Whether the terminal at node k is where the main current flows (compliance: a device whose
 *  drain or source is the output moves one-for-one with it). */
export function carriesNode(d: DeviceElement, k: number): boolean {
  const [a, b] = currentNodes(d);
  return a === k || b === k;
}

const evalScratch = newChannelEval();
const bjtScratch = newBipolarEval();

/** A, the device's main current in its own polarity (positive when it conducts as wired: drain
 *  to source for NMOS, source to drain for PMOS) at node voltages v. */
export function channelCurrent(d: DeviceElement, v: Float64Array): number {
  switch (d.kind) {
    case 'mos': {
      const vs = v[d.s]!;
      evalTerminal(d.dev, v[d.g]! - vs, v[d.d]! - vs, v[d.b]! - vs, evalScratch);
      return d.dev.sign * evalScratch.id;
    }
    case 'bjt': {
      const [vbe, vbc] = bjtFrame(d, v);
      evalBipolar(d.dev, vbe, vbc, bjtScratch);
      return bjtScratch.ic;
    }
    default: return assertNever(d);
  }
}

/**
 * The device's controlled source as the nodal equations see it: the current from `from` to `to`
 * (currentNodes) grows by `g`·(v_ctrl − v_ref) (MOSFET: gm, gate over source; bipolar: gm, base
 * over emitter). The loop gain is
 * the return difference of this one term (analysis/loop-gain.ts).
 */
export function controlledSource(d: DeviceElement, v: Float64Array): { g: number; ctrl: number; ref: number } {
  switch (d.kind) {
    case 'mos': {
      const vs = v[d.s]!;
      evalTerminal(d.dev, v[d.g]! - vs, v[d.d]! - vs, v[d.b]! - vs, evalScratch);
      return { g: evalScratch.gm, ctrl: d.g, ref: d.s };
    }
    case 'bjt': {
      const [vbe, vbc] = bjtFrame(d, v);
      evalBipolar(d.dev, vbe, vbc, bjtScratch);
      return { g: bjtScratch.dicVbe, ctrl: d.b, ref: d.e };
    }
    default: return assertNever(d);
  }
}

/**
 * The device's cutoff condition, linear in node voltages, for the zero-current state test
 * (analysis/zero-state.ts): it is off while v[ctrl] − v[ref] ≤ `bound` (MOSFET: VGS ≤ VT0 for
 * NMOS, VSG ≤ |VT0| for PMOS; VT0 without body effect, the lowest threshold a bulk at its rail
 * gives, so a state found off here is off for every body bias. Bipolar: VBE ≤ UT·ln(1001), VEB
 * for PNP, where IC is 1000·IS, negligible: models/bipolar.ts, CUTOFF_IS, says why).
 */
export function cutoffBound(d: DeviceElement): { ctrl: number; ref: number; bound: number } {
  switch (d.kind) {
    case 'mos':
      return d.dev.sign > 0 ? { ctrl: d.g, ref: d.s, bound: d.dev.vt0 } : { ctrl: d.s, ref: d.g, bound: d.dev.vt0 };
    case 'bjt': {
      // A junction has no threshold: off up to the VBE at which IC reaches the cutoff current
      // of the region report (models/bipolar.ts, CUTOFF_IS: the one bipolar off rule).
      const bound = vbeCutoff(d.dev);
      return d.dev.sign > 0 ? { ctrl: d.b, ref: d.e, bound } : { ctrl: d.e, ref: d.b, bound };
    }
    default: return assertNever(d);
  }
}
