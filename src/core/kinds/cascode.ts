/** Cascode mirror: two stacked diodes (`ref` at node a, `refc` at the input node b) drive the
 *  output pair `out` and its cascode `outc`. */
import type { KindSpec } from './kind';
import { bipolarCascodeRout, cascodeRout } from './cascode-rout';

export const cascode: KindSpec = {
  roles: ['ref', 'refc', 'out', 'outc'],
  outputRoles: ['out', 'outc'],
  reference: { ref: { d: 'a', g: 'a', s: 'R' }, refc: { d: 'b', g: 'b', s: 'a' } },
  output: { out: { d: 'C', g: 'a', s: 'R' }, outc: { d: 'O', g: 'b', s: 'C' } },
  inputNode: 'b',
  inputStack: ['ref', 'refc'],
  pair: { ref: 'ref', out: 'out' },
  bank: true,
  vbias: false,
  families: ['mosfet', 'bipolar'],
  rout: cascodeRout,
  bipolarRout: bipolarCascodeRout,
};
