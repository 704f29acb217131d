/**
 * Bias networks (design §9): link findings at the `from` value, and linked mirrors solved as one
 * circuit. Check values: the same circuits written by hand as one netlist (the `netlist` kind, an
 * independent path through the solver: no templates, no link handling) must give the same currents
 * to 1e-4 (the contract's tolerance, design §9 "done when").
 */
import { describe, expect, it } from 'vitest';
import { analyzeText } from '../../src/core/analyze';
import type { FileReport, MirrorReport } from '../../src/core/types';
import { applyEdits } from '../../src/core/text/edits';
import { header, marked, textOf } from './helpers';

const rel = (a: number, b: number): number => Math.abs(a / b - 1);
const report = (r: FileReport, name: string): MirrorReport => {
  const m = r.mirrors.find((x) => x.name === name);
  if (!m) throw new Error(`no report ${name}: ${r.findings.map((f) => f.message).join('; ')}`);
  return m;
};

/** Root NMOS bank (10 µA) → PMOS simple fed by `root.a`; `root.b` is a leaf at 1.0 V. */
const CHAIN = header([
  '  - name: root',
  '    kind: simple',
  '    type: nmos',
  '    input: 10u',
  '    size: { w: 4u, l: 1u }',
  '    outputs:',
  '      - name: a',
  '        devices: { out: { m: 2 } }',
  '      - name: b',
  '        output: { v: 1.0 }',
  '  - name: dist',
  '    kind: simple',
  '    type: pmos',
  '    input: { from: root.a }',
  '    size: { w: 16u, l: 1u }',
  '    output: { v: 0.6 }',
]);

/** The same circuit as one netlist: M1 the root's diode, M2/M3 its outputs, P1/P2 dist. */
const CHAIN_NETLIST = header([
  '  - name: whole',
  '    kind: netlist',
  '    type: pmos',
  '    devices:',
  '      M1: { type: nmos, d: a, g: a, s: vss, b: vss, w: 4u, l: 1u }',
  '      M2: { type: nmos, d: x, g: a, s: vss, b: vss, w: 4u, l: 1u, m: 2 }',
  '      M3: { type: nmos, d: ob, g: a, s: vss, b: vss, w: 4u, l: 1u }',
  '      P1: { type: pmos, d: x, g: x, s: vdd, b: vdd, w: 16u, l: 1u }',
  '      P2: { type: pmos, d: out, g: x, s: vdd, b: vdd, w: 16u, l: 1u }',
  '    currents:',
  '      IREF: { from: vdd, to: a, i: 10u }',
  '    voltages:',
  '      VB: { node: ob, v: 1.0 }',
  '    output: { node: out, v: 0.6 }',
  '    input: { source: IREF }',
  '    pair: { ref: P1, out: P2 }',
]);

describe('linked mirrors against the same circuit as one netlist (1e-4 in current)', () => {
  const linked = analyzeText(CHAIN, 'chain.bias.yaml');
  const whole = analyzeText(CHAIN_NETLIST, 'whole.bias.yaml');
  const net = report(whole, 'whole');
  const dev = (name: string) => net.devices.find((d) => d.name === name)!;

  it('solves without errors', () => {
    expect(linked.findings.filter((f) => f.severity === 'error' && f.code.startsWith('link'))).toEqual([]);
    expect(net.converged).toBe(true);
  });
  it('the leaf current equals the netlist output current', () => {
    expect(rel(report(linked, 'dist').iout, net.iout)).toBeLessThan(1e-4);
  });
  it("the downstream mirror's iin is the current that arrives (the netlist's M2 drain current)", () => {
    expect(rel(report(linked, 'dist').iin!, dev('M2').id!)).toBeLessThan(1e-4);
    expect(rel(report(linked, 'root.a').iout, dev('M2').id!)).toBeLessThan(1e-4);
  });
  it('the linked node voltage is the netlist node x, its headroom measured to the compliance limit', () => {
    const a = report(linked, 'root.a');
    expect(Math.abs(a.linkV! - net.nodes.x!)).toBeLessThan(1e-5);
    expect(a.headroom).toBeCloseTo(a.linkV! - a.compliance, 12);
    expect(a.feeds).toBe('dist');
    expect(report(linked, 'dist').fedBy).toBe('root.a');
  });
  it('the unlinked output keeps its own voltage and current (M3)', () => {
    expect(rel(report(linked, 'root.b').iout, dev('M3').id!)).toBeLessThan(1e-4);
  });
  it('intended is the root current times the ideal ratios; chainError compounds the stages', () => {
    const d = report(linked, 'dist');
    expect(d.intended).toBeCloseTo(20e-6, 15);            // 10 µA × 2 × 1
    expect(d.chainError).toBeCloseTo(d.iout / 20e-6 - 1, 12);
    // Two stages with positive VDS-mismatch errors compound (1 + e1)(1 + e2) − 1.
    const e1 = report(linked, 'root.a').error!, e2 = d.error!;
    expect(d.chainError).toBeCloseTo((1 + e1) * (1 + e2) - 1, 6);
  });
  it('chainSigma of the leaf counts every device on the path: more than its own sigma', () => {
    const d = report(linked, 'dist');
    const a = report(linked, 'root.a');
    expect(d.chainSigma!).toBeGreaterThan(d.sigma!);
    // To first order the stages' variances add (the joint figure against the compounded one).
    expect(rel(d.chainSigma!, Math.hypot(a.sigma!, d.sigma!))).toBeLessThan(0.02);
  });
  it('one network: root, members, supply current (every branch) and power', () => {
    expect(linked.networks).toHaveLength(1);
    const n = linked.networks![0]!;
    expect(n.root).toBe('root');
    expect(n.members).toEqual(['root', 'dist']);
    // Between the rails: the reference, the leaf root.b and the leaf dist; root.a's current is
    // dist's input current, not drawn again.
    const total = 10e-6 + dev('M2').id! + dev('M3').id! + net.iout;
    expect(rel(n.supplyCurrent.vdd, total)).toBeLessThan(1e-4);
    expect(rel(n.supplyCurrent.vss, total)).toBeLessThan(1e-4);
    expect(rel(n.power, 1.8 * total)).toBeLessThan(1e-4);
    expect(n.leaves.sort()).toEqual(['dist', 'root.b']);
  });
});

describe('Monte Carlo and corners act on the whole group', () => {
  it("a leaf's Monte Carlo spread includes every device above it: near chainSigma, above its own sigma", () => {
    const r = analyzeText(CHAIN, 'chain.bias.yaml', { mc: { samples: 4000, seed: 7 } });
    const d = report(r, 'dist');
    // 4 000 samples: the sample sigma's own 1σ is about 1.1 %; 6 % leaves room for the
    // linearization (common practice for a Monte Carlo against a linear estimate).
    expect(rel(d.mc!.sigma, d.chainSigma!)).toBeLessThan(0.06);
    expect(d.mc!.sigma).toBeGreaterThan(1.3 * d.sigma!);
  });
  it('a corner re-solves the group: the leaf\'s corner iin is the corner current that arrives', () => {
    const text = `${CHAIN}corners:\n  slow: { nmos: { vt0: +50m, kp: -10% }, pmos: { vt0: +50m, kp: -10% } }\n`;
    const r = analyzeText(text, 'chain.bias.yaml', { corners: true });
    const a = report(r, 'root.a').corners![0]!, d = report(r, 'dist').corners![0]!;
    expect(d.converged).toBe(true);
    expect(rel(d.iin, a.iout)).toBeLessThan(1e-9);
    expect(rel(d.iin!, report(r, 'dist').iin!)).toBeGreaterThan(1e-4);   // it moved with the corner
  });
});

/** Three stages with a cascode at the end: NMOS root → PMOS bank → NMOS cascode leaf. */
const THREE = header([
  '  - name: root',
  '    kind: simple',
  '    type: nmos',
  '    input: { resistor: 120k }',
  '    size: { w: 4u, l: 1u }',
  '    output: { v: 1.2 }',
  '  - name: pbank',
  '    kind: simple',
  '    type: pmos',
  '    input: { from: root }',
  '    size: { w: 16u, l: 2u }',
  '    outputs:',
  '      - name: tail',
  '      - name: spare',
  '        output: { v: 0.5 }',
  '  - name: tail',
  '    kind: cascode',
  '    type: nmos',
  '    input: { from: pbank.tail }',
  '    size: { w: 8u, l: 1u }',
  '    output: { v: 1.2 }',
]);

const THREE_NETLIST = header([
  '  - name: whole',
  '    kind: netlist',
  '    type: nmos',
  '    devices:',
  '      M1: { type: nmos, d: a, g: a, s: vss, b: vss, w: 4u, l: 1u }',
  '      M2: { type: nmos, d: x, g: a, s: vss, b: vss, w: 4u, l: 1u }',
  '      P1: { type: pmos, d: x, g: x, s: vdd, b: vdd, w: 16u, l: 2u }',
  '      P2: { type: pmos, d: y, g: x, s: vdd, b: vdd, w: 16u, l: 2u }',
  '      P3: { type: pmos, d: sp, g: x, s: vdd, b: vdd, w: 16u, l: 2u }',
  '      N1: { type: nmos, d: ta, g: ta, s: vss, b: vss, w: 8u, l: 1u }',
  '      N2: { type: nmos, d: y, g: y, s: ta, b: vss, w: 8u, l: 1u }',
  '      N3: { type: nmos, d: tc, g: ta, s: vss, b: vss, w: 8u, l: 1u }',
  '      N4: { type: nmos, d: out, g: y, s: tc, b: vss, w: 8u, l: 1u }',
  '    resistors:',
  '      RIN: { a: vdd, b: a, r: 120k }',
  '    currents:',
  '      IZ: { from: vdd, to: vss, i: 1p }',   // the netlist kind names an input source: 1 pA rail to rail, on no node
  '    voltages:',
  '      VSP: { node: sp, v: 0.5 }',
  '    output: { node: out, v: 1.2 }',
  '    input: { source: IZ }',
]);

describe('three stages, resistor-fed root, PMOS bank, NMOS cascode leaf (against one netlist, 1e-4)', () => {
  const linked = analyzeText(THREE, 'three.bias.yaml');
  const whole = analyzeText(THREE_NETLIST, 'whole.bias.yaml');
  const net = report(whole, 'whole');
  const dev = (name: string) => net.devices.find((d) => d.name === name)!;
  it('every current matches', () => {
    expect(net.converged).toBe(true);
    expect(rel(report(linked, 'root').iin!, dev('M1').id!)).toBeLessThan(1e-4);
    expect(rel(report(linked, 'pbank.tail').iin!, dev('M2').id!)).toBeLessThan(1e-4);
    expect(rel(report(linked, 'tail').iin!, dev('P2').id!)).toBeLessThan(1e-4);
    expect(rel(report(linked, 'tail').iout, net.iout)).toBeLessThan(1e-4);
    expect(rel(report(linked, 'pbank.spare').iout, dev('P3').id!)).toBeLessThan(1e-4);
  });
  it('a resistor-fed root: intended starts from its solved iin', () => {
    const root = report(linked, 'root');
    expect(report(linked, 'tail').intended).toBeCloseTo(root.iin!, 15);
    expect(report(linked, 'tail').fedBy).toBe('pbank.tail');
  });
});

describe('link findings at the `from` value', () => {
  const base = (from: string, type = 'pmos') => header([
    '  - name: root',
    '    kind: simple',
    '    type: nmos',
    '    input: 10u',
    '    size: { w: 4u, l: 1u }',
    '    outputs:',
    '      - name: a',
    '      - name: b',
    '        output: { v: 1.0 }',
    '  - name: dist',
    '    kind: simple',
    `    type: ${type}`,
    `    input: { from: ${from} }`,
    '    size: { w: 16u, l: 1u }',
    '    output: { v: 0.6 }',
  ]);
  it.each([
    ['link-unknown', '⟦root.c⟧', 'pmos', 'no output `c`'],
    ['link-unknown', '⟦root⟧', 'pmos', 'bias bank with 2 outputs'],
    ['link-unknown', '⟦nowhere⟧', 'pmos', 'no mirror output `nowhere`'],
    ['link-polarity', '⟦root.a⟧', 'nmos', 'a link joins an output to an input of the other polarity'],
    ['link-self', '⟦dist⟧', 'pmos', 'cannot feed its own input'],
  ])('%s for %s (%s)', (code, from, type, words) => {
    const { text, range } = marked(base(from, type));
    const r = analyzeText(text, 'x.bias.yaml');
    const f = r.findings.find((x) => x.code === code);
    expect(f, JSON.stringify(r.findings.map((x) => x.code))).toBeDefined();
    expect(f!.severity).toBe('error');
    expect(f!.range).toEqual(range);
    expect(f!.message).toContain(words);
  });
  it('link-unknown offers the closest path as a verified quick fix', () => {
    const { text } = marked(base('⟦root.aa⟧'));
    const r = analyzeText(text, 'x.bias.yaml');
    const f = r.findings.find((x) => x.code === 'link-unknown')!;
    expect(f.message).toContain('did you mean `root.a`?');
    expect(f.fixes).toHaveLength(1);
    const fixed = applyEdits(text, f.fixes![0]!.edits);
    expect(fixed).toContain('input: { from: root.a }');
    expect(analyzeText(fixed, 'x.bias.yaml').findings.filter((x) => x.code.startsWith('link-'))).toEqual([]);
  });
  it('link-shared: the second input taking one output', () => {
    const { text, range } = marked(`${base('root.a')}  - name: twin\n    kind: simple\n    type: pmos\n    input: { from: ⟦root.a⟧ }\n    size: { w: 16u, l: 1u }\n    output: { v: 0.6 }\n`);
    const f = analyzeText(text, 'x.bias.yaml').findings.find((x) => x.code === 'link-shared')!;
    expect(f.range).toEqual(range);
    expect(f.message).toContain('already feeds `dist`');
  });
  it('link-cycle on each mirror of the loop; link-upstream below it', () => {
    const text = header([
      '  - name: p',
      '    kind: simple',
      '    type: pmos',
      '    input: { from: n }',
      '    size: { w: 16u, l: 1u }',
      '    outputs: [{ name: o }, { name: q }]',
      '  - name: n',
      '    kind: simple',
      '    type: nmos',
      '    input: { from: p.o }',
      '    size: { w: 4u, l: 1u }',
      '  - name: below',
      '    kind: simple',
      '    type: nmos',
      '    input: { from: p.q }',
      '    size: { w: 4u, l: 1u }',
      '    output: { v: 0.6 }',
    ]);
    const r = analyzeText(text, 'x.bias.yaml');
    const cycles = r.findings.filter((x) => x.code === 'link-cycle');
    expect(cycles.map((f) => textOf(text, f.range)).sort()).toEqual(['n', 'p.o']);
    expect(r.findings.find((x) => x.code === 'link-upstream')?.message).toContain('fed by `p`');
  });
  it('link-output-v: a written voltage on a linked output is not used', () => {
    const text = base('root.a').replace('      - name: a\n', '      - name: a\n        output: { v: 0.9 }\n');
    const f = analyzeText(text, 'x.bias.yaml').findings.find((x) => x.code === 'link-output-v')!;
    expect(f.severity).toBe('warning');
    expect(textOf(text, f.range)).toBe('v');
  });
});

describe('network findings', () => {
  /** A cascode root feeding a narrow PMOS diode: the diode's VSG pulls the link node down to
   *  31 mV inside the cascode output's compliance limit (limits.margin 100 mV). */
  const SAT = `${header([
    '  - name: root',
    '    kind: cascode',
    '    type: nmos',
    '    input: 10u',
    '    size: { w: 8u, l: 1u }',
    '  - name: dist',
    '    kind: simple',
    '    type: pmos',
    '    input: { from: ⟦root⟧ }',
    '    size: { w: 0.6u, l: 1u }',
    '    output: { v: 0.4 }',
  ])}limits: { supplyCurrent: 30u, error: 5% }\n`;
  const { text, range } = marked(SAT);
  const r = analyzeText(text, 'sat.bias.yaml');
  const sat = r.findings.find((f) => f.code === 'link-saturation')!;

  it('link-saturation at the `from` value, with fixes on either side', () => {
    expect(sat.severity).toBe('error');
    expect(sat.range).toEqual(range);
    expect(report(r, 'root').headroom!).toBeLessThan(0.1);
    expect(sat.fixes!.map((f) => f.title)).toEqual([
      'Widen dist for a lower input VGS (w 0.6u→1.2u), verified by re-solving the network',
      'Widen root for a lower VDSsat of root (w 8u→32u), verified by re-solving the network',
      'Make root a wide-swing cascode (`kind: wide-swing`: its output needs 2·VDSsat, not VT + 2·VDSsat), verified by re-solving the network',
    ]);
    // A cascode's output needs VT + 2·VDSsat, a wide-swing one's 2·VDSsat (docs/references.md,
    // wide-swing cascode: Johns & Martin, 1st ed., ch. 3, from memory).
    expect(sat.message).toContain('or make root a wide-swing cascode (2·VDSsat instead of VT + 2·VDSsat)');
  });
  it('a simple mirror upstream: no kind change, and the finding says why a cascode would not help', () => {
    const simple = analyzeText(text.replace('kind: cascode', 'kind: simple').replace('w: 0.6u, l: 1u', 'w: 0.3u, l: 4u'), 'sat.bias.yaml');
    const f = simple.findings.find((x) => x.code === 'link-saturation')!;
    expect(f.message).toContain('(a cascode on root would not help: it needs at least one VDSsat more at the link node)');
    expect((f.fixes ?? []).some((x) => x.title.includes('kind:'))).toBe(false);
  });
  it.each([0, 1, 2])('fix %i leaves the link saturated when the whole network is solved again', (k) => {
    const after = analyzeText(applyEdits(text, sat.fixes![k]!.edits), 'sat.bias.yaml');
    expect(after.findings.find((f) => f.code === 'link-saturation')).toBeUndefined();
    expect(report(after, 'root').headroom!).toBeGreaterThanOrEqual(0.1);
  });
  it('supply-budget: the whole spec draws more than limits.supplyCurrent', () => {
    const f = r.findings.find((x) => x.code === 'supply-budget')!;
    expect(f.severity).toBe('error');
    expect(textOf(text, f.range)).toBe('30u');
    // 10 µA reference + 10 µA into the link + the leaf's current, solved.
    expect(rel(r.networks![0]!.supplyCurrent.vdd, 20e-6 + report(r, 'dist').iout)).toBeLessThan(1e-3);
    const roomy = analyzeText(text.replace('supplyCurrent: 30u', 'supplyCurrent: 31u'), 'sat.bias.yaml');
    expect(roomy.findings.find((x) => x.code === 'supply-budget')).toBeUndefined();
  });
  it('chain-error names the stage that contributes most', () => {
    const tight = analyzeText(text.replace('error: 5%', 'error: 1%'), 'sat.bias.yaml');
    const f = tight.findings.find((x) => x.code === 'chain-error')!;
    expect(f.message).toContain('`dist` contributes most');
    expect(f.path).toEqual(['mirrors', 1]);
    expect(r.findings.find((x) => x.code === 'chain-error')).toBeUndefined();
  });
});

describe('a Widlar in a network is intended to give its law\'s current (references §12)', () => {
  // A PNP root (β and VA huge: it copies 100 µA exactly) feeds a Widlar with 5 kΩ: the law gives
  // 11.281736 µA (Gray et al. §4.4.1; references §12), which is what the leaf is intended to carry.
  const text = `format: 1
process:
  tnom: 300 K
  npn: { is: 1e-16, bf: 1e12 }
  pnp: { is: 1e-16, bf: 1e12 }
supplies: { vdd: 3.3 }
mirrors:
  - name: top
    kind: simple
    type: pnp
    input: 100u
    output: { v: 1.5 }
  - name: trickle
    kind: widlar
    type: npn
    input: { from: top }
    degeneration: 5k
    output: { v: 0.9 }
`;
  it('intended 11.281736 µA, chain error near zero, no chain-error finding', () => {
    const r = analyzeText(text, 'widlar.bias.yaml');
    const leaf = report(r, 'trickle');
    expect(rel(leaf.intended!, 11.281736e-6)).toBeLessThan(1e-5);
    expect(rel(leaf.iout, 11.281736e-6)).toBeLessThan(1e-5);
    expect(Math.abs(leaf.chainError!)).toBeLessThan(1e-4);
    expect(r.findings.map((f) => f.code)).not.toContain('chain-error');
  });
});
