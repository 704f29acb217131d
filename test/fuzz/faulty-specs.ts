/**
 * Random valid specs full of design faults, on the invented "Halden 180" process: every kind, bias
 * banks and netlists, block and flow style, comments everywhere, sizes through params and
 * expressions, optional anchors and CRLF line breaks. Outputs near the rails, ratio, Rout and
 * sigma requirements and undersized devices make the rules offer fixes of every family.
 */
import fc from 'fast-check';

const KINDS = ['simple', 'cascode', 'wide-swing', 'wilson', 'wilson-balanced', 'netlist'] as const;

export interface MirrorPlan {
  kind: (typeof KINDS)[number];
  type: 'nmos' | 'pmos';
  iin: string;
  w: string;
  l: string;
  m: number;
  voutFrac: number;
  ratio: boolean;
  rout?: string;
  sigma?: string;
  style: 'block' | 'flow' | 'item-flow';
  bank: boolean;
  vbias?: string;
  comment: boolean;
}

export const arbMirrorPlan: fc.Arbitrary<MirrorPlan> = fc.record({
  kind: fc.constantFrom(...KINDS),
  type: fc.constantFrom('nmos' as const, 'pmos' as const),
  iin: fc.constantFrom('5u', '10u', '20u', '40u'),
  w: fc.constantFrom('0.2u', '1u', '2u', '4u', '8u', 'wu', '2*wu', 'wu/2 + 0.5u'),
  l: fc.constantFrom('0.15u', '0.5u', '1u', '2u', 'lu'),
  m: fc.integer({ min: 1, max: 4 }),
  voutFrac: fc.integer({ min: 3, max: 97 }),
  ratio: fc.boolean(),
  rout: fc.option(fc.constantFrom('1M', '5M', '50M', '500M'), { nil: undefined }),
  sigma: fc.option(fc.constantFrom('0.3%', '1%', '3%'), { nil: undefined }),
  style: fc.constantFrom('block' as const, 'flow' as const, 'item-flow' as const),
  bank: fc.boolean(),
  vbias: fc.option(fc.constantFrom('0.5', '0.7', '0.9', '1.1'), { nil: undefined }),
  comment: fc.boolean(),
});

function req(p: MirrorPlan, ratio: number): string {
  const r = [p.ratio ? `ratio: ${ratio}` : '', p.rout ? `rout: ${p.rout}` : '', p.sigma ? `sigma: ${p.sigma}` : ''].filter(Boolean);
  return r.length ? `{ ${r.join(', ')} }` : '';
}

function mirrorLines(p: MirrorPlan, i: number): string[] {
  const vout = (1.8 * p.voutFrac / 100).toFixed(2);
  const c = (s: string) => (p.comment ? `${s}   # note ${i}` : s);
  const name = `m${i}`;
  if (p.kind === 'netlist') {
    const rail = p.type === 'nmos' ? 'vss' : 'vdd';
    const cur = p.type === 'nmos' ? `{ from: vdd, to: a, i: ${p.iin} }` : `{ from: a, to: vss, i: ${p.iin} }`;
    return [
      `  - name: ${name}`, '    kind: netlist', `    type: ${p.type}`, '    devices:',
      c(`      M1: { type: ${p.type}, d: a, g: a, s: ${rail}, w: ${p.w}, l: ${p.l} }`),
      `      M2: { type: ${p.type}, d: out, g: a, s: ${rail}, w: ${p.w}, l: ${p.l}, m: ${p.m} }`,
      '    currents:', `      IREF: ${cur}`,
      `    output: { node: out, v: ${vout} }`, '    input: { source: IREF }', '    pair: { ref: M1, out: M2 }',
      ...(req(p, p.m) ? [`    require: ${req(p, p.m)}`] : []),
    ];
  }
  const wilson = p.kind.startsWith('wilson');
  const vbias = p.kind === 'wide-swing' && p.vbias ? p.vbias : undefined;
  const ratio = wilson ? 1 : p.m;
  if (p.style === 'item-flow' && !p.bank) {
    const parts = [`name: ${name}`, `kind: ${p.kind}`, `type: ${p.type}`, `input: ${p.iin}`, `size: { w: ${p.w}, l: ${p.l} }`,
      ...(wilson ? [] : [`devices: { out: { m: ${p.m} } }`]), ...(vbias ? [`vbias: ${vbias}`] : []), `output: { v: ${vout} }`,
      ...(req(p, ratio) ? [`require: ${req(p, ratio)}`] : [])];
    return [c(`  - { ${parts.join(', ')} }`)];
  }
  const head = [c(`  - name: ${name}`), `    kind: ${p.kind}`, `    type: ${p.type}`, c(`    input: ${p.iin}`)];
  const size = p.style === 'flow' ? [`    size: { w: ${p.w}, l: ${p.l} }`] : ['    size:', c(`      w: ${p.w}`), `      l: ${p.l}`];
  if (p.bank && !wilson) {
    return [
      ...head, ...size, ...(vbias ? [`    vbias: ${vbias}`] : []), '    outputs:',
      c('      - name: a'), `        devices: { out: { m: ${p.m} } }`, `        output: { v: ${vout} }`,
      ...(req(p, ratio) ? [`        require: ${req(p, ratio)}`] : []),
      '      - name: b', `        output: { v: ${(1.8 - Number(vout)).toFixed(2)} }`,
    ];
  }
  const devices = wilson ? [] : p.style === 'flow' ? [c(`    devices: { out: { m: ${p.m} } }`)] : ['    devices:', '      out:', c(`        m: ${p.m}`)];
  return [...head, ...size, ...devices, ...(vbias ? [`    vbias: ${vbias}`] : []), `    output: { v: ${vout} }`,
    ...(req(p, ratio) ? [`    require: ${req(p, ratio)}`] : [])];
}

export interface SpecPlan { mirrors: MirrorPlan[]; crlf: boolean; anchors: boolean; vdd: string }

export const arbSpecPlan: fc.Arbitrary<SpecPlan> = fc.record({
  mirrors: fc.array(arbMirrorPlan, { minLength: 1, maxLength: 4 }),
  crlf: fc.boolean(),
  anchors: fc.boolean(),
  vdd: fc.constantFrom('1.8', '1.8', '1.5', '3.3'),
});

/** The spec text of a plan. `anchors`: the process parameters are shared through an anchor and a merge key. */
export function specText(plan: SpecPlan): string {
  const nmos = '{ kp: 280u, vt0: 0.45, lambda: 0.08, lref: 1u, gamma: 0.45, phi: 0.85, avt: 4e-9, abeta: 1e-8, lmin: 0.18u, wmin: 0.22u }';
  const lines = [
    '# generated Halden 180 spec (faults on purpose)',
    'format: 1',
    'process:',
    '  grid: 10n        # fixes snap to 10 nm',
    plan.anchors ? `  nmos: &proc ${nmos}` : `  nmos: ${nmos}`,
    plan.anchors ? '  pmos: { <<: *proc, kp: 70u, vt0: 0.48, lambda: 0.1 }' : '  pmos: { kp: 70u, vt0: 0.48, lambda: 0.1, lref: 1u, gamma: 0.4, phi: 0.8, avt: 5e-9, abeta: 1e-8, lmin: 0.18u, wmin: 0.22u }',
    `supplies: { vdd: ${plan.vdd} }`,
    'limits:', '  margin: 100m', '  error: 1%',
    'params: { wu: 2u, lu: 1u }',
    'mirrors:',
    ...plan.mirrors.flatMap((m, i) => mirrorLines(m, i)),
    '# end',
    '',
  ];
  const text = lines.join('\n');
  return plan.crlf ? text.replace(/\n/g, '\r\n') : text;
}

export const arbFaultySpec: fc.Arbitrary<string> = arbSpecPlan.map(specText);
