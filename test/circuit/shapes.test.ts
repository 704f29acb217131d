/**
 * Mirrors of one shape share a build within a spec (src/core/circuit/shapes.ts): a mirror measured
 * after another of its shape gets the figures it gets measured alone in a spec of its own — the
 * reference is the engine's own build of that mirror, compared whole (every figure, bit for bit).
 */
import { describe, expect, it } from 'vitest';
import { analyzeSpec } from '../../src/core/analysis/index';
import { runMonteCarlo } from '../../src/core/variation/montecarlo';
import type { ResolvedMirror, TemplateMirror } from '../../src/core/types';
import { makeSpec, sz, template } from '../analysis/builders';

function at(i: number, m: TemplateMirror): ResolvedMirror {
  return {
    ...m, path: ['mirrors', i],
    outputs: m.outputs.map((o, j) => ({ ...o, path: m.outputs.length > 1 ? ['mirrors', i, 'outputs', j] : ['mirrors', i] })),
  };
}

const bank = (name: string, input: number, va: number, vb: number, w = 4e-6): TemplateMirror =>
  template('cascode', { name, input, size: sz(w, 1e-6), vout: va, outputs: [{ name: 'a', v: va }, { name: 'b', v: vb }] });

describe('mirrors of one shape', () => {
  const first = bank('first', 20e-6, 1.2, 1.5);
  // The same shape: another input current and other held voltages.
  const second = bank('second', 35e-6, 0.9, 1.1);
  // Another shape: another width.
  const third = bank('third', 35e-6, 0.9, 1.1, 5e-6);

  it('give each mirror the figures of its own build', () => {
    const together = analyzeSpec(makeSpec([at(0, first), at(1, second), at(2, third)], { vdd: 1.8 }), { repeats: false });
    for (const [k, m] of [first, second, third].entries()) {
      const alone = analyzeSpec(makeSpec([at(k, m)], { vdd: 1.8 }), { repeats: false });
      expect(together.slice(2 * k, 2 * k + 2)).toEqual(alone);
    }
    // The shapes differ where the mirrors do.
    expect(together[2]!.iin).toBe(35e-6);
    expect(together[2]!.devices).not.toEqual(together[0]!.devices);
  });

  it('leave each circuit its own devices (a Monte Carlo run moves them in place)', () => {
    const spec = makeSpec([at(0, first), at(1, second)], { vdd: 1.8 });
    const before = analyzeSpec(spec, { repeats: false });
    runMonteCarlo({ spec, mirror: spec.mirrors[0]!, outputIndex: 0 }, 50, 1);
    expect(analyzeSpec(spec, { repeats: false })).toEqual(before);
  });
});
