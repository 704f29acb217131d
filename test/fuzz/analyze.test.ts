/**
 * The whole analysis on hostile input (test/fuzz/inputs.ts): mutated real specs, generated specs,
 * random bytes, deep nesting, extreme numbers, odd Unicode, anchors, aliases, tags, merge keys,
 * alias bombs, 1 MB files. Nothing may throw, report an internal error, hand out a range outside
 * the document or take long (test/fuzz/properties.ts). `npm run fuzz` runs the same properties on
 * 100 000 cases with the strict 200 ms bound; here the bound is generous because the machine
 * running the suite may be busy with other work. That per-case bound is the property itself
 * (every input is analysed in bounded time); the single refusals below are shown by their
 * finding, which is reached before any parse, not by a clock.
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { analyzeText } from '../../src/core/analyze';
import { arbFuzzInput, seedSpecs } from './inputs';
import { checkText, lineLengths } from './properties';

const CASES = Number(process.env.QPOINT_FUZZ_CASES ?? 2000);
/** ms; the strict bound of `npm run fuzz` is 200 ms. */
const LOOSE_MS = 3000;

describe('analyzeText on hostile input', () => {
  it(`${CASES} random, mutated and hostile inputs: no throw, no internal error, ranges inside, in time`, () => {
    const seeds = seedSpecs();
    for (const s of seeds) analyzeText(s.text, s.name); // warm-up: JIT, the mathjs instance
    let slowest = 0;
    fc.assert(fc.property(arbFuzzInput(seeds), (input) => {
      const r = checkText(input.text, input.file);
      slowest = Math.max(slowest, r.ms);
      expect(r.problems, `${input.kind} ${JSON.stringify(input.text.slice(0, 200))}`).toEqual([]);
      expect(r.ms).toBeLessThan(LOOSE_MS);
    }), { numRuns: CASES, seed: Number(process.env.QPOINT_FUZZ_SEED ?? 20260101) });
    expect(slowest).toBeGreaterThan(0);
  });

  it('a 1 MB file is refused at once with too-large at 1:1', () => {
    const text = 'format: 1\n' + '# filler\n'.repeat(120_000);
    const r = analyzeText(text, 'big.bias.yaml');
    expect(r.findings.map((f) => f.code)).toEqual(['too-large']);
    expect(r.findings[0].range.start).toEqual({ line: 0, character: 0 });
  });

  it('a bare CR line break is a finding on its line, with positions any LSP client reads alike', () => {
    const text = 'format: 1\nsupplies: { vdd: 1.8 }\rmirrors: []\n';
    const r = analyzeText(text, 'cr.bias.yaml');
    expect(r.findings.map((f) => f.code)).toEqual(['bare-cr']);
    expect(r.findings[0].range).toEqual({ start: { line: 1, character: 0 }, end: { line: 1, character: 22 } });
    expect(lineLengths(text)[1]).toBe(22);
    // CRLF is fine.
    expect(analyzeText(text.replace('\r', '\r\n'), 'crlf.bias.yaml').findings.map((f) => f.code)).not.toContain('bare-cr');
    // Before a control byte the bare CR is what is reported (the byte's position depends on it).
    const both = analyzeText('ab\r\u0002cd', 'both.bias.yaml').findings;
    expect(both.map((f) => f.code)).toEqual(['bare-cr']);
    expect(both[0].range).toEqual({ start: { line: 0, character: 0 }, end: { line: 0, character: 2 } });
    expect(analyzeText('a\u0002\rb', 'b.bias.yaml').findings.map((f) => [f.code, f.range.start.character])).toEqual([['binary-input', 1]]);
  });

  it('nesting past SPEC_LIMITS.maxFlowDepth is too-deep at the bracket, found before parsing', () => {
    const text = 'format: 1\nx: ' + '['.repeat(20_000) + ']'.repeat(20_000) + '\n';
    const r = analyzeText(text, 'deep.bias.yaml');
    expect(r.findings.map((f) => f.code)).toEqual(['too-deep']);
    expect(r.findings[0].range.start).toEqual({ line: 1, character: 3 + 500 });
    // Brackets inside quotes and comments do not count.
    const quoted = `format: 1\ntitle: "${'['.repeat(600)}"  # ${'{'.repeat(600)}\n`;
    expect(analyzeText(quoted, 'q.bias.yaml').findings.map((f) => f.code)).not.toContain('too-deep');
  });

  it('an alias bomb is too-many-aliases at its first alias', () => {
    let text = 'format: 1\na0: &a0 [x, x, x, x, x, x, x, x, x, x]\n';
    for (let i = 1; i < 8; i++) text += `a${i}: &a${i} [${Array(10).fill(`*a${i - 1}`).join(', ')}]\n`;
    const r = analyzeText(text, 'bomb.bias.yaml');
    expect(r.findings.map((f) => f.code)).toEqual(['too-many-aliases']);
    expect(r.findings[0].range.start).toEqual({ line: 2, character: 9 });
  });
});
