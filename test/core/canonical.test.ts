/**
 * Cache keys (src/core/canonical.ts): a value serialised whole, one text for equal values however
 * they were built, different texts for values JSON would confuse; typed arrays by digest.
 */
import { describe, expect, it } from 'vitest';
import { canonicalJson, digest, digestOf, recordSource } from '../../src/core/canonical';

describe('canonicalJson', () => {
  it('writes equal values alike whatever their key order, and leaves out undefined members as JSON does', () => {
    expect(canonicalJson({ b: 1, a: { y: [1, 2], x: 'v' }, c: undefined })).toBe(canonicalJson({ a: { x: 'v', y: [1, 2] }, b: 1 }));
    expect(canonicalJson({ b: 1, a: 2 })).toBe('{"a":2,"b":1}');
  });

  it('tells apart the numbers JSON writes alike (NaN, ±Infinity and null; −0 and 0)', () => {
    const texts = [NaN, Infinity, -Infinity, null, 0, -0].map((v) => canonicalJson([v]));
    expect(new Set(texts).size).toBe(6);
  });

  it('writes a typed array as the digest of the text it was read from, else of its bytes', () => {
    const a = new Float64Array([1, 2, 3]);
    const b = new Float64Array([1, 2, 3]);
    const c = new Float64Array([1, 2, 4]);
    expect(canonicalJson({ id: a })).toBe(canonicalJson({ id: b }));
    expect(canonicalJson({ id: a })).not.toBe(canonicalJson({ id: c }));
    const read = new Float64Array([1, 2, 3]);
    recordSource(read, () => 'l,vgs,vds,vsb,id\n...');
    expect(digestOf(read)).toBe(digest('l,vgs,vds,vsb,id\n...'));
  });
});

describe('digest', () => {
  it('is 28 hexadecimal digits, the same for one text and different for a one-character edit', () => {
    const text = 'x'.repeat(10_000);
    expect(digest(text)).toMatch(/^[0-9a-f]{28}$/);
    expect(digest(text)).toBe(digest('x'.repeat(10_000)));
    expect(digest(text)).not.toBe(digest(`${'x'.repeat(9_999)}y`));
    expect(digest('')).not.toBe(digest('\u0000'));
  });
});
