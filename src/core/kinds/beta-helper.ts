/**
 * Beta-helper mirror (bipolar): a buffer device `helper`, its collector at the opposite supply,
 * its base on the input node and its emitter on the mirror's bases, supplies the base currents,
 * so the input loses only their 1/(β + 1) share: ratio 1/(1 + 2/(β·(β + 1))) for a 1:1 pair
 * (docs/references.md §12; Gray, Hurst, Lewis and Meyer, Analysis and Design of Analog
 * Integrated Circuits, 5th ed., ch. 4, from memory). Rout is the output device's ro.
 */
import type { KindSpec } from './kind';
import { bipolarSingleRout } from './single-rout';

export const betaHelper: KindSpec = {
  roles: ['ref', 'out', 'helper'],
  outputRoles: ['out'],
  reference: { ref: { d: 'a', g: 'b', s: 'R' }, helper: { d: 'T', g: 'a', s: 'b' } },
  output: { out: { d: 'O', g: 'b', s: 'R' } },
  inputNode: 'a',
  inputStack: ['ref'],
  pair: { ref: 'ref', out: 'out' },
  bank: true,
  vbias: false,
  families: ['bipolar'],
  rout: bipolarSingleRout,
};
