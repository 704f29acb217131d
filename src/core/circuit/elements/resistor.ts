/** The resistor's stamp: g·(va − vb) leaves node a and enters node b. */
import { BOLTZMANN } from '../../defaults';
import type { Workspace } from '../workspace';
import type { NoiseSources } from './noise';
import type { ResistorElement } from './element';

/** Jacobian entries, in slot order: (a,a), (a,b), (b,a), (b,b). */
export function resistorPattern(r: ResistorElement, add: (row: number, col: number) => void): void {
  add(r.a, r.a); add(r.a, r.b); add(r.b, r.a); add(r.b, r.b);
}

export function loadResistor(r: ResistorElement, ws: Workspace): void {
  const { v, F, G, absI } = ws;
  const { a, b, g } = r;
  const i = g * (v[a]! - v[b]!);
  F[a] = F[a]! + i; F[b] = F[b]! - i;
  const ai = Math.abs(i);
  absI[a] = absI[a]! + ai; absI[b] = absI[b]! + ai;
  const sl = ws.slots, k = r.slot;
  const aa = sl[k]!, ab = sl[k + 1]!, ba = sl[k + 2]!, bb = sl[k + 3]!;
  G[aa] = G[aa]! + g; G[ab] = G[ab]! - g;
  G[ba] = G[ba]! - g; G[bb] = G[bb]! + g;
}

/** A, the current from a to b at v. */
export function resistorCurrent(r: ResistorElement, v: Float64Array): number {
  return r.g * (v[r.a]! - v[r.b]!);
}

/** Its thermal noise, 4kT/R (A²/Hz), a current between a and b (design §12). */
export function resistorNoise(r: ResistorElement, temperature: number, out: NoiseSources): void {
  if (r.g > 0) out.add(r.name, r.a, r.b, 4 * BOLTZMANN * temperature * r.g, 0);
}
