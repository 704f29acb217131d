/**
 * A circuit taken to another temperature (circuit/temperature.ts) is the circuit built there:
 * every element's temperature law applied again (docs/design.md §12; R(T) = R·(1 + tc1·(T − Tnom))
 * from §14), so the drift figures computed from it are those of a build per temperature. Checked
 * element by element and through the assembled equations (F and G, exactly) on every mirror of
 * the example (every kind, a table flavour, bipolar devices, an input resistor with tc1) and on a
 * netlist with a tc1 resistor at a resistor corner, across the example's trange; and each bias
 * network's joint circuit (network/joint.ts), which its members' drift takes across trange too.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { assemble } from '../../src/core/circuit/assemble';
import type { Circuit } from '../../src/core/circuit/circuit';
import { circuitAt } from '../../src/core/circuit/temperature';
import { Workspace } from '../../src/core/circuit/workspace';
import { buildMirror, nominalVout, solveMirror, type MirrorTarget } from '../../src/core/analysis/solve';
import { atTemperature } from '../../src/core/analysis/drift';
import { vbiasFor } from '../../src/core/analysis/vbias';
import { networkGroups } from '../../src/core/network/groups';
import { buildJoint } from '../../src/core/network/joint';
import { resolveText } from '../../src/core/resolve';
import type { ResolvedSpec } from '../../src/core/types';
import { EXAMPLE_PATH, exampleTables } from '../example-tables';

const NETLIST = [
  'format: 1',
  'process:',
  '  nmos: { kp: 280u, vt0: 0.45 }',
  '  pmos: { kp: 70u, vt0: 0.48 }',
  '  npn: { is: 1e-16, bf: 100 }',
  'supplies: { vdd: 3 }',
  'mirrors:',
  '  - name: n',
  '    kind: netlist',
  '    type: nmos',
  '    devices:',
  '      M1: { type: nmos, d: a, g: a, s: vss, w: 4u, l: 1u }',
  '      M2: { type: nmos, d: out, g: a, s: e, w: 4u, l: 1u }',
  '      Q1: { type: npn, c: vdd, b: a, e: q, area: 2 }',
  '    resistors:',
  '      RE: { a: e, b: vss, r: 2k, tc1: 2m }',
  '      RQ: { a: q, b: vss, r: 50k, tc1: -1m }',
  '    currents:',
  '      IREF: { from: vdd, to: a, i: 10u }',
  '    input: { source: IREF }',
  '    output: { node: out, v: 1.5 }',
  '',
].join('\n');

function targets(spec: ResolvedSpec): MirrorTarget[] {
  return (spec.mirrors ?? []).flatMap((mirror) =>
    Array.from({ length: mirror.kind === 'netlist' ? 1 : mirror.outputs.length }, (_, outputIndex) => ({ spec, mirror, outputIndex })));
}

/** The taken circuit against the built one: elements, devices, held voltages, and the assembled
 *  F and G at the nominal node voltages, to the last bit. */
function same(taken: Circuit | undefined, built: Circuit, v: Float64Array, what: string): void {
  expect(taken, what).toBeDefined();
  expect(taken!.elements).toEqual(built.elements);
  expect(taken!.devices).toEqual(built.devices);
  expect(taken!.fixedV).toEqual(built.fixedV);
  const a = new Workspace(taken!), b = new Workspace(built);
  a.v.set(v); b.v.set(v);
  assemble(taken!, a, 1, 0); assemble(built, b, 1, 0);
  expect(Array.from(a.F)).toEqual(Array.from(b.F));
  expect(Array.from(a.G)).toEqual(Array.from(b.G));
}

function check(spec: ResolvedSpec, temps: number[]): number {
  let checked = 0;
  for (const t of targets(spec)) {
    const vout = nominalVout(t), vbias = vbiasFor(t)?.vbias;
    const nominal = buildMirror(t, vout, vbias);
    expect(nominal.circuit.problems).toEqual([]);
    expect(solveMirror(nominal).converged).toBe(true);
    for (const temp of temps) {
      const built = buildMirror({ ...t, spec: atTemperature(spec, temp) }, vout, vbias).circuit;
      const taken = circuitAt(nominal.circuit, { model: spec.process.model, temperature: temp, tnom: spec.process.tnom });
      same(taken, built, nominal.ws.v, `${t.mirror.name} at ${temp} K`);
      checked++;
    }
  }
  return checked;
}

describe('a circuit taken to another temperature equals the circuit built there (design §12, §14)', () => {
  it('every output of the example, across its trange and at T ± 0.5 K', () => {
    const text = readFileSync(EXAMPLE_PATH, 'utf8');
    const spec = resolveText(text, 'sensor-afe.bias.yaml', { tables: exampleTables() }).parsed.spec!;
    const [lo, hi] = spec.process.trange!;
    const T = spec.process.temperature;
    expect(check(spec, [lo, T - 0.5, T + 0.5, hi])).toBeGreaterThan(80);
  });

  it('each bias network of the example as one joint circuit, across its trange and at T ± 0.5 K', () => {
    const text = readFileSync(EXAMPLE_PATH, 'utf8');
    const spec = resolveText(text, 'sensor-afe.bias.yaml', { tables: exampleTables() }).parsed.spec!;
    const [lo, hi] = spec.process.trange!;
    const T = spec.process.temperature;
    let checked = 0;
    for (const g of networkGroups(spec)) {
      const nominal = buildJoint(spec, g);
      expect(solveMirror(nominal.mc).converged).toBe(true);
      for (const temp of [lo, T - 0.5, T + 0.5, hi]) {
        const built = buildJoint(atTemperature(spec, temp), g).mc.circuit;
        const taken = circuitAt(nominal.mc.circuit, { model: spec.process.model, temperature: temp, tnom: spec.process.tnom });
        same(taken, built, nominal.mc.ws.v, `${g.root.name}'s network at ${temp} K`);
        checked++;
      }
    }
    // root_ref's network and vbe_ref's.
    expect(checked).toBe(8);
  });

  it('a netlist with tc1 resistors and a bipolar device, nominal and at a resistor corner', () => {
    const spec = resolveText(NETLIST, 'n.bias.yaml').parsed.spec!;
    expect(check(spec, [233.15, 350, 398.15])).toBe(3);
    const corner: ResolvedSpec = { ...spec, process: { ...spec.process, resistors: { scale: 0.1 } } };
    expect(check(corner, [233.15, 350, 398.15])).toBe(3);
  });

  it('a resistor whose value is not positive at the temperature is left to a build (which reports it)', () => {
    const spec = resolveText(NETLIST, 'n.bias.yaml').parsed.spec!;
    const t = targets(spec)[0]!;
    const nominal = buildMirror(t, nominalVout(t), undefined);
    // RE's tc1 of 2m/K takes it through zero 500 K below tnom.
    const cold = spec.process.tnom - 600;
    expect(circuitAt(nominal.circuit, { model: spec.process.model, temperature: cold, tnom: spec.process.tnom })).toBeUndefined();
    expect(buildMirror({ ...t, spec: atTemperature(spec, cold) }, nominalVout(t), undefined).circuit.problems.join()).toMatch(/RE/);
  });
});
