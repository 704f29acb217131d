/**
 * Balanced (four-transistor) Wilson: a diode `bal` between node x and `in`'s drain z gives `in`
 * the VDS of `diode`, removing the Wilson's VDS mismatch (Gray, Hurst, Lewis and Meyer, Analysis
 * and Design of Analog Integrated Circuits, 5th ed., ch. 4, from memory).
 */
import type { KindSpec } from './kind';
import { wilsonRout } from './wilson';

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
  families: ['mosfet'],
  rout: {
    formula: 'gm_out·ro_out·ro_in·gm_in/gm_diode',
    value: ({ out, in: inDev, diode }) => wilsonRout(out, inDev, diode),
  },
};
