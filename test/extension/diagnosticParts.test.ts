/**
 * The editor's diagnostics in parts (blocks of mirrors): a keystroke inside one mirror hands VS
 * Code that mirror's part alone, an edit that moves lines every part below it, and parts that
 * give the same diagnostics are left alone. The specs are the generated ones of the bench
 * (scripts/spec-texts.ts: mirrors of every kind with random sizes, about one finding each);
 * which findings they have is the core's business, these checks only compare two analyses.
 */
import { describe, expect, it } from 'vitest';
import { analyzeText } from '../../src/core/analyze';
import { AnalysisCache } from '../../src/core/analysis-cache';
import type { Finding } from '../../src/core/types';
import { changedParts, compactParts, expandParts, MIRRORS_PER_PART, partOf, sameDiagnostics, SentParts, splitParts } from '../../src/extension/diagnosticParts';
import { faultySpecText } from '../../scripts/spec-texts';

const at = (line: number) => ({ start: { line, character: 4 }, end: { line, character: 9 } });
const finding = (path: Finding['path'], line: number, message = 'm'): Finding =>
  ({ severity: 'warning', code: 'ratio-error', path, range: at(line), message });

/** The line of mirror `i`'s input (faultySpecText writes name, kind, type, input). */
function inputLine(text: string, i: number): number {
  const lines = text.split('\n');
  return lines.findIndex((l) => new RegExp(`^ {2}- name: \\S+_${i}$`).test(l)) + 3;
}

function replaceLine(text: string, line: number, next: string): string {
  const lines = text.split('\n');
  lines[line] = next;
  return lines.join('\n');
}

describe('parts of a file\'s findings', () => {
  it('puts a finding in its mirror\'s block and a finding outside the mirrors in the first', () => {
    expect(MIRRORS_PER_PART).toBe(32);
    expect(partOf(finding(['mirrors', 0, 'name'], 1))).toBe(0);
    expect(partOf(finding(['mirrors', 31, 'input'], 1))).toBe(0);
    expect(partOf(finding(['mirrors', 32], 1))).toBe(1);
    expect(partOf(finding(['mirrors', 250, 'devices', 'out'], 1))).toBe(7);
    expect(partOf(finding(['process', 'nmos', 'kp'], 1))).toBe(0);
    expect(partOf(finding([], 0))).toBe(0);
    const fs = [finding(['mirrors', 40], 3), finding(['supply'], 1), finding(['mirrors', 2], 2), finding(['mirrors', 33], 4)];
    const parts = splitParts(fs);
    expect(parts.map((p) => p.map((f) => f.range.start.line))).toEqual([[1, 2], [3, 4]]);
  });

  it('sets only the parts whose diagnostics changed and clears the parts left empty', () => {
    const before = splitParts([finding(['mirrors', 1], 1), finding(['mirrors', 40], 9), finding(['mirrors', 70], 20)]);
    // Equal findings, other objects: nothing to hand over.
    expect(changedParts(before, splitParts([finding(['mirrors', 1], 1), finding(['mirrors', 40], 9), finding(['mirrors', 70], 20)])))
      .toEqual({ set: [], clear: [] });
    // One message changed, one mirror's finding gone, one range moved.
    expect(changedParts(before, splitParts([finding(['mirrors', 1], 1, 'other'), finding(['mirrors', 70], 21)])))
      .toEqual({ set: [0, 2], clear: [1] });
    // Related locations count too.
    const withRelated = (line: number): Finding => ({ ...finding(['mirrors', 1], 1), related: [{ path: ['mirrors', 1], range: at(line), message: 'r' }] });
    expect(sameDiagnostics([withRelated(5)], [withRelated(5)])).toBe(true);
    expect(sameDiagnostics([withRelated(5)], [withRelated(6)])).toBe(false);
    expect(sameDiagnostics([withRelated(5)], [finding(['mirrors', 1], 1)])).toBe(false);
  });

  it('a keystroke inside mirror 50 of 100 changes its part alone; a new line there moves every part below', () => {
    const text = faultySpecText(100);
    const cache = new AnalysisCache();
    const first = splitParts(analyzeText(text, 'big.bias.yaml', {}, { cache }).findings);
    expect(first.filter(Boolean).length).toBe(4);  // mirrors 0–31, 32–63, 64–95, 96–99
    const line = inputLine(text, 50);
    const typed = replaceLine(text, line, '    input: 27u');
    const second = analyzeText(typed, 'big.bias.yaml', {}, { cache }).findings;
    expect(changedParts(first, splitParts(second))).toEqual({ set: [1], clear: [] });
    // The same edit with a comment line added above the input: mirrors 51 on move down a line.
    const moved = replaceLine(text, line, '    # typed\n    input: 27u');
    const third = analyzeText(moved, 'big.bias.yaml', {}, { cache }).findings;
    expect(changedParts(splitParts(second), splitParts(third))).toEqual({ set: [1, 2, 3], clear: [] });
  });

  it('sends the parts that changed and null for the rest; the receiver puts them back together', () => {
    const one = [finding(['mirrors', 1], 1), finding(['mirrors', 70], 20)];
    const first = compactParts(one, undefined);
    // Every part is sent the first time, the empty one between too.
    expect(first.message.map((p) => p?.length ?? null)).toEqual([1, 0, 1]);
    const two = [finding(['mirrors', 1], 1), finding(['mirrors', 70], 20, 'other')];
    const second = compactParts(two, first.parts);
    expect(second.message.map((p) => p?.length ?? null)).toEqual([null, null, 1]);
    const got = expandParts(second.message, expandParts(first.message, undefined));
    expect(got?.flat()).toEqual(two);
    // A path alone is a change too (the receiver's findings are the sender's).
    expect(compactParts([finding(['mirrors', 2], 1), two[1]!], second.parts).message.map((p) => p?.length ?? null)).toEqual([1, null, null]);
    // Without the message referred to, nothing is put together.
    expect(expandParts(second.message, undefined)).toBeUndefined();
  });

  it('both sides forget the same files: the least recently sent beyond MAX_FILES', () => {
    const worker = new SentParts();
    const host = new SentParts();
    for (let i = 0; i <= SentParts.MAX_FILES; i++) {
      worker.set(`f${i}`, i, []);
      host.set(`f${i}`, i, []);
    }
    worker.set('f1', 99, []);
    host.set('f1', 99, []);
    worker.set('g', 100, []);
    host.set('g', 100, []);
    expect(SentParts.MAX_FILES).toBe(16);
    for (const k of ['f0', 'f2']) expect([worker.get(k), host.get(k)]).toEqual([undefined, undefined]);
    expect(worker.get('f1')?.seq).toBe(99);
    expect(host.get('f3')?.seq).toBe(3);
  });
});
