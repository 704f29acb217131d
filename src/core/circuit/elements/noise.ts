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

/** Noise currents, source i flowing from node `from[i]` to node `to[i]` through its element
 *  `element[i]`: PSD white[i] + flicker[i]/f (A²/Hz, flicker in A²). Parallel arrays rather than
 *  an object per source: a network's sources live as long as its analysis, and as objects (each
 *  with its two numbers boxed) they were tens of thousands of small objects that every
 *  young-generation collection copied until they were promoted. */
export class NoiseSources {
  readonly element: string[] = [];
  readonly from: number[] = [];
  readonly to: number[] = [];
  readonly white: number[] = [];
  readonly flicker: number[] = [];
  /** The sources are the arrays' first `length` entries (`clear` keeps what they hold: a list
   *  refilled for each output of a network grows once). */
  length = 0;

  add(element: string, from: number, to: number, white: number, flicker: number): void {
    const i = this.length++;
    if (i < this.element.length) {
      this.element[i] = element; this.from[i] = from; this.to[i] = to; this.white[i] = white; this.flicker[i] = flicker;
    } else {
      this.element.push(element); this.from.push(from); this.to.push(to); this.white.push(white); this.flicker.push(flicker);
    }
  }

  /** Append source i of `s`. */
  addFrom(s: NoiseSources, i: number): void {
    this.add(s.element[i]!, s.from[i]!, s.to[i]!, s.white[i]!, s.flicker[i]!);
  }

  clear(): void { this.length = 0; }
}

/** Append the element's noise sources at node voltages v and temperature (K). */
export function elementNoise(e: CircuitElement, v: Float64Array, ch: ChannelEval, temperature: number, out: NoiseSources): void {
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
