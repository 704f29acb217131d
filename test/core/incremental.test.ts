/**
 * Incremental analysis (src/core/analysis-cache.ts): a file analysed again after an edit, with
 * the cache its earlier analyses filled, must give exactly the report a fresh analysis gives —
 * every figure, finding, message, fix and edit — whatever the edit touched: a number inside one
 * mirror, a mirror's name, the process, a param, a line added above everything, or a keystroke
 * that breaks the YAML for a moment. The fresh analysis is the reference.
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { analyzeText, type AnalyzeOptions } from '../../src/core/analyze';
import { AnalysisCache } from '../../src/core/analysis-cache';
import type { FileReport } from '../../src/core/types';
import { faultySpecText } from '../../scripts/spec-texts';
import { arbFaultySpec } from '../fuzz/faulty-specs';

/** One edit as a designer makes it: replace [at, at + del) of the text by `ins`. */
interface Edit { at: number; del: number; ins: string }

const arbEdit: fc.Arbitrary<Edit> = fc.record({
  at: fc.double({ min: 0, max: 1, noNaN: true, maxExcluded: true }),
  del: fc.integer({ min: 0, max: 3 }),
  ins: fc.constantFrom('', '1', '5', '0.', 'u', '2*', ' ', '\n', '#', ':', 'x', '\n  - name: extra\n', 'pmos', 'nmos'),
});

/** Applies an edit at a fraction of the text's length, after a digit when there is one near (sizes, currents, voltages). */
function apply(text: string, e: Edit): string {
  let at = Math.floor(e.at * text.length);
  const digit = text.slice(at).search(/\d/);
  if (digit >= 0 && digit < 40) at += digit;
  return text.slice(0, at) + e.ins + text.slice(Math.min(text.length, at + e.del));
}

/**
 * A solve that its time budget ended (circuit/newton.ts) gives what the clock allowed, and so may
 * a fix's re-check on a busy machine: two fresh analyses of such a text differ too. A text whose
 * fresh analyses disagree, or whose incremental analysis ran out of a solve's time budget, is not
 * compared (and counted, to keep them rare).
 */
let skipped = 0;

/** A solve of this report ran out of its time budget. */
function clockBound(r: FileReport): boolean {
  return r.mirrors.some((m) => m.solveNote?.includes('time budget'));
}

function same(text: string, cache: AnalysisCache, opts: AnalyzeOptions = {}): FileReport {
  const incremental = analyzeText(text, 'edit.bias.yaml', opts, { cache });
  const a = JSON.stringify(incremental);
  const fresh = JSON.stringify(analyzeText(text, 'edit.bias.yaml', opts));
  if (a !== fresh && (clockBound(incremental) || fresh !== JSON.stringify(analyzeText(text, 'edit.bias.yaml', opts)))) skipped++;
  else expect(a).toBe(fresh);
  return incremental;
}

describe('incremental analysis', () => {
  it('equals a fresh analysis after random edits of random faulty specs', () => {
    let fixes = 0;
    let compared = 0;
    fc.assert(fc.property(arbFaultySpec, fc.array(arbEdit, { minLength: 1, maxLength: 6 }), (base, edits) => {
      const cache = new AnalysisCache();
      let text = base;
      same(text, cache);
      for (const e of edits) {
        text = apply(text, e);
        const r = same(text, cache);
        compared++;
        fixes += r.findings.reduce((n, f) => n + (f.fixes?.length ?? 0), 0);
      }
    }), { numRuns: 15, seed: 1919 });
    // The edited specs must keep offering fixes, or the comparison says little about re-checks.
    expect(fixes).toBeGreaterThan(30);
    expect(skipped).toBeLessThan(compared / 2);
  });

  it('equals a fresh analysis on a large spec edited in one mirror, the process and a param, with curves', () => {
    const cache = new AnalysisCache();
    const opts: AnalyzeOptions = { curve: true };
    let text = faultySpecText(30);
    same(text, cache, opts);
    text = text.replace(/input: (\d+)u/, 'input: 1$1u');                       // one mirror's current
    same(text, cache, opts);
    text = text.replace('wn: 4u', 'wn: 5u');                                   // a param no mirror reads
    same(text, cache, opts);
    text = text.replace('vt0: 0.45', 'vt0: 0.47');                             // the process: every mirror again
    same(text, cache, opts);
    text = text.replace(/name: (\w+)_3\n/, 'name: $1_3b\n');                   // a name
    same(text, cache, opts);
    text = `# a comment above everything\n${text}`;                            // every line moves
    same(text, cache, opts);
  });

  it('solves and re-checks again only the edited mirror', () => {
    const cache = new AnalysisCache();
    const text = faultySpecText(30);
    const report = analyzeText(text, 'edit.bias.yaml', {}, { cache });
    const first = cache.stats;
    expect(first.unitsSolved).toBeGreaterThanOrEqual(30);
    expect(first.rechecksRun).toBeGreaterThan(10);
    const edited = text.replace(/input: (\d+)u/, 'input: 1$1u');
    analyzeText(edited, 'edit.bias.yaml', {}, { cache });
    const after = cache.stats;
    // The first mirror is the one edited: it is solved again (in the spec's process, and in the
    // EKV model a weak-inversion fix is verified in), and so is every mirror that did not
    // converge (not kept); every other mirror is read back, and so are the other re-checks.
    const failed = report.mirrors.filter((m) => !m.converged).length;
    expect(after.unitsSolved).toBeLessThanOrEqual(2 * (1 + failed));
    expect(after.unitsReused).toBeGreaterThanOrEqual(29 - failed);
    expect(after.rechecksReused).toBeGreaterThan(0);
    expect(after.rechecksRun).toBeLessThan(first.rechecksRun);
  });
});
