/**
 * The fast path of expressions: numbers, param names, pi and e, + − × ÷, unary signs and
 * parentheses — what nearly every spec writes (`wu`, `2*wu`, `wu/2 + 0.1u`). These are
 * evaluated here with the same IEEE operations mathjs applies to numbers (add a+b, multiply a·b, …),
 * so the result is bit-identical (test/fuzz/expression.test.ts compares both on random input).
 * Anything else — powers, functions, other operators, unknown names, non-finite results, syntax
 * errors — returns undefined, and the caller takes the mathjs path, which owns every message.
 * Creating the mathjs instance costs ~150 ms on a cold start, so most specs never pay it.
 */

/** Names that mathjs reads as operators or literals, never as symbols: always the mathjs path. */
const RESERVED = new Set(['mod', 'to', 'in', 'and', 'or', 'xor', 'not', 'true', 'false', 'null', 'undefined', 'end']);
const CONSTANTS: ReadonlyMap<string, number> = new Map([['pi', Math.PI], ['e', Math.E]]);
const MAX_DEPTH = 64;

/**
 * Value of `text` (an expression after SI-prefix expansion), or undefined when it is not plain
 * arithmetic over known names or does not come out finite.
 */
export function plainArithmetic(text: string, scope: ReadonlyMap<string, number>): number | undefined {
  let i = 0;
  const n = text.length;
  let failed = false;

  const space = (): void => {
    while (i < n && (text.charCodeAt(i) === 32 || text.charCodeAt(i) === 9)) i++;
  };
  const fail = (): number => {
    failed = true;
    return NaN;
  };

  const primary = (depth: number): number => {
    space();
    if (i >= n || depth > MAX_DEPTH) return fail();
    const c = text.charCodeAt(i);
    if (c === 40 /* ( */) {
      i++;
      const v = sum(depth + 1);
      space();
      if (failed || text.charCodeAt(i) !== 41 /* ) */) return fail();
      i++;
      return v;
    }
    const num = /^(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?/.exec(text.slice(i, i + 40));
    if (num) {
      i += num[0].length;
      return Number(num[0]);
    }
    const name = /^[A-Za-z_][A-Za-z0-9_]*/.exec(text.slice(i, i + 200));
    if (name) {
      i += name[0].length;
      if (RESERVED.has(name[0])) return fail();
      const v = scope.get(name[0]) ?? CONSTANTS.get(name[0]);
      return v === undefined ? fail() : v;
    }
    return fail();
  };

  const unary = (depth: number): number => {
    space();
    const c = text.charCodeAt(i);
    if (c === 45 /* - */ || c === 43 /* + */) {
      i++;
      if (depth > MAX_DEPTH) return fail();
      const v = unary(depth + 1);
      return c === 45 ? -v : v;
    }
    return primary(depth);
  };

  const product = (depth: number): number => {
    let v = unary(depth);
    for (;;) {
      space();
      const c = text.charCodeAt(i);
      if (failed || (c !== 42 /* * */ && c !== 47 /* / */)) return v;
      i++;
      const r = unary(depth);
      v = c === 42 ? v * r : v / r;
    }
  };

  const sum = (depth: number): number => {
    let v = product(depth);
    for (;;) {
      space();
      const c = text.charCodeAt(i);
      if (failed || (c !== 43 && c !== 45)) return v;
      i++;
      const r = product(depth);
      v = c === 43 ? v + r : v - r;
    }
  };

  const v = sum(0);
  space();
  if (failed || i !== n || !Number.isFinite(v)) return undefined;
  return v;
}
