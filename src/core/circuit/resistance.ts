/** A resistor's value as a circuit is built: its corner (scale or tolerance edge) and its
 *  temperature coefficient, R(T) = R·(1 + tc1·(T − Tnom)) (design §14). */
import type { ProcessSpec, ResistorDrift } from '../types';

/** What a resistor's value at any temperature follows from: Ω at tnom after its corner, and tc1
 *  (1/K). Kept on the element, so the same circuit can be taken to another temperature
 *  (temperature.ts) without being built again. */
export interface ResistorLaw { r: number; tc1: number; tnom: number }

export function resistorLaw(r: number, drift: ResistorDrift, process: Pick<ProcessSpec, 'tnom' | 'resistors'>): ResistorLaw {
  let x = r;
  const c = process.resistors;
  if (c && 'scale' in c) x *= 1 + c.scale;
  else if (c && drift.tolerance !== undefined) x *= c.edge === 'max' ? 1 + drift.tolerance : 1 - drift.tolerance;
  return { r: x, tc1: drift.tc1 ?? 0, tnom: process.tnom };
}

/** Ω at temperature T (K). */
export function resistanceOf(law: ResistorLaw, temperature: number): number {
  return law.r * (1 + law.tc1 * (temperature - law.tnom));
}
