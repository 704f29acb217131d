/**
 * The same circuit at another temperature: every element's temperature law applied again (a
 * MOSFET's kp(T), VT(T) and U_T — a table device's slice at T —, a bipolar device's IS(T), βF(T)
 * and U_T, a resistor's tc1), its nodes, Jacobian pattern and elimination order shared with the
 * circuit it comes from — and its held voltages, the same array (a taken circuit is solved and
 * read while the one it comes from holds its output still). The elements come out exactly as a
 * circuit built at that temperature would have them, so a solve of it is the solve of the
 * rebuilt circuit, without the build (the drift figures ask for thirteen temperatures per output).
 *
 * For a circuit built without a Monte Carlo perturbation only (the device laws are applied with
 * no ΔVT, Δβ).
 */
import { prepareBipolar } from '../models/bipolar';
import { prepareDevice, type ProcessConditions } from '../models/device';
import type { Circuit } from './circuit';
import { mosWith, type CircuitElement, type DeviceElement } from './elements/element';
import { resistanceOf } from './resistance';

/** `c` with its elements at temperature `proc.temperature` (K); undefined when a resistor's
 *  value there is not a positive resistance (a build at that temperature would list a problem:
 *  the caller builds it, so the problem is reported as it always was). */
export function circuitAt(c: Circuit, proc: ProcessConditions): Circuit | undefined {
  const T = proc.temperature;
  const elements: CircuitElement[] = [];
  const devices: DeviceElement[] = [];
  for (const e of c.elements) {
    switch (e.kind) {
      // Copied field by field, not spread: V8 gives each spread copy a map of its own, and a
      // circuit of such elements is slower in every later assembly (its stamps see many maps).
      case 'mos': {
        const x = mosWith(e, prepareDevice(e.params, e.size, e.type, proc));
        elements.push(x); devices.push(x);
        break;
      }
      case 'bjt': {
        const x = Object.assign({}, e);
        x.dev = prepareBipolar(e.params, { area: e.size.area ?? 1, m: e.size.m }, e.type, T, proc.tnom);
        elements.push(x); devices.push(x);
        break;
      }
      case 'resistor': {
        if (!e.law) { elements.push(e); break; }
        const r = resistanceOf(e.law, T);
        if (!(r > 0) || !Number.isFinite(r)) return undefined;
        const x = Object.assign({}, e);
        x.g = 1 / r;
        elements.push(x);
        break;
      }
      default: elements.push(e);
    }
  }
  return { ...c, elements, devices };
}
