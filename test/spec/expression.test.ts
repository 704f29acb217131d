/**
 * Expressions over params. The refused forms follow the mathjs security documentation
 * (mathjs.org/docs/expressions/security.html: `import` and `createUnit` alter the instance;
 * `evaluate`, `parse`, `simplify`, `derivative` parse arbitrary input), plus our own rule that only
 * arithmetic on numbers and params, pi, e and a short list of functions passes.
 */
import { describe, expect, test } from 'vitest';
import { evaluateExpression, referencedNames } from '../../src/core/spec/expression';

const scope = new Map<string, number>([['wu', 2e-6], ['u', 3], ['lu', 1e-6], ['m', 5]]);

function ok(text: string): number {
  const r = evaluateExpression(text, scope);
  if (!r.ok) throw new Error(`${text}: ${r.message}`);
  return r.value;
}

function fails(text: string) {
  const r = evaluateExpression(text, scope);
  if (r.ok) throw new Error(`${text} evaluated to ${r.value}`);
  return r;
}

describe('evaluation', () => {
  test.each<[string, number]>([
    ['2*1.5u', 3e-6],
    ['wu/2 + 0.1u', 1.1e-6],
    ['2*wu', 4e-6],
    ['u*2', 6],                   // a param named `u` is a name, not micro
    ['2u', 2e-6],                 // …but `2u` is 2 micro
    ['m + 1m', 5.001],            // param `m` vs milli after a number
    ['wu/lu', 2],
    ['sqrt(16)*1u', 4e-6],
    ['max(wu, 3u) - min(1, 2)*1u', 2e-6],
    ['pow(2, 10)', 1024],
    ['pi*1m', Math.PI * 1e-3],
    ['e', Math.E],
    ['log10(1k)', 3],
    ['round(2.6) + ceil(0.2) + floor(1.9) + abs(-1)', 6],
    ['exp(0) + log(1)', 1],
    ['(wu + lu)*2', 6e-6],
    ['-wu', -2e-6],
    ['2^3', 8],
    ['1e-6*2', 2e-6],
    ['1.5e3m', 1.5],              // exponent and prefix combine: 1.5e3 × 1e-3
    ['10%', 0.1],                 // mathjs reads a trailing % as per cent
  ])('%s = %d', (text, v) => {
    expect(ok(text)).toBeCloseTo(v, 12);
    expect(Math.abs(ok(text) - v)).toBeLessThanOrEqual(Math.abs(v) * 1e-12);
  });

  test('SI prefix expansion is exact (1.5u is the double nearest 1.5e-6)', () => {
    expect(ok('1.5u')).toBe(1.5e-6);
    expect(ok('0.18u')).toBe(0.18e-6);
  });

  test('unknown names are unknown-param with their position', () => {
    const r = fails('2*wx + 1u');
    expect(r.code).toBe('unknown-param');
    if (!r.ok) expect([r.start, r.end]).toEqual([2, 4]);
  });

  test('a number glued to letters is refused with a hint', () => {
    expect(fails('2wu').message).toContain('write `2*wu` to multiply');
    expect(fails('2*10uA').message).toContain('no unit');
  });

  test('results must be finite numbers', () => {
    expect(fails('sqrt(-1)').message).toContain('NaN');
    expect(fails('1/0').message).toContain('Infinity');
    expect(fails('pow(10, 400)').message).toContain('Infinity');
  });

  test('syntax errors are bad-expression', () => {
    expect(fails('2*(wu').code).toBe('bad-expression');
    expect(fails('2*').code).toBe('bad-expression');
  });

  test('overlong and deeply nested input is refused quickly', () => {
    expect(fails('1+'.repeat(600) + '1').code).toBe('bad-expression');
    const deep = '('.repeat(200) + '1' + ')'.repeat(200);
    expect(fails(deep).code).toBe('bad-expression');
  });

  test('referencedNames lists params, not functions or constants', () => {
    expect(referencedNames('sqrt(wu)*pi + lu - 1u')).toEqual(['wu', 'lu']);
  });
});

describe('refused forms (mathjs security documentation and our allow-list)', () => {
  test.each<[string, string]>([
    // The functions the security page names as the biggest risk:
    ['import({}, {})', 'function `import` is not allowed'],
    ['createUnit("foo")', 'function `createUnit` is not allowed'],
    ['evaluate("1+1")', 'function `evaluate` is not allowed'],
    ['parse("1+1")', 'function `parse` is not allowed'],
    ['simplify("x+x")', 'function `simplify` is not allowed'],
    ['derivative("x^2", "x")', 'function `derivative` is not allowed'],
    ['compile("1")', 'function `compile` is not allowed'],
    ['resolve("x")', 'function `resolve` is not allowed'],
    ['reviver("x")', 'function `reviver` is not allowed'],
    // Node types that are no arithmetic:
    ['a = 1', 'assignment (`=`) is not allowed'],
    ['f(x) = x^2', 'defining a function is not allowed'],
    ['wu.constructor', 'property and index access is not allowed'],
    ['wu[1]', 'property and index access is not allowed'],
    ['{a: 1}', 'objects are not allowed'],
    ['1; 2', 'several statements'],
    ['[1, 2]', 'matrices and lists are not allowed'],
    ['1:3', 'ranges'],
    ['wu > 1 ? 1 : 2', 'conditionals'],
    ['wu == 1', 'operator `==` is not allowed'],
    ['5 % 3', 'operator `%` is not allowed'],
    ['3!', 'operator `!` is not allowed'],
    ['"text"', 'only numbers may appear'],
    ['true', 'only numbers may appear'],
    ['cos(1)', 'function `cos` is not allowed'],
    ['2 wu', 'implicit multiplication is not allowed'],
  ])('%s', (text, message) => {
    const r = fails(text);
    expect(r.message).toContain(message);
    expect(['refused-expression', 'bad-expression']).toContain(r.code);
  });

  test('the constructor escape of older mathjs versions is refused before evaluation', () => {
    for (const text of ['[].map.constructor("return 1")()', 'sqrt.constructor("return 1")()', 'cos.constructor("x")']) {
      const r = fails(text);
      expect(['refused-expression', 'bad-expression']).toContain(r.code);
    }
  });
});
