/**
 * A root fed by a reference (design §9.2): the network's Newton guess and the intended inputs
 * start from the reference's own solved current, not a placeholder. Check values: the same
 * reference analysed alone by the code (its iin: the current of `ref`, which the taps copy), and
 * the linked child's arriving current against it (a tap copies ref 1:1 up to its λ at its own
 * VDS — Gray, Hurst, Lewis and Meyer, Analysis and Design of Analog Integrated Circuits, 5th ed.,
 * §4.2.2, the simple mirror's VDS error).
 */
import { describe, expect, it } from 'vitest';
import { analyzeText } from '../../src/core/analyze';
import { resolveText } from '../../src/core/resolve';
import { REFERENCE_FALLBACK, rootStartCurrent } from '../../src/core/network/root-current';
import type { TemplateMirror } from '../../src/core/types';
import { header } from './helpers';

const rel = (a: number, b: number): number => Math.abs(a / b - 1);

/** An nmos VGS-over-R reference with the resistor `r` (about 0.7 V / r). */
const reference = (r: string): string[] => [
  '  - name: vref',
  '    kind: vgs-resistor',
  '    type: nmos',
  '    size: { w: 4u, l: 2u }',
  `    resistor: ${r}`,
  '    devices: { follow: { w: 16u, bulk: source }, top: { w: 32u }, topd: { w: 32u } }',
  '    startup: { w: 0.5u, l: 4u }',
];

/** The reference's one tap feeding a pmos mirror. */
const text = (r: string): string => header([
  ...reference(r),
  '  - name: load',
  '    kind: simple',
  '    type: pmos',
  '    input: { from: vref }',
  '    size: { w: 16u, l: 2u }',
  '    output: { v: 0.6 }',
]);

/** The reference alone, its tap at a typical node voltage. */
const ALONE = (r: string): string => header([...reference(r), '    output: { v: 1.2 }']);

// Far from the 10 µA placeholder on either side: about 100 µA and 1 µA.
describe.each([['6.8k'], ['680k']])('a vgs-resistor root with R = %s', (r) => {
  const alone = analyzeText(ALONE(r), 'alone.bias.yaml').mirrors.find((m) => m.name === 'vref')!;
  const spec = resolveText(text(r), 'net.bias.yaml', {}).parsed.spec!;
  const root = spec.mirrors.find((m) => m.name === 'vref') as TemplateMirror;
  const net = analyzeText(text(r), 'net.bias.yaml');
  const load = net.mirrors.find((m) => m.name === 'load')!;

  it('the start current is the reference solved alone, not the 10 µA placeholder', () => {
    expect(alone.converged).toBe(true);
    expect(rel(rootStartCurrent(spec, root), alone.iin!)).toBeLessThan(1e-6);
    expect(rel(rootStartCurrent(spec, root), REFERENCE_FALLBACK)).toBeGreaterThan(0.2);
  });
  it('the network solves, and the current arriving at the child is the tap\'s copy of it', () => {
    expect(net.networks![0]!.converged).toBe(true);
    expect(load.converged).toBe(true);
    // Within 3 %: the tap sits at the child's VSG, not ref's VDS (λ = 0.1/V·µm ÷ 2 µm × ~0.3 V).
    expect(rel(load.iin!, alone.iin!)).toBeLessThan(0.03);
  });
});
