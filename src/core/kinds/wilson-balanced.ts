/**
 * Balanced (four-transistor) Wilson: a diode `bal` between node x and `in`'s drain z gives `in`
 * the VDS of `diode`, removing the Wilson's VDS mismatch (Gray, Hurst, Lewis and Meyer, Analysis
 * and Design of Analog Integrated Circuits, 5th ed., ch. 4, from memory).
 *
 * Its textbook Rout is the Wilson's (wilson.ts) with one more factor. The feedback loop now runs
 * through `bal`: with an ideal input source no signal current flows in x, so none flows in `bal`
 * or `in`; `in` holds vz = −gm_in·ro_in·vy, and `bal` (its bulk on the rail, its source on z)
 * passes it to x as vx = vz·(1 + gmb_bal/(gm_bal + gds_bal)), because vz moves bal's VBS as well
 * as its VGS. So `out`'s gate swings (1 + gmb_bal/gm_bal) times more than in the three-device
 * Wilson, and the loop gain, Rout with it, grows by that factor: gmb/gm = γ/(2·√(2φF + VSB)) in
 * the square law (0.16 for `bal` of a 0.5 µm level-1 set at 100 µA), n − 1 under EKV (0.3).
 * Nodal analysis of the small-signal circuit gives the exact result (docs/references.md §3)
 *   Rout = ro_out·[1 + (gm_out·(A + 1) + gmb_out + gds_out)/(gm_diode + gds_diode)],
 *   A = gm_in·ro_in·(1 + gmb_bal/(gm_bal + gds_bal))
 * (with A = gm_in·ro_in it is the three-device Wilson's), which reduces to the formula below when
 * every gm·ro ≫ 1. With `bulk: source` on `bal` the factor is 1.
 */
import type { KindSpec } from './kind';
import { bipolarWilsonRout, wilsonRout } from './wilson';

export const wilsonBalanced: KindSpec = {
  roles: ['in', 'diode', 'out', 'bal'],
  outputRoles: ['out'],
  reference: { in: { d: 'z', g: 'y', s: 'R' }, diode: { d: 'y', g: 'y', s: 'R' }, bal: { d: 'x', g: 'x', s: 'z' } },
  output: { out: { d: 'O', g: 'x', s: 'y' } },
  inputNode: 'x',
  inputStack: ['in', 'bal'],
  pair: { ref: 'in', out: 'diode' },
  bank: false,
  vbias: false,
  families: ['mosfet', 'bipolar'],
  bipolarRout: bipolarWilsonRout,
  rout: {
    formula: 'gm_out·ro_out·ro_in·gm_in·(1 + gmb_bal/gm_bal)/gm_diode',
    value: ({ out, in: inDev, diode, bal }) =>
      (!bal || bal.gm === 0 ? undefined : wilsonRout(out, inDev, diode, 1 + bal.gmb / bal.gm)),
  },
};
