/**
 * A did-you-mean comes with a quick fix that applies the suggestion (src/core/spec/suggestion-fixes.ts):
 * the fix replaces exactly the marked token, the finding is gone once it is applied, and it is
 * never preferred (a guess at intent: fix-all does not apply it). The suggestions are the
 * messages' own did-you-means (edit distance, docs/findings.md `unknown-key`, `bad-unit`, …).
 */
import { describe, expect, test } from 'vitest';
import { analyzeText } from '../../src/core/analyze';
import { applyEdits } from '../../src/core/text/edits';
import { fixAll } from '../../src/core/rules/fix-all';
import { marked, withText } from './helpers';

interface Row { name: string; text: string; code: string; writes: string; file?: string }

const rows: Row[] = [
  { name: 'unknown mirror key', text: withText('    output:', '    ⟦requre⟧: { ratio: 1 }\n    output:'), code: 'unknown-key', writes: 'require' },
  { name: 'enum value', text: withText('kind: simple', 'kind: ⟦cascde⟧'), code: 'bad-value', writes: 'cascode' },
  { name: 'enum value in quotes keeps its quotes', text: withText('kind: simple', 'kind: ⟦"simpel"⟧'), code: 'bad-value', writes: '"simple"' },
  { name: 'a current where a length belongs keeps number and prefix', text: withText('w: 2u', 'w: ⟦10uA⟧'), code: 'bad-unit', writes: '10u' },
  { name: 'kilo written K', text: withText('input: 10u', 'input: { resistor: ⟦120KΩ⟧ }'), code: 'bad-unit', writes: '120kΩ' },
  { name: 'case of a unit symbol', text: withText('vdd: 1.8', 'vdd: ⟦1800 mv⟧'), code: 'bad-unit', writes: '1800 mV' },
  { name: 'unknown role', text: withText('    output:', '    devices: { ⟦otu⟧: { m: 2 } }\n    output:'), code: 'unknown-role', writes: 'out' },
  {
    name: 'unknown param: only the name inside the expression',
    text: withText('w: 2u', 'w: 2*⟦wuu⟧', withText('mirrors:', 'params: { wu: 1u }\nmirrors:')), code: 'unknown-param', writes: 'wu',
  },
  {
    name: 'JSON: a quoted key stays quoted',
    text: '{ "format": 1, "process": { "nmos": { "kp": "280u", "vt0": 0.45 }, "pmos": { "kp": "70u", "vt0": 0.48 } },\n' +
      '  "supplies": { ⟦"vddd"⟧: 1.8 } }\n',
    code: 'unknown-key', writes: '"vdd"', file: 'case.bias.json',
  },
];

describe('did-you-mean quick fixes', () => {
  test.each(rows)('$name', (row) => {
    const { text, range } = marked(row.text);
    const file = row.file ?? 'case.bias.yaml';
    const f = analyzeText(text, file).findings.find((x) => x.code === row.code && JSON.stringify(x.range) === JSON.stringify(range));
    expect(f, JSON.stringify(analyzeText(text, file).findings, null, 1)).toBeDefined();
    expect(f!.fixes).toHaveLength(1);
    const fix = f!.fixes![0]!;
    expect(fix.preferred).toBeUndefined();
    expect(fix.edits).toEqual([{ range, newText: row.writes }]);
    const after = analyzeText(applyEdits(text, fix.edits), file);
    expect(after.findings.filter((x) => x.code === row.code && JSON.stringify(x.path) === JSON.stringify(f!.path))).toEqual([]);
  });

  test('no fix when the suggestion would make a duplicate key', () => {
    const text = withText('    output:', '    require: { ratio: 1 }\n    requre: { ratio: 2 }\n    output:');
    const f = analyzeText(text, 'case.bias.yaml').findings.find((x) => x.code === 'unknown-key');
    expect(f?.message).toMatch(/did you mean `require`\?/);
    expect(f?.fixes).toBeUndefined();
  });

  test('fix-all does not apply a guess', () => {
    const text = withText('kind: simple', 'kind: cascde');
    const r = fixAll(text, 'case.bias.yaml', (t) => analyzeText(t, 'case.bias.yaml'));
    expect(r.text).toBe(text);
    expect(r.unfixed.map((u) => u.finding.code)).toEqual(['bad-value']);
  });
});
