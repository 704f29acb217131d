/** Simple mirror: `ref` diode-connected on the input node, `out` on its gate. */
import type { KindSpec } from './kind';
import { bipolarSingleRout, singleRout } from './single-rout';

export const simple: KindSpec = {
  roles: ['ref', 'out'],
  outputRoles: ['out'],
  reference: { ref: { d: 'a', g: 'a', s: 'R' } },
  output: { out: { d: 'O', g: 'a', s: 'R' } },
  inputNode: 'a',
  inputStack: ['ref'],
  pair: { ref: 'ref', out: 'out' },
  bank: true,
  vbias: false,
  families: ['mosfet', 'bipolar'],
  rout: singleRout,
  bipolarRout: bipolarSingleRout,
};
