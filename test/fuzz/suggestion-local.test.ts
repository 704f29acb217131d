/**
 * Did-you-mean fixes checked on the edited mirror's lines alone (src/core/spec/suggestion-fixes.ts)
 * must be exactly the fixes a whole-file re-read gives — same findings, same fixes, same edits,
 * same titles — on typos in the project's specs, on mutated copies of them and on the hostile
 * many-findings files. The whole-file re-read is the reference: it is the plain definition (apply
 * the edit, read the text again, compare the findings).
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { parseSpec } from '../../src/core/spec/index';
import { withSuggestionFixes } from '../../src/core/spec/suggestion-fixes';
import { MirrorFragments } from '../../src/core/spec/fragment';
import { WORK } from '../../src/core/work';
import { arbMutatedSpec, manyFindings, seedSpecs } from './inputs';

interface Both { fixes: number; local: boolean }

/** Both ways on one text: the same findings (asserted), how many carry a did-you-mean fix, and
 *  whether any check was done on a mirror's lines (fewer characters re-read than the text). */
function bothWays(text: string, file: string): Both {
  const parsed = parseSpec(text, file);
  const before = WORK.rereadChars;
  const local = withSuggestionFixes(parsed, file);
  const read = WORK.rereadChars - before;
  const whole = withSuggestionFixes(parsed, file, 'whole-file');
  expect(JSON.stringify(local, null, 1)).toBe(JSON.stringify(whole, null, 1));
  const fixes = local.filter((f) => f.fixes?.[0]?.title.startsWith('Change ')).length;
  return { fixes, local: fixes > 0 && read < fixes * text.length };
}

/** One to four typos (two letters swapped, one left out, one doubled, a word in capitals) in words
 *  of a seed spec: unknown keys, kinds, types, roles, params, mirror names. */
function arbTypos(seeds: { name: string; text: string }[]): fc.Arbitrary<{ text: string; file: string }> {
  const edit = fc.tuple(fc.nat(), fc.nat(), fc.constantFrom('swap', 'drop', 'double', 'upper'));
  return fc.tuple(fc.nat({ max: seeds.length - 1 }), fc.array(edit, { minLength: 1, maxLength: 4 })).map(([k, edits]) => {
    let text = seeds[k].text;
    for (const [at, c, op] of edits) {
      const words = [...text.matchAll(/[A-Za-z_][A-Za-z0-9_]{2,}/g)];
      if (words.length === 0) break;
      const w = words[at % words.length];
      const s = w[0];
      const j = c % (s.length - 1);
      const t = op === 'swap' ? s.slice(0, j) + s[j + 1] + s[j] + s.slice(j + 2)
        : op === 'drop' ? s.slice(0, j) + s.slice(j + 1)
          : op === 'double' ? s.slice(0, j) + s[j] + s.slice(j) : s.toUpperCase();
      text = text.slice(0, w.index) + t + text.slice(w.index + s.length);
    }
    return { text, file: seeds[k].name };
  });
}

describe('did-you-mean fixes checked on the edited mirror alone', () => {
  it('offer the same fixes as a whole-file re-read on typos in the project specs', () => {
    let fixes = 0;
    let local = 0;
    fc.assert(fc.property(arbTypos(seedSpecs()), ({ text, file }) => {
      const r = bothWays(text, file);
      fixes += r.fixes;
      if (r.local) local++;
    }), { numRuns: 150, seed: 5150 });
    // The typos must reach the fixes, and the local re-read, or the comparison says nothing.
    expect(fixes).toBeGreaterThan(100);
    expect(local).toBeGreaterThan(30);
  });

  it('offer the same fixes on mutated copies of the project specs', () => {
    let fixes = 0;
    fc.assert(fc.property(arbMutatedSpec(seedSpecs()), (input) => {
      fixes += bothWays(input.text, input.file).fixes;
    }), { numRuns: 150, seed: 77 });
    expect(fixes).toBeGreaterThan(10);
  });

  it('offer the same fixes on many unknown params (arbManyFindings)', () => {
    let fixes = 0;
    for (const n of [90, 200, 400]) {
      const input = manyFindings('unknown-param', n);
      const r = bothWays(input.text, input.file);
      expect(r.local).toBe(true);
      fixes += r.fixes;
    }
    // n/20 unknown names each, 20 checked at most per file.
    expect(fixes).toBe(5 + 10 + 20);
  });

  it('a `%YAML 1.1` file is read whole: the directive retypes the mirror lines (`yes`, `017`)', () => {
    const text = '%YAML 1.1\n---\nformat: 1\nprocess:\n  nmos: { kp: 280u, vt0: 0.45 }\nsupplies: { vdd: 1.8 }\nmirrors:\n'
      + '  - name: a\n    kind: simple\n    type: nmso\n    input: 10u\n    size: { w: 2u, l: 1u }\n    output: { v: 0.9 }\n';
    const parsed = parseSpec(text, 'v11.bias.yaml');
    const at = parsed.findings.find((f) => f.path.join('.') === 'mirrors.0.type')!.range;
    expect(MirrorFragments.of(parsed)!.holds(0, [{ range: at, newText: 'nmos' }])).toBe(false);
    const plain = parseSpec(text.replace('%YAML 1.1\n---\n', ''), 'v12.bias.yaml');
    const at12 = plain.findings.find((f) => f.path.join('.') === 'mirrors.0.type')!.range;
    expect(MirrorFragments.of(plain)!.holds(0, [{ range: at12, newText: 'nmos' }])).toBe(true);
    // Either way the fix is offered: `nmso` → `nmos`.
    expect(withSuggestionFixes(parsed, 'v11.bias.yaml').find((f) => f.path.join('.') === 'mirrors.0.type')?.fixes?.[0]?.title).toBe('Change `nmso` to `nmos`');
  });
});
