/** The output resistance of a cascoded output pair (`out` under `outc`), shared by the cascode
 *  and the wide-swing mirror: the cascode multiplies ro_out by its intrinsic gain, body effect
 *  included. Razavi, Design of Analog CMOS Integrated Circuits, 2nd ed., §3.5 (from memory). */
import { ro, type RoutFormula } from './kind';

export const cascodeRout: RoutFormula = {
  formula: 'ro_out + ro_outc + (gm_outc + gmb_outc)·ro_outc·ro_out',
  value: ({ out, outc }) => {
    if (!out || !outc) return undefined;
    const r1 = ro(out), r2 = ro(outc);
    return r1 + r2 + (outc.gm + outc.gmb) * r1 * r2;
  },
};

/** The self-biased bipolar cascode mirror: the cascode's signal base current returns through the
 *  input diodes and is mirrored into its emitter, so Rout ≈ β·ro/2, not β·ro (docs/references.md
 *  §12; Gray, Hurst, Lewis and Meyer, Analysis and Design of Analog Integrated Circuits, 5th ed.,
 *  §4.2.5, from memory). */
export const bipolarCascodeRout: RoutFormula = {
  formula: 'β_outc·ro_outc/2',
  value: ({ outc }) => (outc?.beta === undefined ? undefined : (outc.beta * ro(outc)) / 2),
};
