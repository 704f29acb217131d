/** Wide-swing cascode: the cascodes' gates sit at `vbias`, so `ref` and `out` run at a VDS
 *  just above VDSsat; `ref`'s gate is on the input node b. */
import type { KindSpec } from './kind';
import { cascodeRout } from './cascode-rout';

export const wideSwing: KindSpec = {
  roles: ['ref', 'refc', 'out', 'outc'],
  outputRoles: ['out', 'outc'],
  // refc first: the devices are built, and reported, in this order.
  reference: { refc: { d: 'b', g: 'vbias', s: 'a' }, ref: { d: 'a', g: 'b', s: 'R' } },
  output: { out: { d: 'C', g: 'b', s: 'R' }, outc: { d: 'O', g: 'vbias', s: 'C' } },
  inputNode: 'b',
  inputStack: ['ref', 'refc'],
  pair: { ref: 'ref', out: 'out' },
  bank: true,
  vbias: true,
  families: ['mosfet'],
  rout: cascodeRout,
};
