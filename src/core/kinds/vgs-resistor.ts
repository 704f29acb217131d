/**
 * VGS-over-resistor reference: `ref`'s gate sits on node a, across the resistor `rs` to the
 * rail, so I = VGS_ref(I)/R; `follow` (gate on ref's drain b, source on a) carries that current
 * up to the closing mirror of the other polarity (`topd` diode-connected at y, `top` feeding b),
 * which returns it to `ref`. Gray, Hurst, Lewis and Meyer, Analysis and Design of Analog
 * Integrated Circuits, 5th ed., §4.4.2 (the MOS form of the VBE-referenced cell; from memory).
 * Each tap `out` copies `ref` (gate on a) into its own output node.
 */
import type { KindSpec } from './kind';
import { singleRout } from './single-rout';

export const vgsResistor: KindSpec = {
  roles: ['ref', 'follow', 'top', 'topd', 'out'],
  outputRoles: ['out'],
  reference: {
    ref: { d: 'b', g: 'a', s: 'R' },
    follow: { d: 'y', g: 'b', s: 'a' },
    top: { d: 'b', g: 'y', s: 'T', other: true },
    topd: { d: 'y', g: 'y', s: 'T', other: true },
  },
  output: { out: { d: 'O', g: 'a', s: 'R' } },
  loop: {
    resistors: { rs: { a: 'a', b: 'R' } },
    breakAt: 'top',
    startup: { d: 'y', g: 'y', s: 'b' },
    current: 'VGS_ref(I)/R',
  },
  inputNode: 'b',
  inputStack: ['ref'],
  pair: { ref: 'ref', out: 'out' },
  bank: true,
  vbias: false,
  families: ['mosfet'],
  rout: singleRout,
};
