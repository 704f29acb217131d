/**
 * Fuzz inputs (fast-check arbitraries) for the whole analysis: real specs mutated token by token,
 * generated specs, random bytes, deep nesting, extreme numbers, odd Unicode, YAML anchors, aliases,
 * tags and merge keys, alias bombs and oversized files; and the shapes of issue 14: many findings
 * of one kind, long param chains and loops, control characters written as YAML escapes, netlists
 * of many elements. Shared by test/fuzz/*.test.ts (a few
 * thousand cases in `npm test`) and scripts/fuzz.ts (`npm run fuzz`, 100 000 cases).
 */
import { existsSync, readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import fc from 'fast-check';
import { cleanSpecText, faultyExampleText } from '../../scripts/spec-texts';

export interface FuzzInput {
  /** Which generator made it (for the summary). */
  kind: string;
  text: string;
  file: string;
}

/** The project's own specs: the example, the fixtures, and generated ones. */
export function seedSpecs(root = process.cwd()): { name: string; text: string }[] {
  const read = (p: string) => readFileSync(join(root, p), 'utf8');
  // A seed stands alone (no file beside it): the example's table flavour is given by parameters,
  // one per line at the table line's indent (the flavour is a block mapping).
  const example = read('examples/sensor-afe.bias.yaml').replace(/^([ \t]*)table: halden180-nlvt\.devtable\.csv[^\r\n]*/m, '$1kp: 300u\n$1vt0: 0.32');
  const seeds = [
    { name: 'sensor-afe.bias.yaml', text: example },
    { name: 'faulty-example.bias.yaml', text: faultyExampleText(example) },
    { name: 'rules-faulty.bias.yaml', text: read('test/rules/fixtures/faulty.bias.yaml') },
    { name: 'auto.bias.yaml', text: read('test/variation/fixtures/auto.bias.yaml') },
    { name: 'clean-12.bias.yaml', text: cleanSpecText(12) },
  ];
  // The editor tests' fixtures, whichever exist (another suite owns them).
  const dir = join(root, 'test/workbench/fixtures');
  const extra = existsSync(dir) ? readdirSync(dir).filter((f) => /\.bias\.(ya?ml|json)$/.test(f)).sort() : [];
  for (const f of extra) seeds.push({ name: `workbench-${f}`, text: read(join('test/workbench/fixtures', f)) });
  return seeds;
}

/** Tokens a mutation works on: words, numbers, runs of spaces, single punctuation, line breaks. */
export function tokens(text: string): string[] {
  return text.match(/\r?\n|[ \t]+|[A-Za-z_][A-Za-z0-9_-]*|[0-9.]+(?:[eE][+-]?[0-9]+)?[A-Za-zµ%]*|[^\sA-Za-z0-9_]/gu) ?? [];
}

/** Numbers that have broken numeric code before. */
export const EXTREME_NUMBERS = [
  '0', '-0', '1e308', '1e309', '-1e309', '1e-320', '5e-324', '1e-400', '.nan', '.NaN', '.inf', '-.inf', '+.inf', 'NaN',
  'Infinity', '-Infinity', '0x7fffffff', '0o17', '1_000', '9007199254740993', '-1', '1e-30', '1e30', '123456789012345678901234567890',
  '0.0000001p', '1000000T', '1 µA', '1e3m', '-0.0', '1.', '.5', '+5', '2**3', '1/0', '0/0', 'sqrt(-1)', '1e2e3',
];

/** Strings that have broken text handling before. */
export const ODD_UNICODE = [
  '\u202E', '\u202Bשלום', '\u0301', 'e\u0301', '\uD800', '\uDC00', '\uD83D\uDE00', '\u0000', '\uFEFF', '\u200D', '\u00A0',
  '\u2028', '\u2029', '\u0085', '\r', '\t', 'µ', 'μ', 'Ω', '\uFFFD', '\u001B[31m', '\\', '"', "'", '\u3000', 'ﬃ', '𝟙',
];

/** YAML constructs a bias spec never needs but a file may hold. */
export const YAML_FEATURES = [
  '&a ', '*a', '<<: *a', '<<: { w: 1u }', '!!str ', '!!int ', '!!float ', '!!binary ', '!!timestamp ', '!!set ', '!!omap ', '!local ',
  '!!map ', '!!seq ', '? ', '- ', ': ', '{', '}', '[', ']', ',', '#', '|', '>', '|-', '>+', '---', '...', '%YAML 1.2', '%TAG ! tag:x,2000:',
  '"', "'", '~', 'null', 'true', 'false', 'yes', '<<', '@', '`', '&b [1, *b]', '*undefined_anchor',
];

const arbToken = fc.oneof(
  fc.constantFrom(...EXTREME_NUMBERS),
  fc.constantFrom(...ODD_UNICODE),
  fc.constantFrom(...YAML_FEATURES),
  fc.constantFrom('\n', ' ', '  ', '    ', 'mirrors', 'kind', 'cascode', 'wilson', 'netlist', 'size', 'devices', 'outputs', 'w', 'l', 'm',
    'auto', 'design', 'corners', 'vbias', 'require', 'input', 'resistor', 'params', 'wu', '2*wu', 'pow(10, 400)', 'import("fs")'),
  fc.string({ maxLength: 4 }),
);

type Mutation =
  | { op: 'delete' | 'duplicate'; at: number }
  | { op: 'swap'; at: number; with: number }
  | { op: 'insert' | 'replace'; at: number; token: string }
  | { op: 'number'; at: number; token: string }
  | { op: 'line-delete' | 'line-duplicate' | 'indent' | 'dedent'; at: number }
  | { op: 'truncate'; at: number };

const arbMutation: fc.Arbitrary<Mutation> = fc.oneof(
  fc.record({ op: fc.constantFrom('delete' as const, 'duplicate' as const), at: fc.nat() }),
  fc.record({ op: fc.constant('swap' as const), at: fc.nat(), with: fc.nat() }),
  fc.record({ op: fc.constantFrom('insert' as const, 'replace' as const), at: fc.nat(), token: arbToken }),
  fc.record({ op: fc.constant('number' as const), at: fc.nat(), token: fc.constantFrom(...EXTREME_NUMBERS) }),
  fc.record({ op: fc.constantFrom('line-delete' as const, 'line-duplicate' as const, 'indent' as const, 'dedent' as const), at: fc.nat() }),
  fc.record({ op: fc.constant('truncate' as const), at: fc.nat() }),
);

/** Apply mutations to a text; deterministic for given mutations. */
export function mutate(text: string, ms: Mutation[]): string {
  let toks = tokens(text);
  for (const m of ms) {
    if (toks.length === 0) toks = [''];
    const i = m.at % toks.length;
    switch (m.op) {
      case 'delete': toks.splice(i, 1); break;
      case 'duplicate': toks.splice(i, 0, toks[i]); break;
      case 'swap': { const j = m.with % toks.length; [toks[i], toks[j]] = [toks[j], toks[i]]; break; }
      case 'insert': toks.splice(i, 0, m.token); break;
      case 'replace': toks[i] = m.token; break;
      case 'number': {
        const nums = toks.map((t, k) => (/^[0-9.]/.test(t) ? k : -1)).filter((k) => k >= 0);
        if (nums.length) toks[nums[m.at % nums.length]] = m.token;
        break;
      }
      case 'truncate': toks = toks.slice(0, i); break;
      default: {
        const lines = toks.join('').split('\n');
        const k = m.at % lines.length;
        if (m.op === 'line-delete') lines.splice(k, 1);
        else if (m.op === 'line-duplicate') lines.splice(k, 0, lines[k]);
        else if (m.op === 'indent') lines[k] = ' ' + lines[k];
        else lines[k] = lines[k].replace(/^ /, '');
        toks = tokens(lines.join('\n'));
      }
    }
  }
  return toks.join('');
}

/** A seed spec with one to four mutations. */
export function arbMutatedSpec(seeds: { name: string; text: string }[]): fc.Arbitrary<FuzzInput> {
  return fc.tuple(fc.nat({ max: seeds.length - 1 }), fc.array(arbMutation, { minLength: 1, maxLength: 4 }))
    .map(([k, ms]) => ({ kind: 'mutated', text: mutate(seeds[k].text, ms), file: seeds[k].name }));
}

/** Random bytes decoded as UTF-8 (what reading a binary file as text gives), or random characters. */
export const arbBytes: fc.Arbitrary<FuzzInput> = fc.oneof(
  fc.uint8Array({ maxLength: 400 }).map((b) => new TextDecoder().decode(b)),
  fc.string({ unit: 'binary', maxLength: 300 }),
  fc.string({ unit: fc.constantFrom('{', '}', '[', ']', ':', ',', '-', ' ', '\n', '#', '&', '*', '!', '|', '>', "'", '"', 'a', '1', '?'), maxLength: 200 }),
).map((text) => ({ kind: 'bytes', text, file: 'random.bias.yaml' }));

/** Deep nesting: flow and block, lists and maps, inside and outside `mirrors`. */
export const arbDeep: fc.Arbitrary<FuzzInput> = fc.record({
  depth: fc.integer({ min: 10, max: 20_000 }),
  style: fc.constantFrom('flow-seq', 'flow-map', 'block-map', 'block-seq', 'mixed'),
  where: fc.constantFrom('root', 'mirror', 'params'),
}).map(({ depth, style, where }) => {
  const d = style.startsWith('block') ? Math.min(depth, 3000) : depth;
  let inner: string;
  if (style === 'flow-seq') inner = '['.repeat(d) + ']'.repeat(d);
  else if (style === 'flow-map') inner = '{a: '.repeat(d) + '1' + '}'.repeat(d);
  else if (style === 'mixed') inner = '[{a: '.repeat(d >> 1) + '1' + '}]'.repeat(d >> 1);
  else {
    let s = '';
    for (let i = 0; i < d; i++) s += '\n' + ' '.repeat(i + 4) + (style === 'block-seq' ? '- ' : `k${i}:`);
    inner = s + ' 1';
  }
  const head = 'format: 1\nprocess:\n  nmos: { kp: 280u, vt0: 0.45 }\nsupplies: { vdd: 1.8 }\n';
  const text = where === 'root' ? `${head}x: ${inner}\nmirrors: []\n`
    : where === 'params' ? `${head}params:\n  wu: ${inner}\nmirrors: []\n`
      : `${head}mirrors:\n  - name: a\n    kind: simple\n    type: nmos\n    input: 10u\n    size: ${inner}\n    output: { v: 0.9 }\n`;
  return { kind: 'deep', text, file: 'deep.bias.yaml' };
});

/** One mirror with one value replaced by an extreme number or odd string. */
export const arbValues: fc.Arbitrary<FuzzInput> = fc.record({
  key: fc.constantFrom('input', 'w', 'l', 'm', 'v', 'vdd', 'kp', 'vt0', 'lambda', 'gamma', 'phi', 'tnom', 'margin', 'ratio', 'rout', 'sigma', 'vbias', 'grid'),
  value: fc.oneof(fc.constantFrom(...EXTREME_NUMBERS), fc.constantFrom(...ODD_UNICODE), fc.double().map(String), fc.integer().map(String)),
  quote: fc.boolean(),
}).map(({ key, value, quote }) => {
  const v = quote ? JSON.stringify(value) : value;
  const vals: Record<string, string> = { input: '10u', w: '2u', l: '1u', m: '1', v: '0.9', vdd: '1.8', kp: '280u', vt0: '0.45', lambda: '0.08', gamma: '0.45', phi: '0.85', tnom: '27 C', margin: '100m', ratio: '1', rout: '1M', sigma: '1%', vbias: '0.9', grid: '10n' };
  vals[key] = v;
  const text = [
    'format: 1', 'process:', `  tnom: ${vals.tnom}`, `  grid: ${vals.grid}`,
    `  nmos: { kp: ${vals.kp}, vt0: ${vals.vt0}, lambda: ${vals.lambda}, gamma: ${vals.gamma}, phi: ${vals.phi}, avt: 4e-9, abeta: 1e-8 }`,
    `supplies: { vdd: ${vals.vdd} }`, `limits: { margin: ${vals.margin} }`, 'mirrors:',
    '  - name: a', '    kind: wide-swing', '    type: nmos', `    input: ${vals.input}`, `    size: { w: ${vals.w}, l: ${vals.l} }`,
    `    devices: { out: { m: ${vals.m} } }`, `    vbias: ${vals.vbias}`, `    output: { v: ${vals.v} }`,
    `    require: { ratio: ${vals.ratio}, rout: ${vals.rout}, sigma: ${vals.sigma} }`, '',
  ].join('\n');
  return { kind: 'values', text, file: 'values.bias.yaml' };
});

/** Anchors, aliases, tags, merge keys and alias bombs in an otherwise valid spec. */
export const arbYamlFeatures: fc.Arbitrary<FuzzInput> = fc.oneof(
  fc.constantFrom(
    // merge keys and anchors sharing a unit size between mirrors
    'format: 1\nprocess:\n  nmos: &n { kp: 280u, vt0: 0.45, lambda: 0.08 }\n  pmos: *n\nsupplies: { vdd: 1.8 }\nunit: &u { w: 2u, l: 1u }\nmirrors:\n  - { name: a, kind: simple, type: nmos, input: 10u, size: *u, output: { v: 1.4 } }\n  - { name: b, kind: simple, type: pmos, input: 10u, size: { <<: *u, l: 2u }, output: { v: 0.3 } }\n',
    'format: 1\nprocess:\n  nmos: { kp: 280u, vt0: 0.45, lambda: 0.08 }\nsupplies: { vdd: 1.8 }\nmirrors:\n  - &m\n    name: a\n    kind: simple\n    type: nmos\n    input: 10u\n    size: { w: 2u, l: 1u }\n    output: { v: 1.4 }\n  - <<: *m\n    name: b\n',
    'format: 1\nprocess:\n  nmos: { kp: !!str 280u, vt0: !!float 0.45, lambda: !!int 0 }\nsupplies: { vdd: !!binary aGVsbG8= }\nmirrors: !!seq []\n',
    'format: 1\na: &a ["x","x","x","x","x","x","x","x","x"]\nb: &b [*a,*a,*a,*a,*a,*a,*a,*a,*a]\nc: &c [*b,*b,*b,*b,*b,*b,*b,*b,*b]\nd: &d [*c,*c,*c,*c,*c,*c,*c,*c,*c]\ne: &e [*d,*d,*d,*d,*d,*d,*d,*d,*d]\nf: [*e,*e,*e,*e,*e,*e,*e,*e,*e]\n',
    'format: 1\nself: &s [*s]\n',
    '%YAML 1.1\n---\nformat: 1\nsupplies: { vdd: 1.8 }\n...\n---\nformat: 2\n',
    'format: 1\n? [complex, key]\n: value\n? { a: 1 }\n: 2\nmirrors: []\n',
    'format: 1\nprocess:\n  nmos: { kp: 280u, vt0: 0.45 }\nsupplies: { vdd: 1.8 }\nmirrors:\n  - name: |\n      multi\n      line\n    kind: >-\n      simple\n    type: nmos\n    input: 10u\n    size: { w: 2u, l: 1u }\n    output: { v: 0.9 }\n',
  ),
  fc.tuple(fc.constantFrom(...YAML_FEATURES), fc.nat()).map(([feature, at]) => {
    const base = cleanSpecText(2);
    const lines = base.split('\n');
    const k = at % lines.length;
    lines[k] = lines[k].replace(/: /, `: ${feature}`);
    return lines.join('\n');
  }),
).map((text) => ({ kind: 'yaml', text, file: 'features.bias.yaml' }));

/** Generated specs of varied size and style (every kind, banks, netlists, params, comments, CRLF). */
export const arbGenerated: fc.Arbitrary<FuzzInput> = fc.record({
  n: fc.integer({ min: 0, max: 24 }),
  crlf: fc.boolean(),
  vdd: fc.constantFrom('1.8', '1.2', '0.9', '3.3', '0.3'),
}).map(({ n, crlf, vdd }) => {
  let text = cleanSpecText(n).replace('vdd: 1.8', `vdd: ${vdd}`);
  if (crlf) text = text.replace(/\n/g, '\r\n');
  return { kind: 'generated', text, file: 'generated.bias.yaml' };
});

/** Files far past the size limit (must be refused at once) and near-empty ones. */
export const arbSize: fc.Arbitrary<FuzzInput> = fc.constantFrom(
  { kind: 'size', text: '#'.repeat(1 << 20), file: 'big.bias.yaml' },
  { kind: 'size', text: cleanSpecText(2) + '# filler\n'.repeat(120_000), file: 'big.bias.yaml' },
  { kind: 'size', text: '', file: 'empty.bias.yaml' },
  { kind: 'size', text: '\n', file: 'empty.bias.yaml' },
  { kind: 'size', text: 'format: 1', file: 'tiny.bias.yaml' },
  { kind: 'size', text: '{}', file: 'tiny.bias.json' },
  { kind: 'size', text: 'null', file: 'tiny.bias.json' },
  { kind: 'size', text: '[]', file: 'tiny.bias.yaml' },
  { kind: 'size', text: '- 1\n- 2', file: 'tiny.bias.yaml' },
  { kind: 'size', text: '"just a string"', file: 'tiny.bias.yaml' },
);

const HOSTILE_HEAD = 'format: 1\nprocess:\n  nmos: { kp: 280u, vt0: 0.45, lambda: 0.08 }\n  pmos: { kp: 70u, vt0: 0.48, lambda: 0.1 }\nsupplies: { vdd: 1.8 }\n';
const HOSTILE_MIRROR = (w: string, name = 'a') =>
  `  - name: ${name}\n    kind: simple\n    type: nmos\n    input: 10u\n    size: { w: ${w}, l: 1u }\n    output: { v: 0.9 }\n`;

export const MANY_FINDINGS_KINDS = ['unknown-key', 'bad-name', 'empty-mirror', 'unknown-param', 'duplicate-key', 'unknown-role'] as const;

/**
 * Many findings of one kind (issue 14): past SPEC_LIMITS.maxFindingsPerCode they are counted in
 * one `more-findings`, and every position lookup is indexed. Sizes keep a case within the 200 ms
 * bound; the reproducers of the issue (40 000 keys, 60 000 mirrors) are in test/spec/bounded.test.ts.
 */
export const arbManyFindings: fc.Arbitrary<FuzzInput> = fc.record({
  n: fc.integer({ min: 90, max: 1000 }),
  kind: fc.constantFrom(...MANY_FINDINGS_KINDS),
}).map(({ n, kind }) => manyFindings(kind, n));

/** One case of arbManyFindings: `n` of one kind. */
export function manyFindings(kind: (typeof MANY_FINDINGS_KINDS)[number], n: number): FuzzInput {
  let body = '';
  if (kind === 'unknown-key') body = 'mirrors:\n' + HOSTILE_MIRROR('2u') + Array.from({ length: n }, (_, i) => `k${i}: 1\n`).join('');
  else if (kind === 'bad-name') body = 'params:\n' + Array.from({ length: n }, (_, i) => `  ${i}x: 1\n`).join('') + 'mirrors:\n' + HOSTILE_MIRROR('2u');
  else if (kind === 'empty-mirror') body = 'mirrors:\n' + '  - {}\n'.repeat(n);
  else if (kind === 'unknown-param') {
    // Many params and many unknown names: the did-you-mean search must not multiply them.
    body = 'params:\n' + Array.from({ length: n }, (_, i) => `  p${i}: 1\n`).join('') + 'mirrors:\n'
      + Array.from({ length: Math.ceil(n / 20) }, (_, i) => HOSTILE_MIRROR(`q${i}`, `m${i}`)).join('');
  } else if (kind === 'duplicate-key') body = 'params:\n' + '  p: 1\n'.repeat(n) + 'mirrors:\n' + HOSTILE_MIRROR('p*1u');
  else body = 'mirrors:\n' + HOSTILE_MIRROR('2u') + '    devices:\n' + Array.from({ length: n }, (_, i) => `      r${i}: { m: 2 }\n`).join('');
  return { kind: 'hostile', text: HOSTILE_HEAD + body, file: `many-${kind}.bias.yaml` };
}

/** Long param chains and loops (issue 14): an iterative, linear dependency walk; each param of a
 *  loop reported once, with a short message. `back`: every param also uses p0. */
export const arbParamGraphs: fc.Arbitrary<FuzzInput> = fc.record({
  n: fc.integer({ min: 2, max: 800 }),
  shape: fc.constantFrom('chain', 'loop', 'loop-back', 'self'),
  reversed: fc.boolean(),
}).map(({ n, shape, reversed }) => {
  const lines = Array.from({ length: n }, (_, i) => {
    if (shape === 'chain') return i === 0 ? '  p0: 1\n' : `  p${i}: p${i - 1} + 1\n`;
    if (shape === 'self') return `  p${i}: p${i} + 1\n`;
    return `  p${i}: p${(i + 1) % n} + ${shape === 'loop-back' ? 'p0' : '1'}\n`;
  });
  if (reversed) lines.reverse();
  const text = HOSTILE_HEAD + 'params:\n' + lines.join('') + 'mirrors:\n' + HOSTILE_MIRROR(`p${n - 1} * 1n`);
  return { kind: 'hostile', text, file: `params-${shape}.bias.yaml` };
});

/** Control characters written as YAML escapes in strings (issue 14, item 10's inputs): they pass
 *  the raw-byte check and reach titles, names, node names and messages. */
export const ESCAPED_CONTROLS = [
  '\\e]0;owned\\a', '\\e]52;c;aGVsbG8=\\a', 'x\\e[2K\\rFAKE: 0 errors', '\\x1b[31mred', '\\x07', '\\0', '\\x9b31m', '\\u009d', '\\b\\b\\b',
  '\\r\\n', '\\t', '\\u202e', '\\uFEFF', '\\x7f', '\\U0001F600', '\\N\\L\\P', '\\_', '\\ ',
];

export const arbEscapes: fc.Arbitrary<FuzzInput> = fc.record({
  escape: fc.constantFrom(...ESCAPED_CONTROLS),
  where: fc.constantFrom('title', 'name', 'node', 'param', 'value', 'key'),
}).map(({ escape, where }) => {
  const q = `"${escape}"`;
  let text: string;
  if (where === 'node') {
    text = HOSTILE_HEAD + `mirrors:\n  - name: n\n    kind: netlist\n    type: nmos\n    devices:\n      M1: { d: ${q}, g: a, s: vss, w: 2u, l: 1u }\n`
      + '    currents: { I1: { from: vdd, to: a, i: 10u } }\n    output: { node: a, v: 0.9 }\n    input: { source: I1 }\n';
  } else if (where === 'param') text = HOSTILE_HEAD + `params:\n  ${q}: 1\n  b: ${q}\nmirrors:\n` + HOSTILE_MIRROR('b');
  else if (where === 'title') text = `title: ${q}\n` + HOSTILE_HEAD + 'mirrors:\n' + HOSTILE_MIRROR('2u');
  else if (where === 'name') text = HOSTILE_HEAD + 'mirrors:\n' + HOSTILE_MIRROR('2u', q) + HOSTILE_MIRROR('2u', q);
  else if (where === 'key') text = HOSTILE_HEAD + `${q}: 1\nmirrors:\n` + HOSTILE_MIRROR('2u');
  else text = HOSTILE_HEAD + 'mirrors:\n' + HOSTILE_MIRROR(q);
  return { kind: 'hostile', text, file: `escape-${where}.bias.yaml` };
});

/**
 * Netlists of many elements: a diode-connected reference driving `n` outputs, each loaded by a
 * resistor from vdd (a star of resistor pairs, issue 14 item 1). Up to 40 devices with loads
 * that keep the outputs saturated: what the whole analysis, fix verification included, finishes
 * within the 200 ms bound; netlists of thousands of elements are the solver's own tests
 * (test/circuit/large-netlists.test.ts), and a star whose every output leaves saturation costs a verified fix per output.
 */
export const arbLargeNetlist: fc.Arbitrary<FuzzInput> = fc.record({
  n: fc.integer({ min: 2, max: 40 }),
  pair: fc.boolean(),
  r: fc.constantFrom('20k', '50k', '1', '0.001'),
}).map(({ n, pair, r }) => {
  let text = HOSTILE_HEAD + 'mirrors:\n  - name: star\n    kind: netlist\n    type: nmos\n    devices:\n      M0: { d: a, g: a, s: vss, w: 2u, l: 1u }\n';
  for (let i = 1; i < n; i++) text += `      M${i}: { d: o${i}, g: a, s: vss, w: 2u, l: 1u }\n`;
  text += '    currents:\n      I1: { from: vdd, to: a, i: 10u }\n    resistors:\n';
  for (let i = 2; i < n; i++) text += `      R${i}: { a: vdd, b: o${i}, r: ${r} }\n`;
  text += '    output: { node: o1, v: 0.9 }\n    input: { source: I1 }\n' + (pair ? '    pair: { ref: M0, out: M1 }\n' : '');
  return { kind: 'netlist', text, file: 'star.bias.yaml' };
});

/** Everything, weighted toward the inputs most likely to reach deep code (mutated real specs). */
export function arbFuzzInput(seeds: { name: string; text: string }[]): fc.Arbitrary<FuzzInput> {
  return fc.oneof(
    { weight: 10, arbitrary: arbMutatedSpec(seeds) },
    { weight: 3, arbitrary: arbValues },
    { weight: 2, arbitrary: arbGenerated },
    { weight: 2, arbitrary: arbBytes },
    { weight: 1, arbitrary: arbDeep },
    { weight: 1, arbitrary: arbYamlFeatures },
    { weight: 1, arbitrary: arbSize },
    { weight: 1, arbitrary: arbManyFindings },
    { weight: 1, arbitrary: arbParamGraphs },
    { weight: 1, arbitrary: arbEscapes },
    { weight: 1, arbitrary: arbLargeNetlist },
  );
}
