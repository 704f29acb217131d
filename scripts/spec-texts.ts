/**
 * Spec texts for the benchmark and the fuzzer, on the invented "Halden 180" process: a clean
 * bias distribution of any size, and the shipped example with classic faults written in.
 */

import type { DeviceParams } from '../src/core/types';

/** The invented "Halden 180" process of the example spec, resolved (SI units), for the
 *  benchmarks that build specs without parsing them. */
export const HALDEN_NMOS: DeviceParams = {
  kp: 280e-6, vt0: 0.45, lambda: 0.08, lref: 1e-6, gamma: 0.45, phi: 0.85, n: 1.3, tcv: -1e-3, bex: -1.5,
  avt: 4e-9, abeta: 1e-8, lmin: 0.18e-6, wmin: 0.22e-6,
};
export const HALDEN_PMOS: DeviceParams = {
  kp: 70e-6, vt0: 0.48, lambda: 0.1, lref: 1e-6, gamma: 0.4, phi: 0.8, n: 1.35, tcv: -1.2e-3, bex: -1.3,
  avt: 5e-9, abeta: 1.2e-8, lmin: 0.18e-6, wmin: 0.22e-6,
};

/** The process, supplies and limits of the example spec, ending with `mirrors:`. */
export const HALDEN_HEADER = [
  'format: 1',
  'title: Kestrel bias benchmark (Halden 180)',
  'process:',
  '  model: square-law',
  '  grid: 10n',
  '  nmos: { kp: 280u, vt0: 0.45, lambda: 0.08, lref: 1u, gamma: 0.45, phi: 0.85, n: 1.3, tcv: -1m, bex: -1.5, avt: 4e-9, abeta: 1e-8, lmin: 0.18u, wmin: 0.22u }',
  '  pmos: { kp: 70u, vt0: 0.48, lambda: 0.1, lref: 1u, gamma: 0.4, phi: 0.8, n: 1.35, tcv: -1.2m, bex: -1.3, avt: 5e-9, abeta: 1.2e-8, lmin: 0.18u, wmin: 0.22u }',
  'supplies: { vdd: 1.8, vss: 0 }',
  'limits: { margin: 100m, error: 1% }',
  'params:',
  '  wn: 4u',
  '  wp: 16u',
  '  lu: 1u',
  'mirrors:',
].join('\n');

/**
 * `n` mirrors that check clean (no error or warning): NMOS and PMOS cascodes, wide-swing
 * cascodes and balanced Wilsons with their outputs where every device keeps its margin, in block
 * and flow style, some through params. About 190 characters a mirror.
 */
export function cleanSpecText(n: number, opts: { distinct?: boolean } = {}): string {
  const lines: string[] = [HALDEN_HEADER];
  for (let i = 0; i < n; i++) {
    // distinct: every mirror its own input current (no two circuits alike, analysis/repeats.ts)
    const iin = opts.distinct ? +(8 + (i % 5) * 2 + i * 0.001).toFixed(3) : 8 + (i % 5) * 2;  // µA
    const m = 1 + (i % 3);
    switch (i % 4) {
      case 0:
        lines.push(`  - name: casn_${i}`, '    kind: cascode', '    type: nmos', `    input: ${iin}u`,
          '    size: { w: wn, l: lu }', `    devices: { out: { m: ${m} }, outc: { m: ${m} } }`,
          `    output: { v: ${(1.1 + 0.05 * (i % 5)).toFixed(2)} }`, `    require: { ratio: ${m} }`);
        break;
      case 1:
        lines.push(`  - name: casp_${i}`, '    kind: cascode', '    type: pmos', `    input: ${iin}u`,
          '    size:', '      w: wp', '      l: 1u', `    output: { v: ${(0.5 + 0.05 * (i % 4)).toFixed(2)} }   # to the load`);
        break;
      case 2:
        lines.push(`  - { name: ws_${i}, kind: wide-swing, type: nmos, input: ${iin}u, size: { w: 2*wn, l: lu }, output: { v: ${(0.7 + 0.05 * (i % 3)).toFixed(2)} } }`);
        break;
      default:
        lines.push(`  - name: wb_${i}`, '    kind: wilson-balanced', '    type: nmos', `    input: ${iin}u`,
          '    size: { w: 8u, l: 2u }', `    output: { v: ${(1.1 + 0.1 * (i % 3)).toFixed(1)} }`);
    }
  }
  return lines.join('\n') + '\n';
}

/**
 * The example spec with four classic faults written in: a PMOS load whose output sits too near
 * vdd, a Wilson left plain, a cascode tap asked for more Rout than it gives, a vbias too low.
 * Each one gets findings with verified fixes.
 */
export function faultyExampleText(example: string): string {
  const swap = (text: string, from: RegExp, to: string): string => {
    if (!from.test(text)) throw new Error(`faultyExampleText: the example no longer matches ${from}`);
    return text.replace(from, to);
  };
  let t = example;
  t = swap(t, /output: \{ v: 1\.05[^}\n]*\}/, 'output: { v: 1.62 }');
  t = swap(t, /kind: wilson-balanced/, 'kind: wilson');
  t = swap(t, /require: \{ ratio: 4, rout: 20M/, 'require: { ratio: 4, rout: 200M');
  t = swap(t, /vbias: [0-9.]+/, 'vbias: 0.62');
  return t;
}

/**
 * `n` mirrors of every template kind and both polarities with random currents, sizes and output
 * voltages (a fixed-seed generator, so the text is the same every run): a large spec with
 * findings, many of them with verified fixes — the text an editor analyses on every keystroke
 * while a designer is still sizing. About 150 characters a mirror.
 */
export function faultySpecText(n: number, seed = 2024): string {
  let s = seed;
  const rnd = (): number => { s = (s * 1103515245 + 12345) % 2147483648; return s / 2147483648; };
  const kinds = ['simple', 'cascode', 'wide-swing', 'wilson', 'wilson-balanced'] as const;
  const lines: string[] = [HALDEN_HEADER];
  for (let i = 0; i < n; i++) {
    const kind = kinds[i % kinds.length]!;
    const type = Math.floor(i / kinds.length) % 2 === 0 ? 'nmos' : 'pmos';
    const iin = (5 + Math.round(45 * rnd())).toString();
    const l = (0.3 + Math.round(20 * rnd()) / 10).toFixed(1);
    const w = (Number(l) * (1 + Math.round(24 * rnd()))).toFixed(1);
    const m = 1 + Math.floor(3 * rnd());
    const v = type === 'nmos' ? (0.3 + 1.3 * rnd()).toFixed(2) : (0.2 + 1.3 * rnd()).toFixed(2);
    const outs = kind === 'wilson' || kind === 'wilson-balanced' ? '' : kind === 'simple' ? `\n    devices: { out: { m: ${m} } }` : `\n    devices: { out: { m: ${m} }, outc: { m: ${m} } }`;
    const ratio = kind === 'wilson' || kind === 'wilson-balanced' ? 1 : m;
    lines.push(`  - name: ${kind.replace('-', '_')}_${type}_${i}`, `    kind: ${kind}`, `    type: ${type}`, `    input: ${iin}u`,
      `    size: { w: ${w}u, l: ${l}u }${outs}`, `    output: { v: ${v} }`, `    require: { ratio: ${ratio}${i % 4 === 0 ? ', compliance: 0.5' : ''} }`);
  }
  return lines.join('\n') + '\n';
}

/** What each mirror of the linked tree sees in it: the current into its input and the voltage
 *  at each of its two outputs (a linked output's is the next mirror's input node). */
export interface TreeConditions { iin: number[]; vout: (readonly [number, number])[] }

/**
 * A bias network of `n` simple mirrors as a binary tree, polarity alternating level by level:
 * every mirror is a two-output bank whose outputs feed the next level's mirrors; the last level's
 * outputs are leaves held at their own voltage. Given `unlinked`, the same mirrors are written
 * without links, each at the conditions it has in the linked tree (its input current, each
 * output held at the voltage of the node it drives there): the same mirrors' cost without a
 * network, mirror for mirror the same operating points and so the same figures and findings
 * but the chain's.
 */
export function networkTreeText(n: number, unlinked?: TreeConditions): string {
  const lines: string[] = [HALDEN_HEADER];
  for (let i = 0; i < n; i++) {
    const level = Math.floor(Math.log2(i + 1));
    const type = level % 2 === 0 ? 'nmos' : 'pmos';
    const size = type === 'nmos' ? '{ w: 8u, l: 4u }' : '{ w: 32u, l: 4u }';
    const parent = (i - 1) >> 1;
    const input = unlinked ? String(unlinked.iin[i]) : i === 0 ? '10u' : `{ from: t${parent}.${i % 2 === 1 ? 'a' : 'b'} }`;
    const leafV = 0.9;
    const name = (k: number) => (k === 0 ? 'a' : 'b');
    const out = (k: number) => (unlinked ? `{ name: ${name(k)}, output: { v: ${unlinked.vout[i]![k]} } }`
      : 2 * i + 1 + k < n ? `{ name: ${name(k)} }` : `{ name: ${name(k)}, output: { v: ${leafV} } }`);
    lines.push(`  - { name: t${i}, kind: simple, type: ${type}, input: ${input}, size: ${size}, outputs: [${out(0)}, ${out(1)}] }`);
  }
  return lines.join('\n') + '\n';
}

/** The bipolar devices of the Halden 180 BiCMOS option (invented), as the example gives them. */
const HALDEN_BIPOLAR = [
  '  npn: { is: 2e-17, bf: 120, vaf: 60 }',
  '  pnp: { is: 1e-17, bf: 60, vaf: 40 }',
];

/**
 * One mirror of every kind in both polarities of its family (MOSFET kinds nmos and pmos, the
 * bipolar-only ones npn and pnp), and a netlist cascode of each polarity — each written as a
 * designer would, so that every one has an operating point: the references with their loop
 * resistor and start-up device, the Widlar with its degeneration, every output where its stack
 * reaches. What the engine's per-mirror figure solves.
 */
export function representativeText(): string {
  const header = HALDEN_HEADER.replace('\nsupplies:', `\n${HALDEN_BIPOLAR.join('\n')}\nsupplies:`);
  const lines: string[] = [header];
  const add = (name: string, body: string[]) => lines.push(`  - name: ${name}`, ...body.map((l) => `    ${l}`));
  for (const sinks of [true, false]) {
    const mos = sinks ? 'nmos' : 'pmos', bjt = sinks ? 'npn' : 'pnp';
    const size = sinks ? '{ w: 8u, l: 1u }' : '{ w: 32u, l: 1u }';
    const v = sinks ? 1.2 : 0.6;
    for (const kind of ['simple', 'cascode', 'wide-swing', 'wilson', 'wilson-balanced']) {
      add(`${kind}-${mos}`, [`kind: ${kind}`, `type: ${mos}`, 'input: 20u', `size: ${size}`, 'devices: { out: { m: 2 } }', `output: { v: ${v} }`]);
    }
    add(`beta-helper-${bjt}`, ['kind: beta-helper', `type: ${bjt}`, 'input: 20u', 'devices: { out: { area: 2 } }', `output: { v: ${sinks ? 1.4 : 0.4} }`]);
    add(`widlar-${bjt}`, ['kind: widlar', `type: ${bjt}`, 'input: 100u', 'degeneration: 5k', 'output: { v: 0.9 }']);
    add(`beta-multiplier-${mos}`, ['kind: beta-multiplier', `type: ${mos}`, `size: ${sinks ? '{ w: 2u, l: 2u }' : '{ w: 8u, l: 2u }'}`, 'k: 4', 'resistor: 12k',
      `devices: ${sinks ? '{ top: { w: 4u }, topd: { w: 4u } }' : '{ top: { w: 1u }, topd: { w: 1u } }'}`, 'startup: { w: 0.5u, l: 4u }', `output: { v: ${sinks ? 0.8 : 1.0} }`]);
    add(`vgs-resistor-${mos}`, ['kind: vgs-resistor', `type: ${mos}`, `size: ${sinks ? '{ w: 4u, l: 2u }' : '{ w: 16u, l: 2u }'}`, `resistor: ${sinks ? '60k' : '68k'}`,
      `devices: ${sinks ? '{ follow: { w: 16u, bulk: source }, top: { w: 32u }, topd: { w: 32u } }' : '{ follow: { w: 64u, bulk: source }, top: { w: 8u }, topd: { w: 8u } }'}`,
      'startup: { w: 0.5u, l: 4u }', `output: { v: ${sinks ? 1.2 : 0.6} }`]);
    add(`ptat-${bjt}`, ['kind: ptat', `type: ${bjt}`, 'k: 8', 'resistor: 10.8k', 'startup: { w: 0.5u, l: 16u }', `output: { v: ${sinks ? 0.7 : 1.1} }`]);
    add(`vbe-resistor-${bjt}`, ['kind: vbe-resistor', `type: ${bjt}`, 'resistor: 36k', 'startup: { w: 0.5u, l: 4u }', `output: { v: ${sinks ? 1.0 : 0.8} }`]);
    const rail = sinks ? 'vss' : 'vdd', w = sinks ? '4u' : '16u';
    add(`netlist-${mos}`, ['kind: netlist', `type: ${mos}`, 'devices:',
      `  M1: { type: ${mos}, d: a, g: a, s: ${rail}, w: ${w}, l: 1u }`, `  M3: { type: ${mos}, d: b, g: b, s: a, w: ${w}, l: 1u }`,
      `  M2: { type: ${mos}, d: c, g: a, s: ${rail}, w: ${w}, l: 1u }`, `  M4: { type: ${mos}, d: out, g: b, s: c, w: ${w}, l: 1u }`,
      `currents: { IREF: { from: ${sinks ? 'vdd' : 'b'}, to: ${sinks ? 'b' : 'vss'}, i: 20u } }`,
      `output: { node: out, v: ${sinks ? 1.3 : 0.5} }`, 'input: { source: IREF }', 'pair: { ref: M1, out: M2 }']);
  }
  return lines.join('\n') + '\n';
}
