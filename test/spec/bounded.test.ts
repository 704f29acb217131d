/**
 * Hostile shapes of issue 14 (items 3 and 4) read to a finding, not to a hang or a stack
 * overflow: many findings of one kind are listed up to SPEC_LIMITS.maxFindingsPerCode and counted
 * in one `more-findings` (docs/findings.md), long param chains resolve, long loops are reported
 * once per param with a short message. Time is the fuzzer's business (`npm run fuzz`, 200 ms
 * bound) and the CLI runs in the report; these tests assert the findings only.
 */
import { describe, expect, test } from 'vitest';
import { parseSpec } from '../../src/core/spec/index';
import { analyzeText } from '../../src/core/analyze';
import { SPEC_LIMITS } from '../../src/core/defaults';
import type { Finding } from '../../src/core/types';
import { BASE, withText } from './helpers';

const MIRROR = BASE.slice(BASE.indexOf('mirrors:'));
const HEAD = BASE.slice(0, BASE.indexOf('mirrors:'));

function byCode(findings: Finding[]): Record<string, number> {
  const out: Record<string, number> = {};
  for (const f of findings) out[f.code] = (out[f.code] ?? 0) + 1;
  return out;
}

describe('many findings of one kind', () => {
  test('SPEC_LIMITS lists 100 findings of a code', () => {
    expect(SPEC_LIMITS.maxFindingsPerCode).toBe(100);  // docs/findings.md, more-findings
  });

  test('40 000 unknown keys: 100 listed, one more-findings counting the other 39 900 at the 101st', () => {
    let keys = '';
    for (let i = 0; i < 40_000; i++) keys += `k${i}: 1\n`;
    const p = parseSpec(BASE + keys, 'keys.bias.yaml');
    expect(byCode(p.findings)).toEqual({ 'unknown-key': 100, 'more-findings': 1 });
    const more = p.findings.find((f) => f.code === 'more-findings')!;
    expect(more.severity).toBe('error');
    // BASE has 12 lines; k100 is on line 12 + 100 (0-based), its key from column 0.
    expect(more.range).toEqual({ start: { line: 112, character: 0 }, end: { line: 112, character: 4 } });
    expect(more.message).toBe('39900 more `unknown-key` errors are not listed (qpoint lists the first 100 of each kind); '
      + 'the next one: unknown key `k100` in the spec; expected one of format, title, process, supplies, limits, params, mirrors, corners, analysis');
    expect(p.spec).toBeUndefined();
  });

  test('40 000 bad param names: 100 bad-name listed, the rest counted', () => {
    let params = 'params:\n';
    for (let i = 0; i < 40_000; i++) params += `  ${i}x: 1\n`;
    const p = parseSpec(HEAD + params + MIRROR, 'names.bias.yaml');
    expect(byCode(p.findings)).toEqual({ 'bad-name': 100, 'more-findings': 1 });
    expect(p.findings.find((f) => f.code === 'more-findings')!.message).toMatch(/^39900 more `bad-name` errors are not listed .*the next one: param name `100x` must start/);
  });

  test('20 000 empty mirrors: every one set aside, five missing keys each, counted', () => {
    const p = parseSpec(HEAD + 'mirrors:\n' + '  - {}\n'.repeat(20_000), 'empty.bias.yaml');
    // A mirror needs name, kind, type, input and output (schema/qpoint-bias.schema.json).
    expect(byCode(p.findings)).toEqual({ 'missing-key': 100, 'more-findings': 1 });
    expect(p.findings.find((f) => f.code === 'more-findings')!.message).toMatch(/^99900 more `missing-key` errors/);
    // Findings counted but not listed still set their mirrors aside.
    expect(p.withheld?.length).toBe(20_000);
    expect(p.spec?.mirrors).toEqual([]);
    const r = analyzeText(HEAD + 'mirrors:\n' + '  - {}\n'.repeat(20_000), 'empty.bias.yaml', { anchors: false });
    expect(r.withheld?.length).toBe(20_000);
    expect(r.findings.some((f) => f.code === 'internal-error')).toBe(false);
  });

  test('below the cap nothing changes: 100 unknown keys are 100 findings', () => {
    let keys = '';
    for (let i = 0; i < 100; i++) keys += `k${i}: 1\n`;
    expect(byCode(parseSpec(BASE + keys).findings)).toEqual({ 'unknown-key': 100 });
  });
});

describe('params: long chains and loops', () => {
  test('a chain of 6 000 params resolves (no stack overflow): p5999 = 6000', () => {
    let params = 'params:\n  p0: 1\n';
    for (let i = 1; i < 6000; i++) params += `  p${i}: p${i - 1} + 1\n`;
    const p = parseSpec(HEAD + params + withText('w: 2u', 'w: p5999 * 1n', MIRROR), 'chain.bias.yaml');
    expect(p.findings).toEqual([]);
    const m = p.spec!.mirrors[0];
    if (m.kind === 'netlist') throw new Error('template mirror expected');
    expect(m.devices.ref.w).toBeCloseTo(6e-6, 15);  // 6000 × 1 nm
  });

  test('a loop of 10 000 params: each reported once with a short message, the rest counted', () => {
    let params = 'params:\n';
    for (let i = 0; i < 10_000; i++) params += `  p${i}: p${(i + 1) % 10_000} + 1\n`;
    const p = parseSpec(HEAD + params + MIRROR, 'loop.bias.yaml');
    expect(byCode(p.findings)).toEqual({ 'param-cycle': 100, 'more-findings': 1 });
    const first = p.findings.find((f) => f.code === 'param-cycle')!;
    expect(first.path).toEqual(['params', 'p0']);
    expect(first.message).toBe('param `p0` depends on itself: p0 → p1 → p2 → … (9996 more) → p9999 → p0');
    expect(p.findings.find((f) => f.code === 'more-findings')!.message).toMatch(/^9900 more `param-cycle` errors/);
  });

  test('many references back into one loop: each param of the loop reported once', () => {
    // p_i uses p_{i+1} and p0; p3999 closes the loop: every back reference meets the same loop.
    let params = 'params:\n';
    for (let i = 0; i < 4000; i++) params += `  p${i}: p${(i + 1) % 4000} + p0\n`;
    const p = parseSpec(HEAD + params + MIRROR, 'loops.bias.yaml');
    expect(byCode(p.findings)).toEqual({ 'param-cycle': 100, 'more-findings': 1 });
    expect(p.findings.find((f) => f.code === 'more-findings')!.message).toMatch(/^3900 more `param-cycle` errors/);
  });

  test('short loops keep their whole path', () => {
    const p = parseSpec(HEAD + 'params:\n  a: b\n  b: c\n  c: a\n  d: d\n' + MIRROR);
    expect(p.findings.map((f) => f.message)).toEqual([
      'param `a` depends on itself: a → b → c → a',
      'param `b` depends on itself: b → c → a → b',
      'param `c` depends on itself: c → a → b → c',
      'param `d` depends on itself: d → d',
    ]);
  });
});
