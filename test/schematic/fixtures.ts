/**
 * Specs for the schematic tests: the example, and every template kind in both polarities on the
 * example's process (one with a resistor input, one short of margin).
 */
import { readFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { KINDS, TEMPLATE_KINDS, type TemplateKind } from '../../src/core/kinds';

export const ROOT = resolve(__dirname, '../..');
export const EXAMPLE = 'examples/sensor-afe.bias.yaml';
export const exampleText = readFileSync(join(ROOT, EXAMPLE), 'utf8');

/** The example's header (process, supplies, limits, params) with mirrors of our own. */
function withMirrors(mirrors: string[]): string {
  // The example's process has both bipolar types (its BiCMOS option's NPN and PNP).
  const head = exampleText.slice(0, exampleText.indexOf('\nmirrors:'));
  return `${head}\nmirrors:\n${mirrors.join('\n')}\n`;
}

/** The device types a kind is built from (its families): nmos and pmos, npn and pnp. */
export const typesOf = (kind: TemplateKind): string[] =>
  KINDS[kind].families.flatMap((f) => (f === 'bipolar' ? ['npn', 'pnp'] : ['nmos', 'pmos']));

/** Every kind in both polarities of each of its families, each output well inside its
 *  compliance; a reference kind sets its own current (loop resistor, no input). */
export const everyKindText = withMirrors(TEMPLATE_KINDS.flatMap((kind) => typesOf(kind).map((type) => {
  const n = type === 'nmos' || type === 'npn';
  const bipolar = type === 'npn' || type === 'pnp';
  const loop = KINDS[kind].loop !== undefined;
  return [
    `  - name: ${kind.replace('-', '_')}_${type}`,
    `    kind: ${kind}`,
    `    type: ${type}`,
    // A self-biased reference sets its own current through its resistor; the others take 10 µA.
    ...(loop
      ? ['    resistor: 60k', '    startup: { w: 0.5u, l: 4u }', ...(KINDS[kind].loop?.scaled ? [`    k: ${bipolar ? 8 : 4}`] : [])]
      : ['    input: 10u']),
    ...(bipolar ? [] : [`    size: { w: ${n ? '8u' : '24u'}, l: 1u }`]),
    ...(KINDS[kind].degeneration !== undefined ? ['    degeneration: 5k'] : []),
    `    output: { v: ${n ? 1.3 : 0.5} }`,
  ].join('\n');
})).concat([
  '  - name: res_pmos',
  '    kind: simple',
  '    type: pmos',
  '    input: { resistor: 100k }',
  '    size: { w: 24u, l: 1u }',
  '    output: { v: 0.6 }',
  // The output pulled down near vss: the output device leaves saturation.
  '  - name: starved',
  '    kind: simple',
  '    type: nmos',
  '    input: 10u',
  '    size: { w: 8u, l: 1u }',
  '    output: { v: 0.05 }',
  // Saturated, but within limits.margin of the edge.
  '  - name: tight',
  '    kind: simple',
  '    type: nmos',
  '    input: 10u',
  '    size: { w: 8u, l: 1u }',
  '    output: { v: 0.15 }',
]));
