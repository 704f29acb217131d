/**
 * A bias network sampled as one circuit (src/core/network/sampling.ts, design §9.1): one solve
 * per sample read at every output of the group. Check values: the group's circuit built for one
 * output at a time (joint.ts's `buildJoint` with that output measured, the way each output was
 * sampled before) — the same nodes, the same solution to the last bit, nominal and perturbed,
 * the same devices counted for saturation, the same output and input currents. Exact equality:
 * the two are the same equations solved in the same order (common practice for a refactoring
 * that must keep every figure).
 */
import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { resolveText } from '../../src/core/resolve';
import { networkGroups } from '../../src/core/network/groups';
import { buildJoint, key, outputCurrentOf } from '../../src/core/network/joint';
import { networkSampling } from '../../src/core/network/sampling';
import { outputCurrent, solveMirror } from '../../src/core/analysis/solve';
import { deviceSigmas, mismatchBase, setMismatch } from '../../src/core/circuit/elements/device';
import { Xoshiro128 } from '../../src/core/variation/prng';
import { indexOf } from '../../src/core/mirror-at';
import type { MirrorCircuit } from '../../src/core/circuit/mirrorCircuit';
import { EXAMPLE_PATH, exampleTables } from '../example-tables';

const spec = resolveText(readFileSync(EXAMPLE_PATH, 'utf8'), 'sensor-afe.bias.yaml', { tables: exampleTables() }).parsed.spec!;

/** The same random mismatch on every device of both circuits (same device order), drawn from
 *  the nominal parameters (`bases`); seed 0: none. */
function perturb(a: MirrorCircuit, b: MirrorCircuit, bases: [number, number][], seed: number): void {
  const rng = Xoshiro128.fromSeed(seed);
  a.circuit.devices.forEach((d, k) => {
    const s = deviceSigmas(d);
    const d1 = seed && s ? s[0] * rng.nextGaussian() : 0, d2 = seed && s ? s[1] * rng.nextGaussian() : 0;
    setMismatch(d, bases[k]!, d1, d2);
    setMismatch(b.circuit.devices[k]!, bases[k]!, d1, d2);
  });
}

describe('a network sampled as one circuit equals the circuit built for each output', () => {
  const groups = networkGroups(spec);
  it('the example has networks with linked and leaf outputs, a compliance requirement among them', () => {
    expect(groups.length).toBeGreaterThan(0);
    const outs = groups.flatMap((g) => networkSampling(spec, indexOf(g.root))!.outputs);
    expect(outs.some((o) => o.node === undefined)).toBe(true);
    expect(outs.some((o) => o.node !== undefined)).toBe(true);
  });

  for (const g of groups) {
    it(`network of ${g.root.name}: nodes, solutions, counted devices and currents, output by output`, () => {
      const s = networkSampling(spec, indexOf(g.root))!;
      expect(s.outputs.length).toBe(g.members.reduce((n, m) => n + m.outputs.length, 0));
      const xNom = solveMirror(s.mc);
      expect(xNom.converged).toBe(true);
      const nominal = Float64Array.from(s.mc.ws.v);
      const bases = s.mc.circuit.devices.map(mismatchBase);
      for (const o of s.outputs) {
        const one = buildJoint(spec, g, undefined, { mirror: o.mirrorIndex, output: o.outputIndex });
        expect(one.mc.circuit.nodeNames).toEqual(s.mc.circuit.nodeNames);
        const counted = one.mc.circuit.devices.flatMap((d, k) => (d.measured ? [k] : []));
        expect(o.counted).toEqual(counted);
        const k = key(o.mirrorIndex, o.outputIndex);
        expect(o.node === undefined).toBe(one.linkNode.has(k));
        let atNominal = NaN;
        for (const seed of [0, 1, 2]) {
          perturb(s.mc, one.mc, bases, seed);
          const ra = solveMirror(s.mc, nominal), rb = solveMirror(one.mc, nominal);
          expect(ra.converged).toBe(rb.converged);
          expect(Array.from(s.mc.ws.v)).toEqual(Array.from(one.mc.ws.v));
          expect(o.iout()).toBe(o.node === undefined ? outputCurrentOf(one, k) : outputCurrent(one.mc));
          expect(o.iin()).toBe(one.mc.iin());
          if (seed === 0) atNominal = o.iout();
          else expect(o.iout()).not.toBe(atNominal);  // the draw moved this output
        }
        perturb(s.mc, one.mc, bases, 0);
      }
    });
  }
});
