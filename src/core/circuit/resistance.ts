/** A resistor's value as a circuit is built: its corner (scale or tolerance edge) and its
 *  temperature coefficient, R(T) = R·(1 + tc1·(T − Tnom)) (design §14). */
import type { ProcessSpec, ResistorDrift } from '../types';

export function resistanceAt(r: number, drift: ResistorDrift, process: Pick<ProcessSpec, 'temperature' | 'tnom' | 'resistors'>): number {
  let x = r;
  const c = process.resistors;
  if (c && 'scale' in c) x *= 1 + c.scale;
  else if (c && drift.tolerance !== undefined) x *= c.edge === 'max' ? 1 + drift.tolerance : 1 - drift.tolerance;
  return x * (1 + (drift.tc1 ?? 0) * (process.temperature - process.tnom));
}
