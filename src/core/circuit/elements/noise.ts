/**
 * What noise each element carries, as current sources between two nodes: each element module
 * states its own (mosfet.ts, bjt.ts, resistor.ts); ideal sources and capacitors are noiseless. The
 * analysis that carries them to the output is analysis/noise.ts.
 */
import type { ChannelEval } from '../../models/core';
import { assertNever, type CircuitElement } from './element';
import { bjtNoise } from './bjt';
import { mosNoise } from './mosfet';
import { resistorNoise } from './resistor';

/** A noise current flowing from node `from` to node `to` through its element: PSD
 *  white + flicker/f (A²/Hz, flicker in A²). */
export interface NoiseSource { element: string; from: number; to: number; white: number; flicker: number }

/** Append the element's noise sources at node voltages v and temperature (K). */
export function elementNoise(e: CircuitElement, v: Float64Array, ch: ChannelEval, temperature: number, out: NoiseSource[]): void {
  switch (e.kind) {
    case 'mos': mosNoise(e, v, ch, temperature, out); return;
    case 'bjt': bjtNoise(e, v, out); return;
    case 'resistor': resistorNoise(e, temperature, out); return;
    case 'current': return;    // ideal: the input current carries no noise of its own
    case 'voltage': return;
    case 'capacitor': return;
    default: assertNever(e);
  }
}
