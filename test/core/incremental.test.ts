/**
 * Incremental analysis (src/core/analysis-cache.ts): a file analysed again after an edit, with
 * the cache its earlier analyses filled, must give exactly the report a fresh analysis gives —
 * every figure, finding, message, fix and edit — whatever the edit touched: a number inside one
 * mirror, a mirror's name, the process, a param, a line added above everything, a keystroke
 * that breaks the YAML for a moment, a member of a bias network, or the text of a
 * characterisation table the front end hands in. The fresh analysis is the reference.
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { analyzeText, type AnalyzeOptions } from '../../src/core/analyze';
import { AnalysisCache } from '../../src/core/analysis-cache';
import type { FileReport } from '../../src/core/types';
import { faultySpecText, networkTreeText } from '../../scripts/spec-texts';
import { readFileSync } from 'node:fs';
import { EXAMPLE_PATH, exampleTables } from '../example-tables';
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

const EXAMPLE = readFileSync(EXAMPLE_PATH, 'utf8');

/** A table's text with every current (the last column) times `k`: another device, the same grid. */
function scaleTable(csv: string, k: number): string {
  return k === 1 ? csv : csv.replace(/^([^#\n][^,\n]*,[^,\n]*,[^,\n]*,[^,\n]*,)([0-9.e+-]+)$/gm, (_, head: string, id: string) => `${head}${Number(id) * k}`);
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

  it('reads an edit inside one mirror alone and equals a fresh analysis, whatever the edit does to the lines or the YAML', () => {
    // Edits as typed, at a line of the spec: a digit in a current or a multiplier, a comment
    // line or a blank line added, a line break removed (lines added and removed inside an item
    // and between items), a character that breaks the YAML or the schema for a moment, and an
    // edit outside the mirrors (the process, a line above everything). Each step is analysed
    // with the cache and compared with a fresh analysis.
    const arbTyped = fc.record({
      line: fc.nat(),
      what: fc.constantFrom('digit', 'digit', 'digit', 'comment', 'blank', 'join', 'colon', 'brace', 'process', 'above'),
    });
    /** `line` counts lines from the list of mirrors (most edits are made there). */
    const typed = (text: string, step: { line: number; what: string }): string => {
      if (step.what === 'above') return `# above everything\n${text}`;
      if (step.what === 'process') return text.replace(/vt0: 0\.(\d+)/, (_, d: string) => `vt0: 0.${d}1`);
      const starts = [0, ...[...text.matchAll(/\n/g)].map((m) => m.index + 1)].filter((o) => o < text.length);
      const first = starts.findIndex((o) => text.startsWith('mirrors:', o));
      const at = starts[first + 1 + (step.line % (starts.length - first - 1))]!;
      const end = text.indexOf('\n', at) < 0 ? text.length : text.indexOf('\n', at);
      const line = text.slice(at, end);
      const put = (o: number, s: string, del = 0) => text.slice(0, o) + s + text.slice(o + del);
      switch (step.what) {
        case 'digit': {
          const m = /(?:input|m): (\d)/.exec(line);
          return m ? put(at + m.index + m[0].length - 1, '1') : put(end, ' ');
        }
        case 'comment': return put(end, '\n    # a note');
        case 'blank': return put(end, '\n');
        case 'join': return end < text.length ? put(end, '', 1) : text;
        case 'colon': return put(at + Math.floor(line.length / 2), ':');
        default: return put(at + Math.floor(line.length / 2), '{');
      }
    };
    let spliced = 0;
    let compared = 0;
    fc.assert(fc.property(fc.array(arbTyped, { minLength: 1, maxLength: 8 }), (steps) => {
      const cache = new AnalysisCache();
      let text = faultySpecText(12);
      same(text, cache);
      for (const step of steps) {
        text = typed(text, step);
        same(text, cache);
        compared++;
        spliced += cache.stats.textsSpliced;
      }
    }), { numRuns: 15, seed: 2019 });
    // Many steps keep the spec free of spec findings: those are read alone.
    expect(spliced).toBeGreaterThan(compared / 4);
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
    // The spec is read again from the last parse: only the edited mirror's lines; the other
    // mirrors' findings and fixes are read back.
    expect(after.textsSpliced).toBeGreaterThanOrEqual(1);
    expect(after.textsRead).toBe(0);
    expect(after.mirrorsChecked).toBe(1);
    expect(after.mirrorsReused).toBe(29);
  });

  it('equals a fresh analysis after random edits of the example (a bias network, references, a table flavour) and of its table', () => {
    const tables = exampleTables();
    const [name, csv] = Object.entries(tables)[0]!;
    // A number in the text made another (a digit added after a digit), or the table's currents scaled.
    const arbStep = fc.oneof(
      fc.record({ at: fc.double({ min: 0, max: 1, noNaN: true, maxExcluded: true }), del: fc.constant(0), ins: fc.constantFrom('1', '5', '0', '2') }),
      fc.constantFrom(1, 1.02, 0.97),
    );
    let reused = 0;
    fc.assert(fc.property(fc.array(arbStep, { minLength: 1, maxLength: 4 }), (steps) => {
      const cache = new AnalysisCache();
      let text = EXAMPLE;
      let opts: AnalyzeOptions = { tables };
      same(text, cache, opts);
      for (const step of steps) {
        if (typeof step === 'number') opts = { tables: { ...tables, [name]: scaleTable(csv as string, step) } };
        else text = apply(text, step);
        same(text, cache, opts);
        reused += cache.stats.unitsReused;
      }
    }), { numRuns: 6, seed: 1919 });
    // Most edits leave most of the example's mirrors as they were: their reports were read back.
    expect(reused).toBeGreaterThan(0);
  });

  it('solves a table device again when the table text changes under the same name, and equals a fresh analysis', () => {
    const tables = exampleTables();
    const [name, csv] = Object.entries(tables)[0]!;
    expect(typeof csv).toBe('string');
    const cache = new AnalysisCache();
    same(EXAMPLE, cache, { tables });
    const before = cache.stats.unitsSolved;
    same(EXAMPLE, cache, { tables });
    expect(cache.stats.unitsSolved).toBe(0);
    // Every current of the table 2 % higher: a process with another low-threshold device.
    const scaled = scaleTable(csv as string, 1.02);
    expect(scaled).not.toBe(csv);
    const r = same(EXAMPLE, cache, { tables: { ...tables, [name]: scaled } });
    // The process (its flavours' tables) is in every unit's key: the whole file is solved again.
    expect(cache.stats.unitsSolved).toBe(before);
    expect(cache.stats.unitsReused).toBe(0);
    expect(r.mirrors.some((m) => m.devices.some((d) => d.table === name))).toBe(true);
  });

  it('solves every member of a bias network again after an edit of one member, and reads the other mirrors back', () => {
    const cache = new AnalysisCache();
    // A linked tree of 7 mirrors beside 5 unlinked ones.
    const loose = Array.from({ length: 5 }, (_, k) => `  - { name: u${k}, kind: simple, type: nmos, input: ${10 + k}u, size: { w: 8u, l: 4u }, output: { v: 0.9 } }\n`);
    const a = networkTreeText(7) + loose.join('');
    same(a, cache);
    // The root's size: a member of the network.
    const text = a.replace(/(name: t0, .*?size: \{ w: )8u/, '$110u');
    expect(text).not.toBe(a);
    const r = same(text, cache);
    const members = new Set((r.networks ?? []).flatMap((n) => n.members));
    expect(members.size).toBe(7);
    const memberReports = r.mirrors.filter((m) => members.has(m.mirror)).length;
    expect(memberReports).toBe(14);
    // Every member's report is solved again (its network's key changed), the loose ones read back.
    expect(cache.stats.unitsSolved).toBe(memberReports);
    expect(cache.stats.unitsReused).toBe(r.mirrors.length - memberReports);
  });

  it('equals a fresh analysis while edits inside other mirrors decide whether the EKV fix is offered, and after edits outside the mirrors', () => {
    // faultySpecText(6): `simple_nmos_0` runs in weak inversion (square-law-weak-inversion). Its
    // fix, `model: ekv`, is re-checked on the whole file, where `cascode_nmos_1` and
    // `wilson_nmos_3` leave saturation in the EKV model until their output voltages are raised:
    // the fix is offered only while both are. Each keystroke reads the re-check's other mirrors
    // back (by their items) and finds the edited one's again.
    const cache = new AnalysisCache();
    let text = faultySpecText(6);
    const offersEkv = (r: FileReport): boolean => r.findings.some((f) => f.code === 'square-law-weak-inversion' && (f.fixes ?? []).some((x) => x.edits.some((e) => e.newText === 'ekv')));
    const offered = [offersEkv(same(text, cache))];
    const step = (from: string, to: string): void => {
      const next = text.replace(from, to);
      expect(next).not.toBe(text);
      text = next;
      offered.push(offersEkv(same(text, cache)));
    };
    step('output: { v: 0.67 }', 'output: { v: 0.97 }');      // cascode_nmos_1 raised
    step('output: { v: 0.71 }', 'output: { v: 0.91 }');      // wilson_nmos_3 raised: the fix holds
    step('output: { v: 0.97 }', 'output: { v: 0.67 }');      // cascode_nmos_1 back: refused again
    step('output: { v: 0.67 }', 'output: { v: 0.97 }');      // and raised again
    step('input: 10u', 'input: 10u ');                       // typed at a line's end (a line break after the edit)
    step('lu: 1u', 'lu: 1u # unit length');                  // a comment outside the mirrors: the whole text is scanned
    step('grid: 10n', 'grid: 10n ');                         // a space after a process value
    step('input: 8u', 'input: 8\ru');                        // a bare carriage return: refused for a moment
    step('input: 8\ru', 'input: 8u');
    step('name: simple_pmos_5', 'name: simple_pmos_5b');     // a name: every re-check's context
    expect(offered).toEqual([false, false, true, false, true, true, true, true, false, true, true]);
  });
});
