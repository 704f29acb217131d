/**
 * ΔVBE/R (PTAT) reference, the bipolar twin of the beta multiplier: `ref` is diode-connected at
 * x; `wide` (K times ref's emitter area, `k:`) has its base on x and the resistor `rs` in its
 * emitter; the closing 1:1 mirror of the other polarity (`top` feeding x, `topd` diode-connected
 * at y) forces one current into both branches, so VBE_ref − VBE_wide = UT·ln K = I·R and
 * I = UT·ln(K)/R, proportional to absolute temperature (a resistor without drift: +1/T). Gray,
 * Hurst, Lewis and Meyer, Analysis and Design of Analog Integrated Circuits, 5th ed., §4.4.2–4.4.3
 * (from memory; docs/references.md §14). Each tap `out` copies `ref` (base on x) into its own
 * output node.
 */
import type { KindSpec } from './kind';
import { bipolarSingleRout } from './single-rout';

export const ptat: KindSpec = {
  roles: ['ref', 'wide', 'top', 'topd', 'out'],
  outputRoles: ['out'],
  reference: {
    ref: { d: 'x', g: 'x', s: 'R' },
    wide: { d: 'y', g: 'x', s: 's' },
    top: { d: 'x', g: 'y', s: 'T', other: true },
    topd: { d: 'y', g: 'y', s: 'T', other: true },
  },
  output: { out: { d: 'O', g: 'x', s: 'R' } },
  loop: {
    resistors: { rs: { a: 's', b: 'R' } },
    breakAt: 'top',
    scaled: 'wide',
    startup: { d: 'y', g: 'y', s: 'x' },
    current: 'UT·ln(K)/R',
  },
  inputNode: 'x',
  inputStack: ['ref'],
  pair: { ref: 'ref', out: 'out' },
  bank: true,
  vbias: false,
  families: ['bipolar'],
  rout: bipolarSingleRout,
};
