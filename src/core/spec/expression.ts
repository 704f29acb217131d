/**
 * Expressions over params (design §2): `2*wu`, `wu/2 + 0.1u`, `sqrt(2)*1.5u`.
 *
 * A spec is untrusted text. Expressions are parsed by a small mathjs instance in
 * which the functions that parse, compile or change the instance are replaced by refusals (the
 * list of mathjs.org/docs/expressions/security.html, plus compile, reviver and resolve). Before
 * anything is evaluated the node tree is walked and only numbers, param names, pi and e, the
 * arithmetic operators + − × ÷ ^ and the functions of EXPRESSION_FUNCTIONS pass. mathjs runs at
 * parse time only; the resolved spec holds numbers.
 *
 * SI prefixes directly after a number are expanded first (`1.5u` → `1.5e-6`); a param named
 * `wu` or `u` is untouched because identifiers are read whole. A number directly followed by any
 * other letters (`2wu`, `10uA`) is refused: write `2*wu`, and leave units out of expressions.
 *
 * Speed: the instance comes from mathjs's number-only build (plain JS numbers, no BigNumber,
 * Complex, Fraction or Matrix types: a first evaluation costs ~9 ms cold instead of ~60 ms), is
 * made on the first expression only, and each distinct text is parsed and checked by mathjs once.
 */
import {
  absDependencies, addDependencies, ceilDependencies, create, divideDependencies, eDependencies, expDependencies,
  floorDependencies, log10Dependencies, logDependencies, maxDependencies, minDependencies, multiplyDependencies,
  parseDependencies, piDependencies, powDependencies, roundDependencies, sqrtDependencies, subtractDependencies,
  unaryMinusDependencies, unaryPlusDependencies,
} from 'mathjs/number';
import { prefixExponent, PREFIX_SYMBOLS } from '../units/prefixes';
import { SPEC_LIMITS } from '../defaults';

export const EXPRESSION_FUNCTIONS: readonly string[] = ['sqrt', 'min', 'max', 'abs', 'exp', 'log', 'log10', 'pow', 'round', 'ceil', 'floor'];
export const EXPRESSION_CONSTANTS: readonly string[] = ['pi', 'e'];
const OPERATORS = new Set(['add', 'subtract', 'multiply', 'divide', 'pow', 'unaryMinus', 'unaryPlus']);

export type ExpressionCode = 'bad-expression' | 'refused-expression' | 'unknown-param';

export type ExpressionResult =
  | { ok: true; value: number }
  /** start/end: character span in the expression text that the message is about. */
  | { ok: false; code: ExpressionCode; message: string; start?: number; end?: number; name?: string };

/** The slice of a mathjs node that the checker reads. */
interface ExprNode {
  type: string;
  value?: unknown;
  name?: string;
  op?: string;
  fn?: unknown;
  implicit?: boolean;
  args?: ExprNode[];
  content?: ExprNode;
  compile(): { evaluate(scope?: Map<string, number>): unknown };
}

interface LockedMath { parse(text: string): ExprNode }

let locked: LockedMath | undefined;

/**
 * The locked-down instance, made once on first use. It holds the parser,
 * the operators and EXPRESSION_FUNCTIONS only: whatever else an expression names does not exist in
 * it (and the tree check refuses it first); a smaller instance is also ~700 kB less to load.
 */
function lockedMath(): LockedMath {
  if (locked) return locked;
  const math = create({
    parseDependencies, addDependencies, subtractDependencies, multiplyDependencies, divideDependencies, powDependencies,
    unaryMinusDependencies, unaryPlusDependencies, sqrtDependencies, minDependencies, maxDependencies, absDependencies,
    expDependencies, logDependencies, log10Dependencies, roundDependencies, ceilDependencies, floorDependencies,
    piDependencies, eDependencies,
  }, { predictable: true });
  const parse = math.parse.bind(math) as unknown as (text: string) => ExprNode;
  const refuse = (name: string) => () => {
    throw new Error(`${name} is disabled in qpoint expressions`);
  };
  const disabled: Record<string, () => never> = {};
  for (const name of ['import', 'createUnit', 'evaluate', 'parse', 'simplify', 'simplifyConstant', 'simplifyCore',
    'derivative', 'compile', 'reviver', 'replacer', 'resolve', 'rationalize', 'leafCount', 'symbolicEqual', 'parser', 'chain', 'help']) {
    disabled[name] = refuse(name);
  }
  math.import(disabled, { override: true });
  locked = { parse };
  return locked;
}

interface Token { name: string; start: number; end: number }

type Prepared = { ok: true; text: string; identifiers: Token[] } | Extract<ExpressionResult, { ok: false }>;

const IDENT_START = /[A-Za-z_]/;
const IDENT = /[A-Za-z0-9_]/;
const NUMBER = /^(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?/;

/** Expand SI prefixes after numbers and collect identifiers with their offsets. */
function prepare(src: string): Prepared {
  let out = '';
  const identifiers: Token[] = [];
  let i = 0;
  while (i < src.length) {
    const ch = src[i];
    if (IDENT_START.test(ch)) {
      let j = i + 1;
      while (j < src.length && IDENT.test(src[j])) j++;
      identifiers.push({ name: src.slice(i, j), start: i, end: j });
      out += src.slice(i, j);
      i = j;
      continue;
    }
    const num = /[0-9.]/.test(ch) ? NUMBER.exec(src.slice(i)) : null;
    if (num) {
      const j = i + num[0].length;
      let rest = j;
      while (rest < src.length && (IDENT.test(src[rest]) || src[rest] === '\u00B5' || src[rest] === '\u03BC')) rest++;
      const suffix = src.slice(j, rest);
      let exponent = 0;
      if (suffix) {
        const p = prefixExponent(suffix);
        if (p === undefined) {
          const pre = PREFIX_SYMBOLS.find((s) => suffix.startsWith(s));
          const hint = pre && /^[A-Za-z]/.test(suffix.slice(pre.length))
            ? 'inside an expression a number may carry an SI prefix but no unit'
            : `write \`${num[0]}*${suffix}\` to multiply`;
          return { ok: false, code: 'bad-expression', message: `\`${src.slice(i, rest)}\`: ${hint}`, start: i, end: rest };
        }
        exponent = p;
      }
      const eAt = num[0].search(/[eE]/);
      const mant = eAt < 0 ? num[0] : num[0].slice(0, eAt);
      const e10 = (eAt < 0 ? 0 : Number(num[0].slice(eAt + 1))) + exponent;
      out += e10 === 0 ? mant : `${mant}e${e10}`;
      i = rest;
      continue;
    }
    out += ch;
    i++;
  }
  return { ok: true, text: out, identifiers };
}

/** Names a text refers to (for the params dependency order); undefined when it does not scan. */
export function referencedNames(text: string): string[] | undefined {
  const p = prepare(text);
  if (!p.ok) return undefined;
  const fns = new Set([...EXPRESSION_FUNCTIONS, ...EXPRESSION_CONSTANTS]);
  return [...new Set(p.identifiers.map((t) => t.name).filter((n) => !fns.has(n)))];
}

const REFUSED: Record<string, string> = {
  AssignmentNode: 'assignment (`=`) is not allowed',
  FunctionAssignmentNode: 'defining a function is not allowed',
  AccessorNode: 'property and index access is not allowed',
  IndexNode: 'property and index access is not allowed',
  ObjectNode: 'objects are not allowed',
  BlockNode: 'several statements (`;` or a new line) are not allowed',
  ArrayNode: 'matrices and lists are not allowed',
  RangeNode: 'ranges (`a:b`) are not allowed',
  ConditionalNode: 'conditionals (`? :`) are not allowed',
  RelationalNode: 'comparisons are not allowed',
};

type Refusal = { code: ExpressionCode; message: string; name?: string };

function check(node: ExprNode, symbols: Set<string>, depth: number): Refusal | undefined {
  if (depth > 64) return { code: 'bad-expression', message: 'the expression nests too deeply' };
  switch (node.type) {
    case 'ConstantNode':
      return typeof node.value === 'number' ? undefined
        : { code: 'refused-expression', message: `only numbers may appear; \`${String(node.value)}\` is ${typeof node.value === 'string' ? 'a string' : 'not a number'}` };
    case 'SymbolNode':
      symbols.add(node.name ?? '');
      return undefined;
    case 'ParenthesisNode':
      return node.content ? check(node.content, symbols, depth + 1) : undefined;
    case 'OperatorNode': {
      if (node.implicit) return { code: 'bad-expression', message: 'write `*` to multiply (implicit multiplication is not allowed)' };
      const fn = String(node.fn);
      if (!OPERATORS.has(fn)) return { code: 'refused-expression', message: `operator \`${node.op ?? fn}\` is not allowed; use + - * / ^` };
      for (const a of node.args ?? []) {
        const r = check(a, symbols, depth + 1);
        if (r) return r;
      }
      return undefined;
    }
    case 'FunctionNode': {
      const fn = node.fn as ExprNode | undefined;
      const name = fn?.type === 'SymbolNode' ? fn.name ?? '' : '';
      if (!EXPRESSION_FUNCTIONS.includes(name)) {
        return { code: 'refused-expression', name,
          message: `function \`${name || '(computed)'}\` is not allowed; allowed: ${EXPRESSION_FUNCTIONS.join(', ')}` };
      }
      for (const a of node.args ?? []) {
        const r = check(a, symbols, depth + 1);
        if (r) return r;
      }
      return undefined;
    }
    default:
      return { code: 'refused-expression', message: REFUSED[node.type] ?? `\`${node.type}\` is not allowed in an expression` };
  }
}

/** A text as mathjs read it: the checked tree and its symbols, or why it was refused. */
type Reading =
  | { ok: true; symbols: Set<string>; code: { evaluate(scope?: Map<string, number>): unknown } }
  | { ok: false; parseError?: string; refusal?: Refusal };

/** Readings by prepared text. Bounded: a fuzzer or a huge file must not grow it without end. */
const readings = new Map<string, Reading>();
const MAX_READINGS = 4096;

/** The compiled tree; a compile failure surfaces when evaluated, as it did before caching. */
function compiled(node: ExprNode): { evaluate(scope?: Map<string, number>): unknown } {
  try {
    return node.compile();
  } catch (e) {
    return { evaluate: () => { throw e; } };
  }
}

function read(prepared: string): Reading {
  const known = readings.get(prepared);
  if (known) return known;
  let reading: Reading;
  try {
    const node = lockedMath().parse(prepared);
    const symbols = new Set<string>();
    const refusal = check(node, symbols, 0);
    reading = refusal ? { ok: false, refusal } : { ok: true, symbols, code: compiled(node) };
  } catch (e) {
    reading = { ok: false, parseError: e instanceof Error ? e.message.replace(/\s*\(char \d+\)$/, '') : 'cannot be read' };
  }
  if (readings.size >= MAX_READINGS) readings.clear();
  readings.set(prepared, reading);
  return reading;
}

/**
 * Evaluate an expression over `scope` (param name → value). Never throws. `start`/`end` on a
 * failure point into `text` where possible.
 */
export function evaluateExpression(text: string, scope: ReadonlyMap<string, number>): ExpressionResult {
  if (text.length > SPEC_LIMITS.maxExpressionLength) {
    return { ok: false, code: 'bad-expression', message: `the expression is ${text.length} characters long; the limit is ${SPEC_LIMITS.maxExpressionLength}` };
  }
  const prep = prepare(text);
  if (!prep.ok) return prep;
  const reading = read(prep.text);
  if (!reading.ok && reading.parseError !== undefined) {
    return { ok: false, code: 'bad-expression', message: `\`${text.trim()}\` is not a valid expression: ${reading.parseError}` };
  }
  const at = (name: string | undefined) => prep.identifiers.find((t) => t.name === name);
  if (!reading.ok) {
    const refusal = reading.refusal ?? { code: 'bad-expression' as const, message: 'cannot be read' };
    const t = at(refusal.name);
    return { ok: false, ...refusal, start: t?.start, end: t?.end };
  }
  const symbols = reading.symbols;
  for (const s of symbols) {
    if (!scope.has(s) && !EXPRESSION_CONSTANTS.includes(s)) {
      const t = at(s);
      return { ok: false, code: 'unknown-param', name: s, message: `\`${s}\` is not a param`, start: t?.start, end: t?.end };
    }
  }
  let value: unknown;
  try {
    const vars = new Map<string, number>();
    for (const s of symbols) if (scope.has(s)) vars.set(s, scope.get(s)!);
    value = reading.code.evaluate(vars);
  } catch (e) {
    return { ok: false, code: 'bad-expression', message: `\`${text.trim()}\` cannot be evaluated: ${e instanceof Error ? e.message : String(e)}` };
  }
  if (typeof value !== 'number' || !Number.isFinite(value)) {
    return { ok: false, code: 'bad-expression', message: `\`${text.trim()}\` evaluates to ${typeof value === 'number' ? String(value) : 'something that is not a number'}` };
  }
  return { ok: true, value };
}
