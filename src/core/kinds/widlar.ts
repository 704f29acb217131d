/**
 * Widlar mirror (bipolar): `ref` diode-connected on the input node, `out` on its base with the
 * resistor `degeneration:` in its emitter, so VBE_ref − VBE_out = IOUT·R: a small output current
 * from a large input, IOUT·R = UT·ln(IIN/IOUT) for equal devices without base currents. The
 * emitter resistor raises Rout to ro·(1 + gm·(RE ∥ rπ)) (Gray, Hurst, Lewis and Meyer, Analysis
 * and Design of Analog Integrated Circuits, 5th ed., §4.4.1, from memory; docs/references.md §12).
 */
import { ro, type KindSpec } from './kind';

export const widlar: KindSpec = {
  roles: ['ref', 'out'],
  outputRoles: ['out'],
  reference: { ref: { d: 'a', g: 'a', s: 'R' } },
  output: { out: { d: 'O', g: 'a', s: 'e' } },
  inputNode: 'a',
  inputStack: ['ref'],
  pair: { ref: 'ref', out: 'out' },
  // The resistor belongs to the one output: a bank would need one per output.
  bank: false,
  vbias: false,
  families: ['bipolar'],
  degeneration: 'e',
  rout: {
    formula: 'ro_out·(1 + gm_out·(RE ∥ rπ_out))',
    value: ({ out }, { degeneration }) => {
      if (!out || out.rpi === undefined || degeneration === undefined) return undefined;
      const par = (degeneration * out.rpi) / (degeneration + out.rpi);
      return ro(out) * (1 + out.gm * par);
    },
  },
};

/**
 * The ratio x = IOUT/IIN the Widlar law gives with ideal devices (no base current, no Early
 * effect): x·IIN·R = UT·ln(n/x), n the emitter-area ratio out/ref (Gray et al. §4.4.1, from
 * memory; docs/references.md §12). This is what a Widlar is designed to deliver, so its error
 * is read against it, not against n. Newton on u = ln x from u = ln n: f(u) = IIN·R·e^u −
 * UT·(ln n − u) is increasing and convex, so the iterates fall monotonically onto the one root.
 */
export function widlarRatio(n: number, iin: number, r: number, ut: number): number | undefined {
  if (!(n > 0 && iin > 0 && r > 0 && ut > 0) || !Number.isFinite(n * iin * r)) return undefined;
  const a = iin * r, ln = Math.log(n);
  let u = ln;
  for (let k = 0; k < 200; k++) {
    const e = a * Math.exp(u);
    const step = (e - ut * (ln - u)) / (e + ut);
    u -= step;
    if (Math.abs(step) < 1e-15) break;
  }
  const x = Math.exp(u);
  return Number.isFinite(x) ? x : undefined;
}
