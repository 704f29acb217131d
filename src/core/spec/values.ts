/**
 * One value of the spec → a number in SI base units, or a finding at that value. A value is a
 * YAML/JSON number, a literal string (number, SI prefix, unit that must fit the field), or an
 * expression over params.
 */
import type { TableTexts } from './tables';
import type { SpecPath } from '../types';
import { describeRead, identifyUnit, quantityLabel, readQuantity } from '../units/si';
import type { Quantity } from '../units/si';
import { prefixExponent } from '../units/prefixes';
import { evaluateExpression } from './expression';
import type { FindingSink } from './findings';
import { askIf, suggestion } from './suggest';

export interface ValueScope {
  sink: FindingSink;
  /** Resolved params. */
  params: ReadonlyMap<string, number>;
  /** Params written with a unit, by the quantity of that unit (to check bare references). */
  paramQuantities: ReadonlyMap<string, Quantity>;
  /** Params the spec defines that have no value: an error of their own, a loop, or a param they use. */
  failedParams?: ReadonlySet<string>;
  /** Characterisation-table texts the front end read, by the name the spec writes. */
  tables?: TableTexts;
}

export interface ValueOptions {
  /** Accept the string `auto` (returned as 'auto'). */
  auto?: boolean;
  /** > 0 required. */
  positive?: boolean;
  /** ≥ 0 required. */
  nonNegative?: boolean;
  /** A whole number required. */
  integer?: boolean;
}

export function typeName(v: unknown): string {
  if (v === null || v === undefined) return 'nothing';
  if (Array.isArray(v)) return 'a list';
  if (typeof v === 'object') return v instanceof Uint8Array ? 'binary data' : 'a mapping';
  if (typeof v === 'string') return `the text \`${v}\``;
  if (typeof v === 'boolean') return `\`${String(v)}\``;
  return `\`${String(v)}\``;
}

/** Field name for messages: the last string segment of the path. */
function fieldName(path: SpecPath): string {
  for (let i = path.length - 1; i >= 0; i--) if (typeof path[i] === 'string') return String(path[i]);
  return 'value';
}

/** `.nan`, `.inf`: one message wherever it is found (schema or elaborator), so the fact is said once. */
export function nonFiniteMessage(path: SpecPath, value: number): string {
  return `\`${fieldName(path)}\` must be a finite number; got ${String(value)}`;
}

/** Read a value; findings go to scope.sink. Undefined when the value is unusable. */
export function resolveValue(scope: ValueScope, raw: unknown, path: SpecPath, q: Quantity, opts: ValueOptions = {}): number | 'auto' | undefined {
  const field = fieldName(path);
  const sink = scope.sink;
  let value: number;
  if (typeof raw === 'number') {
    if (!Number.isFinite(raw)) {
      sink.error('bad-value', nonFiniteMessage(path, raw), path, undefined, 'type');
      return undefined;
    }
    value = raw;
  } else if (typeof raw === 'string') {
    const text = raw.trim();
    if (text === 'auto') {
      if (opts.auto) return 'auto';
      sink.error('bad-value', `\`${field}\` cannot be \`auto\`; only sizes (size, w, l) can, with a mirror \`design\` target`, path);
      return undefined;
    }
    const read = readQuantity(text, q);
    if (read.ok) {
      value = read.value;
    } else if (read.reason === 'not-literal') {
      const r = evaluateExpression(text, scope.params);
      if (!r.ok) {
        const lead = raw.length - raw.trimStart().length;
        const range = r.start !== undefined && r.end !== undefined ? sink.src.within(path, r.start + lead, r.end + lead) : undefined;
        const failed = scope.failedParams ?? new Set<string>();
        if (r.code === 'unknown-param' && r.name !== undefined && failed.has(r.name)) {
          sink.error('failed-param', `\`${field}\`: param \`${r.name}\` has no value (see its own finding under \`params\`)`, path, range);
          return undefined;
        }
        const defined = scope.params.size + failed.size;
        // A suggestion only where the finding is listed (past the cap it would be counted only) and
        // its message is read (a fix's re-read asks only which findings remain).
        const word = r.code === 'unknown-param' && r.name && sink.suggesting(r.code) ? suggestion(r.name, paramNames(scope)) : undefined;
        const known = r.code === 'unknown-param' && defined === 0 ? ' (the spec defines no `params`)' : '';
        // The fix replaces the name only where the source spells it verbatim (range found).
        sink.error(r.code, `\`${field}\`: ${r.message}${askIf(word)}${known}`, path, range, undefined, range ? word : undefined);
        return undefined;
      }
      value = r.value;
      const pq = scope.paramQuantities.get(text);
      if (pq && pq !== q && !(q === 'plain' || q === 'ratio')) {
        sink.error('bad-unit', `\`${field}\` is ${quantityLabel(q)}; param \`${text}\` is ${quantityLabel(pq)}`, path);
        return undefined;
      }
    } else if (read.reason === 'unknown-unit' && scope.params.has(read.unit)) {
      const num = text.slice(0, text.length - read.unit.length).trim();
      sink.error('bad-expression', `\`${field}\`: write \`${num}*${read.unit}\` to multiply by param \`${read.unit}\``, path);
      return undefined;
    } else {
      const code = read.reason === 'empty' ? 'bad-value' : 'bad-unit';
      const fix = read.reason === 'wrong-unit' || read.reason === 'unknown-unit' ? read.fix : undefined;
      sink.error(code, `\`${field}\` is ${describeRead(read, q, text).replace(/^expected /, '')}`, path, undefined, undefined, fix);
      return undefined;
    }
  } else {
    sink.error('wrong-type', `\`${field}\` must be a number or a string such as \`${example(q)}\`; got ${typeName(raw)}`, path, undefined, 'type');
    return undefined;
  }
  if (opts.integer && !Number.isInteger(value)) {
    sink.error('bad-value', `\`${field}\` must be a whole number; got ${value}`, path);
    return undefined;
  }
  if (opts.positive && !(value > 0)) {
    sink.error('non-positive', `\`${field}\` must be greater than 0; got ${value}`, path);
    return undefined;
  }
  if (opts.nonNegative && value < 0) {
    sink.error('non-positive', `\`${field}\` must not be negative; got ${value}`, path);
    return undefined;
  }
  return value;
}

/** A number, never `auto`. */
export function resolveNumber(scope: ValueScope, raw: unknown, path: SpecPath, q: Quantity, opts: Omit<ValueOptions, 'auto'> = {}): number | undefined {
  const v = resolveValue(scope, raw, path, q, opts);
  return typeof v === 'number' ? v : undefined;
}

/** Every param the spec defines, with or without a value. */
function* paramNames(scope: ValueScope): Iterable<string> {
  yield* scope.params.keys();
  if (scope.failedParams) yield* scope.failedParams;
}

const EXAMPLES: Record<Quantity, string> = {
  current: '10u', voltage: '0.9', length: '2u', resistance: '120k', conductance: '1m', temperature: '27 C',
  ratio: '1%', transconductanceParam: '280u', inverseVoltage: '0.08', sqrtVoltage: '0.45', voltagePerKelvin: '-1m',
  voltageLength: '4 mV·µm', lengthUnit: '1 %·µm', capacitance: '10p', capacitancePerArea: '8.5m',
  frequency: '1k', noiseDensity: '2p', plain: '4',
};

function example(q: Quantity): string {
  return EXAMPLES[q];
}

/** Which quantity a param literal carries (`10uA` → current), if it has a unit symbol. */
export function literalQuantity(text: string): Quantity | undefined {
  const m = /^\s*[+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?\s*(.*)$/.exec(text);
  if (!m || !m[1]) return undefined;
  const unit = m[1].replace(/\s+/g, '');
  return prefixExponent(unit) !== undefined ? undefined : identifyUnit(unit);
}
