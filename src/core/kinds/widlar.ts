/**
 * Widlar mirror (bipolar): `ref` diode-connected on the input node, `out` on its base with the
 * resistor `degeneration:` in its emitter, so VBE_ref − VBE_out = IOUT·R: a small output current
 * from a large input, IOUT·R = UT·ln(IIN/IOUT) for equal devices without base currents. The
 * emitter resistor raises Rout to ro·(1 + gm·(RE ∥ rπ)) (Gray, Hurst, Lewis and Meyer, Analysis
 * and Design of Analog Integrated Circuits, 5th ed., §4.4.1, from memory; docs/references.md §12).
 */
import { ro, type KindSpec } from './kind';

export const widlar: KindSpec = {
  roles: ['ref', 'out'],
  outputRoles: ['out'],
  reference: { ref: { d: 'a', g: 'a', s: 'R' } },
  output: { out: { d: 'O', g: 'a', s: 'e' } },
  inputNode: 'a',
  inputStack: ['ref'],
  pair: { ref: 'ref', out: 'out' },
  // The resistor belongs to the one output: a bank would need one per output.
  bank: false,
  vbias: false,
  families: ['bipolar'],
  degeneration: 'e',
  rout: {
    formula: 'ro_out·(1 + gm_out·(RE ∥ rπ_out))',
    value: ({ out }, { degeneration }) => {
      if (!out || out.rpi === undefined || degeneration === undefined) return undefined;
      const par = (degeneration * out.rpi) / (degeneration + out.rpi);
      return ro(out) * (1 + out.gm * par);
    },
  },
};
