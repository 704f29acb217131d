/**
 * Spec findings land on the narrowest range: the value token that must change, else its key.
 * Each row marks the expected token with ⟦ ⟧ and states its 0-based line (LSP convention, as in
 * design §5); the row's code and the words of the message are checked too.
 */
import { describe, expect, test } from 'vitest';
import { parseSpec } from '../../src/core/spec/index';
import { BASE, codes, expectErrorsBlock, marked, withText } from './helpers';

interface Row { name: string; text: string; code: string; line: number; message?: string; severity?: 'error' | 'warning' }

const rows: Row[] = [
  { name: 'unknown key with did-you-mean', text: withText('kp: 280u', '⟦kpp⟧: 280u'), code: 'unknown-key', line: 2, message: 'did you mean `kp`?' },
  { name: 'unknown top-level key', text: withText('supplies:', '⟦suplies⟧:'), code: 'unknown-key', line: 4, message: 'did you mean `supplies`?' },
  { name: 'unknown mirror key', text: withText('    output:', '    ⟦outptu⟧:'), code: 'unknown-key', line: 11, message: 'did you mean `output`?' },
  { name: 'missing kp at the parent key', text: withText('  nmos: { kp: 280u, vt0: 0.45 }', '  ⟦nmos⟧: { vt0: 0.45 }'), code: 'missing-key', line: 2, message: 'missing `kp`' },
  { name: 'missing vdd at supplies', text: withText('supplies: { vdd: 1.8 }', '⟦supplies⟧: { vss: 0 }'), code: 'missing-key', line: 4, message: 'missing `vdd`' },
  { name: 'missing mirror input at the mirror name', text: withText('    input: 10u\n', '', withText('name: m1', 'name: ⟦m1⟧')), code: 'missing-key', line: 6, message: 'missing `input`' },
  { name: 'unit that does not fit a length', text: withText('w: 2u', 'w: ⟦10uA⟧'), code: 'bad-unit', line: 10, message: '`w` is a length (m); got a current `10uA`' },
  { name: 'unit that does not fit a current', text: withText('input: 10u', 'input: ⟦1.8V⟧'), code: 'bad-unit', line: 9, message: '`input` is a current (A); got a voltage `1.8V`' },
  { name: 'unknown unit', text: withText('vdd: 1.8', 'vdd: ⟦1.8 volts⟧'), code: 'bad-unit', line: 4, message: 'not a unit qpoint knows' },
  { name: 'wrong type (mapping for a number)', text: withText('vt0: 0.45', 'vt0: ⟦[0.45]⟧'), code: 'wrong-type', line: 2, message: 'must be a number or a string with a unit' },
  { name: 'enum with did-you-mean', text: withText('kind: simple', 'kind: ⟦simpel⟧'), code: 'bad-value', line: 7, message: 'did you mean `simple`?' },
  { name: 'type enum', text: withText('type: nmos', 'type: ⟦nfet⟧'), code: 'bad-value', line: 8, message: 'must be one of nmos, pmos' },
  { name: 'non-positive width', text: withText('w: 2u', 'w: ⟦-2u⟧'), code: 'non-positive', line: 10, message: 'greater than 0' },
  { name: 'zero input current', text: withText('input: 10u', 'input: ⟦0⟧'), code: 'non-positive', line: 9 },
  { name: 'non-integer m', text: withText('l: 1u }', 'l: 1u, m: ⟦2.5⟧ }'), code: 'bad-value', line: 10, message: 'whole number' },
  { name: 'expression with an unknown param (narrowed to the name)', text: withText('w: 2u', 'w: "2*⟦wx⟧"'), code: 'unknown-param', line: 10, message: '`wx` is not a param' },
  { name: 'unknown param suggests a close one', text: withText('format: 1\n', 'format: 1\nparams: { wu: 2u }\n', withText('w: 2u', 'w: ⟦wuu⟧')), code: 'unknown-param', line: 11, message: 'did you mean `wu`?' },
  { name: 'refused expression', text: withText('w: 2u', 'w: "⟦import⟧({}, {})"'), code: 'refused-expression', line: 10, message: 'function `import` is not allowed' },
  { name: 'bad expression', text: withText('w: 2u', 'w: ⟦2*(1u⟧'), code: 'bad-expression', line: 10 },
  { name: 'param cycle at the value', text: withText('format: 1\n', 'format: 1\nparams:\n  a: b*2\n  b: ⟦a + 1u⟧\n'), code: 'param-cycle', line: 3, message: 'b → a → b' },
  // Issue 14: a reference to a param that failed names the failure, not "no params".
  { name: 'a reference to a param with an error of its own', text: withText('format: 1\n', 'format: 1\nparams:\n  a: 1\n  b: foo(1)\n', withText('w: 2u', 'w: ⟦b⟧')), code: 'failed-param', line: 13, message: '`w`: param `b` has no value (see its own finding under `params`)' },
  // Issue 14: `.nan` is one fault; the schema and the elaborator say it once, at the value.
  { name: 'a YAML .nan where a number belongs', text: withText('w: 2u', 'w: ⟦.nan⟧'), code: 'bad-value', line: 10, message: '`w` must be a finite number; got NaN' },
  { name: 'a YAML .inf where a number belongs', text: withText('vdd: 1.8', 'vdd: ⟦-.inf⟧'), code: 'bad-value', line: 4, message: '`vdd` must be a finite number; got -Infinity' },
  { name: 'unknown name inside a param', text: withText('format: 1\n', 'format: 1\nparams:\n  a: "2*⟦bb⟧"\n'), code: 'unknown-param', line: 2, message: '`bb` is not a param' },
  { name: 'a param with a unit used for another quantity', text: withText('format: 1\n', 'format: 1\nparams: { ib: 10uA }\n', withText('w: 2u', 'w: ⟦ib⟧')), code: 'bad-unit', line: 11, message: 'param `ib` is a current (A)' },
  { name: 'duplicate mirror name at the second name', text: BASE + '  - name: ⟦m1⟧\n    kind: simple\n    type: nmos\n    input: 10u\n    size: { w: 2u, l: 1u }\n    output: { v: 0.9 }\n', code: 'duplicate-name', line: 12, message: 'already used by mirror 1' },
  { name: 'duplicate YAML key', text: withText('    type: nmos\n', '    type: nmos\n    ⟦type⟧: pmos\n'), code: 'duplicate-key', line: 9, message: 'given twice' },
  { name: 'unknown role for the kind', text: withText('    output:', '    devices: { ⟦refc⟧: { m: 2 } }\n    output:'), code: 'unknown-role', line: 11, message: 'not a role of a simple mirror (roles: ref, out)' },
  { name: 'role misspelt', text: withText('    output:', '    devices: { ⟦otu⟧: { m: 2 } }\n    output:'), code: 'unknown-role', line: 11, message: 'did you mean `out`?' },
  { name: 'vbias on a simple mirror', text: withText('    output:', '    ⟦vbias⟧: 0.9\n    output:'), code: 'unknown-key', line: 11, message: 'only to wide-swing' },
  { name: 'negative pmos vt0 (warning, magnitude taken)', text: withText('vt0: 0.48', 'vt0: ⟦-0.48⟧'), code: 'negative-pmos-vt0', line: 3, severity: 'warning', message: 'taken as 0.48' },
  { name: 'auto without design', text: withText('w: 2u', 'w: ⟦auto⟧'), code: 'auto-without-design', line: 10 },
  { name: 'auto in a field that is no size', text: withText('vdd: 1.8', 'vdd: ⟦auto⟧'), code: 'bad-value', line: 4 },
  { name: 'vdd below vss', text: withText('vdd: 1.8', 'vdd: ⟦-1⟧'), code: 'bad-value', line: 4, message: 'must be above `vss`' },
  { name: 'format other than 1', text: withText('format: 1', 'format: ⟦2⟧'), code: 'bad-value', line: 0 },
  { name: 'missing format at the first key', text: withText('format: 1\n', '', withText('process:', '⟦process⟧:')), code: 'missing-key', line: 0, message: 'missing `format`' },
  { name: 'output range reversed', text: withText('output: { v: 0.9 }', 'output: { v: 0.9, range: ⟦[1.5, 0.5]⟧ }'), code: 'bad-value', line: 11, message: 'low < high' },
  { name: 'outputs on a wilson', text: withText('kind: simple', 'kind: wilson', withText('    output:', '    ⟦outputs⟧: [{ name: a }]\n    output:')), code: 'unknown-key', line: 11, message: 'bias banks' },
  { name: 'temperature in kelvin written bare', text: withText('process:\n', 'process:\n  tnom: ⟦300⟧\n'), code: 'ambiguous-temperature', line: 2, severity: 'warning' },
  { name: 'YAML syntax error at the parser\'s position', text: withText('    kind: simple', '    kind: ⟦s⟧imple: x'), code: 'yaml-syntax', line: 7, message: 'Nested mappings are not allowed' },
  { name: 'unknown tag is a warning', text: withText('vdd: 1.8', 'vdd: ⟦!volts⟧ 1.8'), code: 'yaml-warning', line: 4, severity: 'warning' },
  { name: 'process without the pmos a pmos mirror needs', text: withText('  pmos: { kp: 70u, vt0: 0.48 }\n', '', withText('type: nmos', 'type: pmos', withText('process:', '⟦process⟧:'))), code: 'missing-key', line: 1, message: 'uses pmos devices' },
];

describe('spec findings at the narrowest range', () => {
  test.each(rows)('$name', (row) => {
    const { text, range } = marked(row.text);
    const p = parseSpec(text, 'case.bias.yaml');
    const hit = p.findings.find((f) => f.code === row.code && JSON.stringify(f.range) === JSON.stringify(range));
    expect(hit, JSON.stringify(p.findings, null, 1)).toBeDefined();
    expect(hit!.range.start.line).toBe(row.line);
    expect(hit!.severity).toBe(row.severity ?? 'error');
    if (row.message) expect(hit!.message).toContain(row.message);
    // An error leaves no resolved spec, or one without its mirror; a warning does not block it
    // (except syntax errors).
    if ((row.severity ?? 'error') === 'error') {
      expectErrorsBlock(p);
      expect(p.spec?.mirrors.some((m) => m.path[1] === hit!.path[1] && hit!.path[0] === 'mirrors') ?? false).toBe(false);
    }
    else if (row.code !== 'yaml-syntax') expect(p.spec, JSON.stringify(p.findings)).toBeDefined();
  });

  test('the clean base has no findings', () => {
    const p = parseSpec(BASE, 'base.bias.yaml');
    expect(p.findings).toEqual([]);
    expect(p.parsed).toBe(true);
    expect(p.spec).toBeDefined();
  });

  test('one fault gives one finding (schema and elaboration do not both report it)', () => {
    for (const row of rows) {
      const { text, range } = marked(row.text);
      const p = parseSpec(text);
      const same = p.findings.filter((f) => JSON.stringify(f.range) === JSON.stringify(range));
      expect(same.length, `${row.name}: ${JSON.stringify(same, null, 1)}`).toBe(1);
    }
  });

  test('a reference to a param that failed does not say the spec defines no params', () => {
    // Issue 14: every param failing used to read as "the spec defines no `params`".
    const p = parseSpec(withText('format: 1\n', 'format: 1\nparams:\n  b: foo(1)\n', withText('w: 2u', 'w: b')));
    expect(codes(p.findings)).toEqual(['refused-expression', 'failed-param']);
    expect(p.findings.map((f) => f.message).join('\n')).not.toContain('defines no');
    // An unknown name among params that all failed is still suggested from them.
    const q = parseSpec(withText('format: 1\n', 'format: 1\nparams:\n  wu: foo(1)\n', withText('w: 2u', 'w: wuu')));
    expect(q.findings.find((f) => f.code === 'unknown-param')?.message).toBe('`w`: `wuu` is not a param; did you mean `wu`?');
  });

  test('a syntax error marks the file unparsed', () => {
    const p = parseSpec(withText('    kind: simple', '    kind: simple: x'));
    expect(p.parsed).toBe(false);
  });
});

test('a mapping input with neither `resistor` nor `from` says what it takes, with examples', () => {
  const text = withText('input: 10u', 'input: { i: 10u }');
  const f = parseSpec(text).findings.find((x) => x.code === 'missing-key');
  expect(f?.message).toContain('`mirrors[0].input` needs one of `resistor` (Resistor from the input node to the opposite rail, Ω (e.g. `120k`)) or `from`');
  // Said once: not again by each alternative, nor in ajv's words.
  expect(parseSpec(text).findings.filter((x) => x.code === 'missing-key')).toHaveLength(1);
  expect(parseSpec(text).findings.map((x) => x.message).join('\n')).not.toMatch(/anyOf|must match/);
});
