/** The output resistance of a cascoded output pair (`out` under `outc`), shared by the cascode
 *  and the wide-swing mirror: the cascode multiplies ro_out by its intrinsic gain, body effect
 *  included. Razavi, Design of Analog CMOS Integrated Circuits, 2nd ed., §3.5 (from memory). */
import { ro, type KindSpec } from './kind';

export const cascodeRout: KindSpec['rout'] = {
  formula: 'ro_out + ro_outc + (gm_outc + gmb_outc)·ro_outc·ro_out',
  value: ({ out, outc }) => {
    if (!out || !outc) return undefined;
    const r1 = ro(out), r2 = ro(outc);
    return r1 + r2 + (outc.gm + outc.gmb) * r1 * r2;
  },
};
