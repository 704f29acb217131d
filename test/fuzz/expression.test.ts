/**
 * Expressions are untrusted text. The ways out of a mathjs expression named by the mathjs security
 * documentation (mathjs.org/docs/expressions/security.html: functions that alter the instance or
 * parse input; property and method access on functions and objects — `constructor`, `__proto__`,
 * `toString`; denial of service through heavy operations) and by its published advisories
 * (CVE-2017-1001003: `constructor` reached through Unicode escapes in object keys) are refused here
 * before anything is evaluated, and nothing leaks into JavaScript's prototypes.
 *
 * Also: the locked-down instance (with qpoint's SI pre-processing) gives bit-identical results to
 * a full mathjs instance with the same configuration (`predictable: true`) on random arithmetic.
 */
import fc from 'fast-check';
import { all, create } from 'mathjs';
import { describe, expect, it } from 'vitest';
import { evaluateExpression } from '../../src/core/spec/expression';

const scope = new Map<string, number>([['wu', 2e-6], ['lu', 1e-6], ['k', 3], ['x1', -0.5]]);

describe('ways out of a mathjs expression are refused', () => {
  const escapes = [
    // function and object internals
    'constructor', '__proto__', 'prototype', 'toString', 'valueOf', 'hasOwnProperty', '__defineGetter__',
    'wu.constructor', 'wu["constructor"]', "wu['constructor']", 'wu.__proto__', 'wu["__proto__"]', 'wu.toString()',
    'sqrt.constructor', 'sqrt.constructor("return process")()', 'sqrt["constructor"]("return this")()', 'sqrt.toString()',
    'sqrt.call(1)', 'sqrt.apply(1, [2])', 'sqrt.bind(1)', '(1).constructor', 'pi.constructor', 'e.toString()',
    'toString()', 'constructor("return 1")()', '__proto__.polluted = 1', 'wu.__proto__.polluted = 1',
    // CVE-2017-1001003: constructor through Unicode escapes in an object key
    '{"\\u0063onstructor": 1}', '{constructor: 1}.constructor', '{}.constructor.constructor("return 1")()',
    // matrix, index and object access
    '[1, 2][1]', '[wu][1]', '[1, 2]', 'matrix([1])', 'ones(1000, 1000)', 'zeros(3)', 'index(1)', 'subset([1], index(1))',
    'range(1, 1e9)', '1:1e9', '{a: 1}.a', '{a: 1}["a"]', 'size(1)',
    // definitions and assignments
    'f(x) = x', 'f(x) = f(x)', 'a = 1', 'wu = 1', 'pi = 3', 'sqrt = 1', 'e = import', 'x1 = sqrt', 'a.b = 1', 'a[1] = 2',
    // strings and their methods
    '"text"', "'text'", '"a" + "b"', '"abc".length', '"abc".concat("d")', 'concat("a", "b")', 'string(1)', 'format(1)',
    'typeOf(1)', 'print("$a", {a: 1})', 'split("a,b", ",")',
    // functions that alter the instance or parse input (security page)
    'import({}, {override: true})', 'createUnit("qpoint")', 'evaluate("1")', 'parse("1")', 'compile("1")', 'simplify("x")',
    'derivative("x^2", "x")', 'rationalize("1/x")', 'resolve("x")', 'parser()', 'chain(1)', 'help("sqrt")', 'config({})',
    'typed("f", {})', 'reviver()', 'replacer()', 'map([1], sqrt)', 'forEach([1], sqrt)', 'filter([1], sqrt)', 'apply([1], 1, sum)',
    // operators that are not arithmetic, units, and comparisons
    '5!', '5 mod 3', '5 % 3', '1 == 1', '1 < 2', '1 ? 2 : 3', 'not 1', '1 and 0', '1 or 0', '1 xor 0', '1 & 2', '1 | 2',
    '~1', '1 << 2', '1 >> 2', '1 >>> 2', "[1]'", '5 to cm', '5 in cm', '5 cm', 'wu cm', '2 wu', '2(3)', '(1)(2)',
    // several statements, comments, JavaScript syntax
    '1; 2', '1\n2', 'x => x', '`1`', 'function(){}', 'new Function("1")', 'this', 'process.exit()', 'globalThis',
    // results that are not a finite number (CPU/memory or numeric traps)
    'sqrt(-1)', '1/0', '0/0', 'pow(10, 400)', 'exp(1000)', 'log(0)', 'max()', 'sqrt()', 'sqrt(1, 2)', 'round(1, 1, 1)',
  ];

  it.each(escapes)('%s', (text) => {
    const before = Object.getOwnPropertyNames(Object.prototype).join();
    const r = evaluateExpression(text, scope);
    expect(r.ok, `${text} evaluated to ${r.ok ? r.value : ''}`).toBe(false);
    if (!r.ok) {
      expect(['refused-expression', 'bad-expression', 'unknown-param']).toContain(r.code);
      expect(r.message.length).toBeGreaterThan(5);
    }
    // Nothing reached JavaScript's own objects.
    expect(Object.getOwnPropertyNames(Object.prototype).join()).toBe(before);
    expect(({} as Record<string, unknown>).polluted).toBeUndefined();
  });

  it('random strings over the expression alphabet never throw, and pass only as finite numbers', () => {
    const alphabet = fc.constantFrom(...'0123456789.eE+-*/^()[]{},;:=!<>?"\'`@#$%&|~ \n'.split(''), 'wu', 'lu', 'k', 'sqrt', 'pow', 'max',
      'constructor', '__proto__', 'toString', 'import', 'evaluate', 'f(x)', 'u', 'm', 'µ', 'x1', 'pi', 'e');
    fc.assert(fc.property(fc.array(alphabet, { maxLength: 30 }).map((a) => a.join('')), (text) => {
      const r = evaluateExpression(text, scope);
      if (r.ok) expect(Number.isFinite(r.value)).toBe(true);
      else expect(['refused-expression', 'bad-expression', 'unknown-param']).toContain(r.code);
    }), { numRuns: 3000, seed: 1618 });
    expect(({} as Record<string, unknown>).polluted).toBeUndefined();
  });
});

describe('the locked-down instance computes what plain mathjs computes', () => {
  const reference = create(all, { predictable: true });
  const num = fc.oneof(
    fc.integer({ min: 0, max: 1000 }).map(String),
    fc.double({ min: 0, max: 1e6, noNaN: true }).map((x) => String(x)).filter((s) => /^\d+(\.\d+)?(e[+-]?\d+)?$/.test(s)),
    fc.constantFrom('0.1', '.5', '1e-6', '2.5E3', '1e-300', '1e300', '7', '0'),
  );
  const leaf = fc.oneof(num, fc.constantFrom('wu', 'lu', 'k', 'x1', 'pi', 'e'));
  const expr: fc.Arbitrary<string> = fc.letrec((tie) => ({
    node: fc.oneof({ depthSize: 'small', withCrossShrink: true },
      leaf,
      fc.tuple(tie('node'), fc.constantFrom('+', '-', '*', '/', ' + ', ' * ', '- '), tie('node')).map(([a, op, b]) => `${a}${op}${b}`),
      tie('node').map((a) => `(${a})`),
      tie('node').map((a) => `-${a}`),
      tie('node').map((a) => `+${a}`)),
  })).node as fc.Arbitrary<string>;

  it('bit-identical on random + − × ÷ over numbers and params (mathjs is the reference)', () => {
    fc.assert(fc.property(expr, (text) => {
      const theirs = reference.evaluate(text, new Map(scope)) as unknown;
      const r = evaluateExpression(text, scope);
      if (typeof theirs === 'number' && Number.isFinite(theirs)) {
        expect(r.ok && Object.is(r.value, theirs), `${text}: ${JSON.stringify(r)} vs ${String(theirs)}`).toBe(true);
      } else {
        expect(r.ok).toBe(false);   // a non-finite value is reported, never passed on
      }
    }), { numRuns: 1000, seed: 2024 });
  });
});
