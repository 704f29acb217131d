// A spec whose errors all sit inside mirrors is still solved for the other mirrors, so the
// designer keeps every other finding while typing (src/core/spec/index.ts, "partial").
// The figures of the mirrors left in are the same as in the whole file: checked against the
// analysis of the same text without the error.
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { analyzeText } from '../../src/core/analyze';
import { exampleTables } from '../example-tables';
import { fixAll } from '../../src/core/rules/fix-all';

const example = readFileSync(join(__dirname, '../../examples/sensor-afe.bias.yaml'), 'utf8');

function replaceOnce(text: string, from: string, to: string): string {
  const at = text.indexOf(from);
  if (at < 0 || text.indexOf(from, at + 1) >= 0) throw new Error(`fixture: \`${from}\` must occur once`);
  return text.slice(0, at) + to + text.slice(at + from.length);
}

const base = `format: 1
process:
  nmos: { kp: 280u, vt0: 0.45, lambda: 0.08 }
  pmos: { kp: 70u, vt0: 0.48, lambda: 0.1 }
supplies: { vdd: 1.8 }
mirrors:
  - name: sink
    kind: simple
    type: nmos
    input: 10u
    size: { w: 4u, l: 1u }
    output: { v: 0.2 }
  - name: typo
    kind: cascode
    type: nmos
    input: 10u
    size: { w: 4u, l: 1u }
    output: { v: 1.2 }
`;

describe('a typo in one mirror', () => {
  it('leaves that mirror out and solves the others with the same figures', () => {
    const clean = analyzeText(example, 'sensor-afe.bias.yaml', { tables: exampleTables() });
    // A mirror outside the example's bias network: a linked one would also change what feeds it.
    const typo = analyzeText(replaceOnce(example, 'kind: wilson-balanced\n', 'kind: wilson-balancd\n'), 'sensor-afe.bias.yaml', { tables: exampleTables() });
    const err = typo.findings.find((f) => f.severity === 'error');
    expect(err?.path.slice(0, 2)).toEqual(['mirrors', 6]);
    // Set aside with where its `name` is written (the editor's CodeLens on it goes there).
    expect(typo.withheld).toEqual([{ index: 6, name: 'wilson_p', range: typo.withheld![0]!.range }]);
    expect(typo.withheld![0]!.range.start.line).toBe(example.split('\n').findIndex((l) => l.includes('name: wilson_p')));
    expect(clean.withheld).toBeUndefined();
    expect(typo.mirrors.map((m) => m.name)).toEqual(clean.mirrors.map((m) => m.name).filter((n) => n !== 'wilson_p'));
    for (const r of typo.mirrors) {
      const same = clean.mirrors.find((c) => c.name === r.name)!;
      expect(r.iout).toBe(same.iout);
      expect(r.rout).toBe(same.rout);
      expect(r.path).toEqual(same.path);
    }
    // Hover anchors still point at the right mirrors (paths are file indices, not list positions).
    expect(typo.anchors.find((a) => a.kind === 'mirror' && a.report === 'res_bias')?.path).toEqual(['mirrors', 7]);
  });

  it('keeps the other mirrors\' design findings, without fixes until the error is fixed', () => {
    const fixed = analyzeText(base, 'p.bias.yaml');
    const low = fixed.findings.find((f) => f.code === 'not-saturated' || f.code === 'low-margin');
    expect(low?.path.slice(0, 2)).toEqual(['mirrors', 0]);
    expect(low?.fixes?.length ?? 0).toBeGreaterThan(0);
    const typing = analyzeText(replaceOnce(base, 'kind: cascode', 'kind: cascod'), 'p.bias.yaml');
    const kept = typing.findings.find((f) => f.code === low!.code);
    expect(kept?.range).toEqual(low!.range);
    expect(kept?.fixes).toBeUndefined();
    expect(typing.findings.some((f) => f.severity === 'error' && f.path[1] === 1)).toBe(true);
    expect(typing.mirrors.map((m) => m.name)).toEqual(['sink']);
    // Fix-all says why it applies nothing, and changes nothing.
    const text = replaceOnce(base, 'kind: cascode', 'kind: cascod');
    const all = fixAll(text, 'p.bias.yaml', (t) => analyzeText(t, 'p.bias.yaml'));
    expect(all.applied).toEqual([]);
    expect(all.text).toBe(text);
    expect(all.withheld).toBe(true);
    expect(fixAll(base, 'p.bias.yaml', (t) => analyzeText(t, 'p.bias.yaml')).withheld).toBeUndefined();
  });

  it('an error outside mirrors still withholds every mirror', () => {
    const r = analyzeText(replaceOnce(base, 'kp: 280u', 'kp: -280u'), 'p.bias.yaml');
    expect(r.findings.some((f) => f.severity === 'error' && f.path[0] === 'process')).toBe(true);
    expect(r.mirrors).toEqual([]);
  });
});
