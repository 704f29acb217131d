/**
 * What Newton and the small-signal analysis see of the elements: one pattern and one load per
 * kind, dispatched by exhaustive switches.
 */
import type { Workspace } from '../workspace';
import { bjtPattern, loadBjt } from './bjt';
import { loadCurrentSource } from './currentSource';
import { assertNever, type CircuitElement } from './element';
import { loadMos, mosPattern } from './mosfet';
import { loadResistor, resistorPattern } from './resistor';

/** Declare the element's Jacobian entries (row, col) in the order its load fills its slots. */
export function patternOf(e: CircuitElement, add: (row: number, col: number) => void): void {
  switch (e.kind) {
    case 'mos': mosPattern(e, add); return;
    case 'bjt': bjtPattern(e, add); return;
    case 'resistor': resistorPattern(e, add); return;
    case 'current': return;            // a constant: no derivatives
    case 'voltage': return;            // holds its node, which is no unknown
    case 'capacitor': return;          // open at DC; the noise analysis stamps jωC itself
    default: assertNever(e);
  }
}

/** Whether the element owns Jacobian slots (and so takes a `slot` offset). */
export function hasSlots(e: CircuitElement): e is Extract<CircuitElement, { slot: number }> {
  switch (e.kind) {
    case 'mos': case 'bjt': case 'resistor': return true;
    case 'current': case 'voltage': case 'capacitor': return false;
    default: return assertNever(e);
  }
}

/** Add the element's currents to ws.F and their derivatives to ws.G at ws.v. `alpha` scales
 *  independent sources (source stepping); `gmin` (S) sits across every channel. */
export function loadElement(e: CircuitElement, ws: Workspace, alpha: number, gmin: number): void {
  switch (e.kind) {
    case 'mos': loadMos(e, ws, gmin); return;
    case 'bjt': loadBjt(e, ws, gmin); return;
    case 'resistor': loadResistor(e, ws); return;
    case 'current': loadCurrentSource(e, ws, alpha); return;
    case 'voltage': return;            // its node's voltage is set by the solver (setHeld)
    case 'capacitor': return;          // no DC current
    default: assertNever(e);
  }
}
