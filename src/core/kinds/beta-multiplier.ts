/**
 * Beta multiplier (constant-gm reference): `ref` is diode-connected at x; `wide` (K times the
 * unit's width) has its gate on x and the resistor `rs` in its source; the closing 1:1 mirror of
 * the other polarity (`top` feeding x, `topd` diode-connected at y) forces both branches to one
 * current I = 2/(µCox·(W/L)·R²)·(1 − 1/√K)² (square law, no body effect). Razavi, Design of
 * Analog CMOS Integrated Circuits, 1st ed., §11.2 (docs/references.md). Each tap `out` copies
 * `ref` (gate on x) into its own output node.
 */
import type { KindSpec } from './kind';
import { singleRout } from './single-rout';

export const betaMultiplier: KindSpec = {
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
    current: '2/(µCox·(W/L)·R²)·(1 − 1/√K)²',
  },
  inputNode: 'x',
  inputStack: ['ref'],
  pair: { ref: 'ref', out: 'out' },
  bank: true,
  vbias: false,
  families: ['mosfet'],
  rout: singleRout,
};
