/**
 * VBE-over-resistor reference, the bipolar twin of vgs-resistor: `ref`'s base sits on node a,
 * across the resistor `rs` to the rail, so I = VBE_ref(I)/R (about −2000 to −3000 ppm/K: VBE
 * falls with temperature); `follow` (base on ref's collector b, emitter on a) carries that
 * current up to the closing mirror of the other polarity (`topd` diode-connected at y, `top`
 * feeding b), which returns it to `ref`. Gray, Hurst, Lewis and Meyer, Analysis and Design of
 * Analog Integrated Circuits, 5th ed., §4.4.2 (from memory; docs/references.md §14). Each tap
 * `out` copies `ref` (base on a) into its own output node.
 */
import type { KindSpec } from './kind';
import { bipolarSingleRout } from './single-rout';

export const vbeResistor: KindSpec = {
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
    current: 'VBE_ref(I)/R',
  },
  inputNode: 'b',
  inputStack: ['ref'],
  pair: { ref: 'ref', out: 'out' },
  bank: true,
  vbias: false,
  families: ['bipolar'],
  rout: bipolarSingleRout,
};
