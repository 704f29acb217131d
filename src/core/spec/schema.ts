/**
 * Structural validation with the shipped JSON Schema (schema/qpoint-bias.schema.json, draft-07,
 * the same file the editor uses for completion), ajv errors mapped to our findings and wording.
 * Values with units, expressions, roles per kind and cross references are checked later by the
 * elaborator.
 *
 * The validator is ajv's own code for the schema, generated ahead of time
 * (scripts/gen-schema-validator.mjs): compiling the schema at start-up cost ~120 ms per CLI run.
 */
import type { ErrorObject, ValidateFunction } from 'ajv';
import generatedValidator from './schema-validator.generated';
import type { SpecPath } from '../types';
import type { FindingSink } from './findings';
import { formatPath } from './findings';
import { askIf, suggestion } from './suggest';
import { nonFiniteMessage, typeName } from './values';

const validator = generatedValidator as unknown as ValidateFunction;

function toPath(pointer: string, data: unknown): SpecPath {
  const path: SpecPath = [];
  let cur: unknown = data;
  for (const raw of pointer.split('/').slice(1)) {
    const seg = raw.includes('~') ? raw.replace(/~1/g, '/').replace(/~0/g, '~') : raw;
    if (Array.isArray(cur)) {
      const i = Number(seg);
      path.push(i);
      cur = cur[i];
    } else {
      path.push(seg);
      cur = (cur as Record<string, unknown> | undefined)?.[seg];
    }
  }
  return path;
}

function valueAt(data: unknown, path: SpecPath): unknown {
  let cur = data;
  for (const seg of path) cur = (cur as Record<string | number, unknown> | undefined)?.[seg];
  return cur;
}

interface SchemaNode { properties?: Record<string, { description?: string }>; description?: string }

const hints = new Map<string, string>();

function shortHint(d: string | undefined): string {
  if (!d) return '';
  let hint = hints.get(d);
  if (hint === undefined) {
    // The first sentence; an abbreviation's full stop (e.g., i.e.) does not end it.
    const s = d.split(/(?<!\b(?:e\.g|i\.e)\.)(?<=[.;])\s/)[0].replace(/[.;]$/, '');
    hint = s.length <= 70 ? ` (${s})` : '';
    hints.set(d, hint);  // one per schema description: bounded
  }
  return hint;
}

function where(path: SpecPath): string {
  return path.length ? `\`${formatPath(path)}\`` : 'the spec';
}

const TYPE_WORDS: Record<string, string> = {
  number: 'a number', string: 'a string', object: 'a mapping', array: 'a list', integer: 'a whole number', boolean: 'true or false',
};

function typeWords(t: unknown): string {
  const list = (Array.isArray(t) ? t : String(t).split(',')).map((x) => TYPE_WORDS[String(x)] ?? String(x));
  if (list.includes('a number') && list.includes('a string') && list.length === 2) return 'a number or a string with a unit';
  return list.length > 1 ? `${list.slice(0, -1).join(', ')} or ${list[list.length - 1]}` : list[0];
}

const ORDER: Record<string, number> = { type: 0, required: 1, additionalProperties: 2 };

/** Validate data against the schema; findings go to sink. Returns true when valid. */
export function validateSchema(data: unknown, sink: FindingSink): boolean {
  const validate = validator;
  if (validate(data)) return true;
  const errors = [...(validate.errors ?? [])].sort((a, b) => (ORDER[a.keyword] ?? 9) - (ORDER[b.keyword] ?? 9));
  // A `required` inside an anyOf branch has no properties of its own; the anyOf's object has
  // them (and their descriptions, the hints).
  const branchOwners = new Map<string, SchemaNode>();
  for (const e of errors) if (e.keyword === 'anyOf' || e.keyword === 'oneOf') branchOwners.set(e.instancePath, e.parentSchema as SchemaNode);
  for (const e of errors) mapError(e, data, sink, branchOwners.get(e.instancePath));
  return false;
}

function mapError(e: ErrorObject, data: unknown, sink: FindingSink, owner?: SchemaNode): void {
  const path = toPath(e.instancePath, data);
  const parent = e.parentSchema as SchemaNode | undefined;
  const value = valueAt(data, path);
  const name = path.length ? `\`${String(path[path.length - 1])}\`` : 'the spec';
  const p = e.params as Record<string, unknown>;
  switch (e.keyword) {
    case 'if':
    case 'const':
      return;  // the branch's own errors say what is wrong
    case 'additionalProperties': {
      const key = String(p.additionalProperty);
      const known = Object.keys(parent?.properties ?? {});
      const word = suggestion(key, known);
      const hint = askIf(word) || (known.length && known.length <= 16 ? `; expected one of ${known.join(', ')}` : '');
      const at = [...path, key];
      sink.error('unknown-key', `unknown key \`${key}\` in ${where(path)}${hint}`, at, 'key', 'unknown', word);
      return;
    }
    case 'anyOf': {
      // Alternatives that each require one key (an input's `resistor` or `from`): one finding
      // naming them all; other alternatives are explained by their own branch errors.
      const branches = Array.isArray(e.schema) ? (e.schema as { required?: unknown[] }[]) : [];
      const keys = branches.map((b) => (Object.keys(b).length === 1 && b.required?.length === 1 ? String(b.required[0]) : undefined));
      if (keys.length === 0 || keys.some((k) => k === undefined)) return;
      const named = (keys as string[]).map((k) => `\`${k}\`${shortHint(parent?.properties?.[k]?.description)}`);
      // Keyed as the first alternative's missing key, so the elaborator's own report of it is not a second finding.
      sink.error('missing-key', `${where(path)} needs one of ${named.join(' or ')}`, path, 'key', `missing:${keys[0]}`);
      return;
    }
    case 'required': {
      // A required key of one anyOf alternative is said once, by the anyOf.
      if (e.schemaPath.includes('/anyOf/')) return;
      const missing = String(p.missingProperty);
      const hint = shortHint((parent?.properties ?? owner?.properties)?.[missing]?.description);
      sink.error('missing-key', `${where(path)} is missing \`${missing}\`${hint}`, path, 'key', `missing:${missing}`);
      return;
    }
    case 'type':
      // JSON Schema's numbers are finite: `.nan` and `.inf` are numbers of the wrong value, said
      // once, as the elaborator says it (the same fact, so it is not said twice).
      if (typeof value === 'number' && !Number.isFinite(value) && /number|integer/.test(String(p.type))) {
        sink.error('bad-value', nonFiniteMessage(path, value), path, undefined, 'type');
        return;
      }
      sink.error('wrong-type', `${name} must be ${typeWords(p.type)}; got ${typeName(value)}`, path, undefined, 'type');
      return;
    case 'false schema':
      sink.error('unknown-key', `${name} does not belong here`, path, 'key', 'unknown');
      return;
  }
  if (sink.has(path, 'type')) return;
  switch (e.keyword) {
    case 'enum': {
      const allowed = (p.allowedValues as unknown[]).map(String);
      const got = typeName(value);
      const word = typeof value === 'string' ? suggestion(value, allowed) : undefined;
      sink.error('bad-value', `${name} must be one of ${allowed.join(', ')}; got ${got}${askIf(word)}`, path, undefined, 'enum', word);
      return;
    }
    case 'pattern':
      sink.error('bad-value', `${name} must be \`auto\` or a mapping { w, l }; got ${typeName(value)}`, path, undefined, 'pattern');
      return;
    case 'minItems':
    case 'maxItems':
      sink.error('bad-value', `${name} must be a list of two values [low, high]; got ${Array.isArray(value) ? value.length : 0}`, path, undefined, 'items');
      return;
    case 'minProperties':
    case 'maxProperties': {
      const keys = Object.keys(parent?.properties ?? {});
      const msg = keys.length ? `${name} takes exactly one of ${keys.join(', ')}` : `${name} must not be empty`;
      sink.error('bad-value', msg, path, undefined, 'props');
      return;
    }
    default:
      sink.error('bad-value', `${name} ${e.message ?? 'is not valid'}`, path, undefined, e.keyword);
  }
}
