/**
 * Wilson mirror: `in` takes the input current at node x and drives `out`'s gate; `out` feeds
 * the diode at y, which sets `in`'s gate. The feedback through `in` raises Rout to
 *   gm_out·ro_out·ro_in·gm_in/gm_diode,
 * the first-order form of the exact small-signal result (its other terms are 1/(gm·ro) smaller;
 * the diode's own ro drops out). Rout ≈ gm·ro² for equal devices: Gray, Hurst, Lewis and Meyer,
 * Analysis and Design of Analog Integrated Circuits, 5th ed., ch. 4 (from memory).
 */
import { ro, type KindSpec, type RoutFormula, type SmallSignal } from './kind';

/** The Wilson's first-order Rout, with the gain of `in`'s feedback scaled by `feedback`. */
export function wilsonRout(out: SmallSignal | undefined, inDev: SmallSignal | undefined, diode: SmallSignal | undefined, feedback = 1): number | undefined {
  if (!out || !inDev || !diode || diode.gm === 0) return undefined;
  return (out.gm * ro(out) * ro(inDev) * inDev.gm * feedback) / diode.gm;
}

/** The bipolar Wilson (three or four devices): the output device's signal base current is
 *  what the feedback cannot hold, so Rout ≈ β·ro/2 (docs/references.md §12; Sedra and Smith,
 *  Microelectronic Circuits, the Wilson mirror, from memory). */
export const bipolarWilsonRout: RoutFormula = {
  formula: 'β_out·ro_out/2',
  value: ({ out }) => (out?.beta === undefined ? undefined : (out.beta * ro(out)) / 2),
};

export const wilson: KindSpec = {
  roles: ['in', 'diode', 'out'],
  outputRoles: ['out'],
  reference: { in: { d: 'x', g: 'y', s: 'R' }, diode: { d: 'y', g: 'y', s: 'R' } },
  output: { out: { d: 'O', g: 'x', s: 'y' } },
  inputNode: 'x',
  inputStack: ['in'],
  pair: { ref: 'in', out: 'diode' },
  // The output current returns through the shared diode: one output only.
  bank: false,
  vbias: false,
  families: ['mosfet', 'bipolar'],
  rout: {
    formula: 'gm_out·ro_out·ro_in·gm_in/gm_diode',
    value: ({ out, in: inDev, diode }) => wilsonRout(out, inDev, diode),
  },
  bipolarRout: bipolarWilsonRout,
};
