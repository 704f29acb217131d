/**
 * Pure helpers of the sizing fixes: root finding, grid snapping, writing values in the style of
 * the replaced token, and composing edits. Numeric checks use closed forms (√2, the golden
 * ratio, cubic roots) so the expected values come from outside the code under test.
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { bracketedRoot, smallestScale } from '../../src/core/sizing/root';
import { quantizeSize, roundSignificant, snapToGrid } from '../../src/core/sizing/quantize';
import { readStyle, shortDecimal, writeLike } from '../../src/core/sizing/token-style';
import { applyEdits, EditLog } from '../../src/core/text/edits';
import { LineIndex } from '../../src/core/text/lines';
import type { TextEdit } from '../../src/core/types';

describe('bracketedRoot', () => {
  it('finds √2 as the root of x² − 2 (closed form)', () => {
    const r = bracketedRoot((x) => x * x - 2, 0, 2, { xTol: 1e-12 })!;
    expect(r.x).toBeCloseTo(Math.SQRT2, 10);
    expect(r.evaluations).toBeLessThan(30);
  });
  it('finds the golden ratio as the root of x² − x − 1 ((1+√5)/2)', () => {
    expect(bracketedRoot((x) => x * x - x - 1, 1, 3, { xTol: 1e-12 })!.x).toBeCloseTo((1 + Math.sqrt(5)) / 2, 10);
  });
  it('survives a kink (a region change) and stays in the bracket: |x|·x − 0.25 → 0.5', () => {
    const f = (x: number) => (x < 0.3 ? 0.2 * x : x * x) - 0.25;
    expect(bracketedRoot(f, 0, 4, { xTol: 1e-12 })!.x).toBeCloseTo(0.5, 9);
  });
  it('refuses a non-bracket and a failed evaluation', () => {
    expect(bracketedRoot((x) => x * x + 1, -1, 1)).toBeUndefined();
    expect(bracketedRoot(() => NaN, 0, 1)).toBeUndefined();
  });
});

describe('smallestScale', () => {
  it('margin-like goal √k − 3 ≥ 0 needs k = 9 (to the tolerance)', () => {
    const k = smallestScale((k) => Math.sqrt(k) - 3, { tol: 1e-6 })!;
    expect(k).toBeGreaterThanOrEqual(9);
    expect(k).toBeLessThan(9 * (1 + 2e-6));
  });
  it('undefined when already met or never met within kMax', () => {
    expect(smallestScale((k) => k)).toBeUndefined();
    expect(smallestScale(() => -1, { kMax: 16 })).toBeUndefined();
  });
});

describe('grid snapping', () => {
  it('rounds in the asked direction and keeps on-grid values', () => {
    expect(snapToGrid(3.401e-6, 10e-9, 'up')).toBe(3.41e-6);
    expect(snapToGrid(3.409e-6, 10e-9, 'down')).toBe(3.4e-6);
    expect(snapToGrid(3.406e-6, 10e-9, 'nearest')).toBe(3.41e-6);
    expect(snapToGrid(3.4e-6, 10e-9, 'up')).toBe(3.4e-6); // 3.4u/10n = 339.999… in binary
    expect(snapToGrid(1e-9, 10e-9, 'down')).toBe(10e-9);  // never below one grid step
  });
  it('without a grid: three significant digits in the direction', () => {
    expect(roundSignificant(3.4012e-6, 3, 'up')).toBe(3.41e-6);
    expect(roundSignificant(3.4012e-6, 3, 'down')).toBe(3.4e-6);
    expect(quantizeSize(1.23456e-6, undefined, 'nearest')).toBe(1.23e-6);
  });
  it('property: snapped values are grid multiples within one step, on the right side', () => {
    fc.assert(fc.property(fc.double({ min: 1e-7, max: 1e-4, noNaN: true }), (v) => {
      const g = 10e-9;
      const up = snapToGrid(v, g, 'up');
      const down = snapToGrid(v, g, 'down');
      expect(Math.abs(up / g - Math.round(up / g))).toBeLessThan(1e-6);
      expect(up).toBeGreaterThanOrEqual(v * (1 - 1e-9));
      expect(down).toBeLessThanOrEqual(v * (1 + 1e-9));
      expect(up - down).toBeLessThanOrEqual(g * (1 + 1e-6));
    }));
  });
});

describe('token style', () => {
  it('keeps the author style', () => {
    expect(writeLike(3.4e-6, readStyle('2u', 'm'))).toBe('3.4u');
    expect(writeLike(3.4e-6, readStyle('2um', 'm'))).toBe('3.4um');
    expect(writeLike(3.4e-6, readStyle('2 µm', 'm'))).toBe('3.4 µm');
    expect(writeLike(3.4e-6, readStyle('2μ', 'm'))).toBe('3.4μ');
    expect(writeLike(0.87, readStyle('0.9', 'V'))).toBe('0.87');
    expect(writeLike(0.87, readStyle('900m', 'V'))).toBe('870m');
    expect(writeLike(0.87, readStyle('0.9V', 'V'))).toBe('0.87V');
    expect(writeLike(3.4e-6, readStyle('2e-6', 'm'))).toBe('3.4e-6');
    expect(writeLike(3.4e-6, readStyle('"2u"', 'm'))).toBe('"3.4u"');
    expect(writeLike(3.4e-6, readStyle("'2u'", 'm'))).toBe("'3.4u'");
    expect(writeLike(1.2e-6, readStyle('2*wu', 'm'))).toBe('1.2u'); // an expression → compact SI
    expect(writeLike(25e6, readStyle('20M', 'Ω'))).toBe('25M');
  });
  it('shortDecimal is the shortest text that reads back', () => {
    expect(shortDecimal(3.4099999999999997)).toBe('3.41');
    expect(shortDecimal(4)).toBe('4');
    fc.assert(fc.property(fc.double({ min: 1e-12, max: 1e9, noNaN: true }), (v) => {
      expect(Math.abs(Number(shortDecimal(v)) - v)).toBeLessThanOrEqual(1e-9 * v);
    }));
  });
  it('property: a written value reads back (prefix table of the SI Brochure, 9th ed.)', () => {
    const exp: Record<string, number> = { T: 12, G: 9, M: 6, k: 3, '': 0, m: -3, u: -6, n: -9, p: -12, f: -15 };
    fc.assert(fc.property(fc.double({ min: 1e-14, max: 1e11, noNaN: true }), (v) => {
      const text = writeLike(v, readStyle('1u', 'm'));
      const m = /^([0-9.e+-]+)([a-zA-Z]?)$/.exec(text)!;
      const back = Number(m[1]) * 10 ** exp[m[2]];
      expect(Math.abs(back - v)).toBeLessThanOrEqual(1e-8 * v);
    }));
  });
});

describe('EditLog (composing edits back onto the original)', () => {
  it('positions round-trip with CRLF and LF', () => {
    const text = 'a: 1\r\nbb: 2\nccc: 3';
    const lines = new LineIndex(text);
    for (let off = 0; off <= text.length; off++) {
      const p = lines.position(off);
      expect(lines.offset(p)).toBe(off);
    }
  });

  it('property: sequential edits == one composed set of edits on the original', () => {
    const textArb = fc.string({ unit: fc.constantFrom('a', 'b', ' ', '\n', ':', 'µ'), minLength: 0, maxLength: 40 });
    fc.assert(fc.property(textArb, fc.array(fc.tuple(fc.nat(), fc.nat(3), fc.string({ maxLength: 5 })), { maxLength: 6 }), (text, steps) => {
      const log = new EditLog(text);
      let direct = text;
      for (const [a, len, ins] of steps) {
        const s = direct.length === 0 ? 0 : a % (direct.length + 1);
        const e = Math.min(direct.length, s + len);
        const edit: TextEdit = { range: new LineIndex(direct).range(s, e), newText: ins };
        log.apply([edit]);
        direct = direct.slice(0, s) + ins + direct.slice(e);
        expect(log.text).toBe(direct);
      }
      const edits = log.edits();
      expect(applyEdits(text, edits)).toBe(direct);
      // The composed edits do not overlap.
      const lines0 = new LineIndex(text);
      const spans = edits.map((x) => [lines0.offset(x.range.start), lines0.offset(x.range.end)]).sort((p, q) => p[0] - q[0]);
      for (let i = 1; i < spans.length; i++) expect(spans[i][0]).toBeGreaterThanOrEqual(spans[i - 1][1]);
    }), { numRuns: 400 });
  });
});

describe('token style keeps the author prefix', () => {
  it('0.15u → 0.18u and 2u → 0.5u, but a mantissa outside [0.1, 1000) switches prefix', () => {
    expect(writeLike(0.18e-6, readStyle('0.15u', 'm'))).toBe('0.18u');
    expect(writeLike(0.5e-6, readStyle('2u', 'm'))).toBe('0.5u');
    expect(writeLike(50e-9, readStyle('2u', 'm'))).toBe('50n');     // 0.05u would read badly
    expect(writeLike(1.2, readStyle('900m', 'V'))).toBe('1.2');      // 1200m would too
    expect(writeLike(2.4e-6, readStyle('180n', 'm'))).toBe('2.4u');
  });
});
