/**
 * `refusesAsBefore` (src/core/spec/document.ts) lets the editor's next parse (spec/incremental.ts)
 * and the EKV fix's re-read (spec/fragment.ts) skip the whole-text refusal scan after an edit of
 * plain characters: it must answer true only where `refusal` reads the edited text as it read the
 * text before it (not at all: the scan is skipped only for a text read without refusal).
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { refusal, refusesAsBefore } from '../../src/core/spec/document';
import { LineIndex } from '../../src/core/text/lines';
import { SPEC_LIMITS } from '../../src/core/defaults';

/** Pieces every refusal scan acts on (line breaks, a bare CR, control bytes, brackets, quotes,
 *  comments, escapes) beside plain ones. */
const PIECES = ['a', 'b', ' ', '\t', '\n', '\r\n', '\r', '#', ' #', '"', "'", '{', '}', '[', ']', '\\', '\u0001', ': ', '- ', 'x: [', ']\n'];
const arbText = fc.array(fc.constantFrom(...PIECES), { maxLength: 60 }).map((p) => p.join(''));
const arbEdit = fc.record({
  at: fc.double({ min: 0, max: 1, noNaN: true, maxExcluded: true }),
  del: fc.integer({ min: 0, max: 4 }),
  ins: fc.array(fc.constantFrom(...PIECES, 'ekv', 'square-law', '5'), { maxLength: 3 }).map((p) => p.join('')),
});

function ends(old: string, text: string): { a: number; s: number } {
  const n = Math.min(old.length, text.length);
  let a = 0;
  while (a < n && old.charCodeAt(a) === text.charCodeAt(a)) a++;
  let s = 0;
  while (s < n - a && old.charCodeAt(old.length - 1 - s) === text.charCodeAt(text.length - 1 - s)) s++;
  return { a, s };
}

describe('refusesAsBefore', () => {
  it('answers true only for an edit after which a text read without refusal still is', () => {
    let shortcut = 0;
    let refusedAfter = 0;
    fc.assert(fc.property(arbText, arbEdit, (old, e) => {
      fc.pre(refusal(old, new LineIndex(old)) === undefined);
      const at = Math.floor(e.at * (old.length + 1));
      const text = old.slice(0, at) + e.ins + old.slice(Math.min(old.length, at + e.del));
      const { a, s } = ends(old, text);
      const after = refusal(text, new LineIndex(text));
      if (after) refusedAfter++;
      if (!refusesAsBefore(old, text, a, s)) return;
      shortcut++;
      expect(after).toBeUndefined();
    }), { numRuns: 20_000, seed: 2026 });
    // Both answers are exercised: edits the scan is skipped for, and edits that make a refusal.
    expect(shortcut).toBeGreaterThan(1000);
    expect(refusedAfter).toBeGreaterThan(1000);
  });

  it('scans a text edited past the size limit', () => {
    const old = 'a'.repeat(SPEC_LIMITS.maxChars);
    const text = `${old}b`;
    expect(refusal(text, new LineIndex(text))?.code).toBe('too-large');
    expect(refusesAsBefore(old, text, old.length, 0)).toBe(false);
  });

  it('scans again when the edit ends before a comment mark or a bare carriage return (what they mean depends on the character before)', () => {
    // 'a#{' is no comment: the brace counts; ' #{' is a comment. Replacing 'a' by ' ' before '#'.
    expect(refusesAsBefore('xa#{', 'x #{', 1, 2)).toBe(false);
    // A line break after the edit reads the same whatever precedes it.
    expect(refusesAsBefore('model: square-law\nx', 'model: ekv\nx', 7, 2)).toBe(true);
    // A bare CR right before the edit: the edit decides whether a line feed follows it.
    expect(refusesAsBefore('a\rb', 'a\r\n', 2, 0)).toBe(false);
  });
});
