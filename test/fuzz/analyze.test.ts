/**
 * The whole analysis on hostile input (test/fuzz/inputs.ts): mutated real specs, generated specs,
 * random bytes, deep nesting, extreme numbers, odd Unicode, anchors, aliases, tags, merge keys,
 * alias bombs, 1 MB files. Nothing may throw, report an internal error, hand out a range outside
 * the document or do unbounded work (test/fuzz/properties.ts). Bounded time is held as bounded
 * work, counted and never timed (src/core/work.ts: within a stated multiple of the input's size),
 * so a busy machine cannot fail it and a slow path cannot hide in a generous clock; the slowest
 * case's wall time is printed as a figure only. `npm run fuzz` runs the same properties on
 * 100 000 cases with its strict 200 ms wall-clock bound (a command, like the bench). The single
 * refusals below are shown by their finding, which is reached before any parse.
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { analyzeText } from '../../src/core/analyze';
import { arbFuzzInput, manyFindings, seedSpecs } from './inputs';
import { checkText, lineLengths, WORK_PER_CHAR } from './properties';

const CASES = Number(process.env.QPOINT_FUZZ_CASES ?? 2000);

describe('analyzeText on hostile input', () => {
  it(`${CASES} random, mutated and hostile inputs: no throw, no internal error, ranges inside, bounded work`, () => {
    const seeds = seedSpecs();
    for (const s of seeds) analyzeText(s.text, s.name); // warm-up: JIT, the mathjs instance
    let slowest = { ms: 0, kind: '', file: '' };
    let checked = 0;
    fc.assert(fc.property(arbFuzzInput(seeds), (input) => {
      const r = checkText(input.text, input.file);
      checked++;
      if (r.ms > slowest.ms) slowest = { ms: r.ms, kind: input.kind, file: input.file };
      // Every property, the work bounds included (properties.ts: workProblems).
      expect(r.problems, `${input.kind} ${JSON.stringify(input.text.slice(0, 200))}`).toEqual([]);
    }), { numRuns: CASES, seed: Number(process.env.QPOINT_FUZZ_SEED ?? 20260101) });
    expect(checked).toBeGreaterThanOrEqual(CASES);
    // A figure for the log, not a bound: the machine running the suite may be busy.
    console.log(`fuzz: slowest of ${checked} cases ${slowest.ms.toFixed(0)} ms (${slowest.kind}, ${slowest.file}); \`npm run fuzz\` bounds each at 200 ms`);
    // vitest's timeout only guards against a hang here (the work is bounded by counting): a
    // quiet machine runs the cases in about a minute, one shared by other work in two or more.
  }, 600_000);

  it('990 params and 50 mirrors naming unknown params: each did-you-mean searched once, each fix checked on its mirror\'s lines', () => {
    // arbManyFindings' unknown-param case near its largest size (inputs.ts): once seconds, when
    // every fix check read the whole file again and searched every name's did-you-mean again.
    const input = manyFindings('unknown-param', 990);
    checkText(input.text, input.file);  // warm-up, for the printed figure
    const r = checkText(input.text, input.file);
    expect(r.problems).toEqual([]);
    const findings = r.report!.findings;
    // 50 unknown names q0…q49, each offered the param one letter away (did-you-mean, verified).
    expect(findings.map((f) => f.code)).toEqual(Array(50).fill('unknown-param'));
    expect(findings[49].message).toBe('`w`: `q49` is not a param; did you mean `p49`?');
    expect(findings.filter((f) => f.fixes?.[0]?.edits[0]?.newText === f.message.match(/did you mean `(p\d+)`/)?.[1])).toHaveLength(20);
    // Work, counted: the first read's searches only (each name against at most 500 params of
    // about its length), and 20 fix checks (MAX_SUGGESTION_CHECKS) that each re-read one mirror's
    // six lines (about 110 characters), not the file's 15 500.
    const n = input.text.length;
    expect(n).toBeGreaterThan(15_000);
    expect(r.work.distances).toBeLessThanOrEqual(50 * 500);
    expect(r.work.distances).toBeLessThanOrEqual(WORK_PER_CHAR.distances * n);
    expect(r.work.rereadChars).toBeLessThanOrEqual(20 * 150);
    console.log(`990 params, 50 unknown names: ${r.work.distances} edit distances, ${r.work.rereadChars} characters re-read for ${n}; ${r.ms.toFixed(0)} ms`);
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
