/**
 * The shipped JSON Schema (draft-07, json-schema.org/draft-07/schema) is complete enough for
 * editor completion, and the documented finding codes cover every code the spec reader emits.
 */
import { describe, expect, test } from 'vitest';
import { readdirSync, readFileSync } from 'node:fs';
import Ajv from 'ajv';
import { parse } from 'yaml';
import schema from '../../schema/qpoint-bias.schema.json';
import { MODEL_NAMES } from '../../src/core/models/registry';

type Json = Record<string, unknown>;

/** Every property schema reachable in the file, with its path. */
function properties(node: unknown, path: string, out: [string, Json][]): void {
  if (!node || typeof node !== 'object') return;
  const n = node as Json;
  if (n.properties && typeof n.properties === 'object') {
    for (const [k, v] of Object.entries(n.properties as Json)) {
      out.push([`${path}.${k}`, v as Json]);
      properties(v, `${path}.${k}`, out);
    }
  }
  for (const key of ['items', 'additionalProperties', 'then', 'else']) if (n[key] && typeof n[key] === 'object') properties(n[key], `${path}/${key}`, out);
  for (const key of ['allOf', 'anyOf', 'oneOf']) if (Array.isArray(n[key])) (n[key] as unknown[]).forEach((s, i) => properties(s, `${path}/${key}${i}`, out));
  if (n.definitions) for (const [k, v] of Object.entries(n.definitions as Json)) properties(v, `#${k}`, out);
}

describe('schema/qpoint-bias.schema.json', () => {
  test('is a draft-07 schema that ajv compiles', () => {
    expect(schema.$schema).toBe('http://json-schema.org/draft-07/schema#');
    const ajv = new Ajv({ allowUnionTypes: true, strictTypes: false });
    ajv.addVocabulary(['defaultSnippets', 'markdownDescription']);
    expect(() => ajv.compile(schema)).not.toThrow();
  });

  test('every property has a description; closed sets are enums', () => {
    const all: [string, Json][] = [];
    properties(schema, '', all);
    expect(all.length).toBeGreaterThan(80);
    const undocumented = all.filter(([, s]) => typeof s.description !== 'string' && !s.$ref).map(([p]) => p);
    expect(undocumented).toEqual([]);
    const byName = new Map(all.map(([p, s]) => [p.split('.').pop(), s]));
    expect(byName.get('kind')!.enum).toEqual(['simple', 'cascode', 'wide-swing', 'wilson', 'wilson-balanced', 'beta-helper', 'widlar', 'beta-multiplier', 'vgs-resistor', 'ptat', 'vbe-resistor', 'netlist']);
    expect(byName.get('type')!.enum).toEqual(['nmos', 'pmos', 'npn', 'pnp']);
    expect(byName.get('model')!.enum).toEqual(['square-law', 'ekv', 'table']);
    expect(byName.get('bulk')!.enum).toEqual(['rail', 'source']);
  });

  test('process.model offers exactly the registered device models (MODEL_NAMES)', () => {
    expect(schema.properties.process.properties.model.enum).toEqual([...MODEL_NAMES]);
  });

  test('values that may carry units are number or string', () => {
    const nmos = (schema.definitions.deviceParams.properties as Record<string, { type: unknown }>);
    for (const key of ['kp', 'vt0', 'lambda', 'avt', 'abeta']) expect(nmos[key].type).toEqual(['number', 'string']);
  });

  test('the example validates against the schema alone', () => {
    const ajv = new Ajv({ allowUnionTypes: true, strictTypes: false, allErrors: true });
    ajv.addVocabulary(['defaultSnippets', 'markdownDescription']);
    const validate = ajv.compile(schema);
    const data = parse(readFileSync(new URL('../../examples/sensor-afe.bias.yaml', import.meta.url), 'utf8'));
    expect(validate(data), JSON.stringify(validate.errors)).toBe(true);
  });
});

describe('docs/findings.md', () => {
  test('documents every code the spec reader emits, one `## code` heading each', () => {
    const docs = readFileSync(new URL('../../docs/findings.md', import.meta.url), 'utf8');
    const headings = new Set([...docs.matchAll(/^## ([a-z0-9-]+)$/gm)].map((m) => m[1]));
    const dir = new URL('../../src/core/spec/', import.meta.url);
    const emitted = new Set<string>();
    for (const f of readdirSync(dir)) {
      const src = readFileSync(new URL(f, dir), 'utf8');
      for (const m of src.matchAll(/(?:error|warning|add)\(\s*(?:'(?:error|warning|info)',\s*)?'([a-z]+(?:-[a-z0-9]+)+)'/g)) emitted.add(m[1]);
      for (const m of src.matchAll(/at\(lines,[^']*'([a-z]+(?:-[a-z0-9]+)+)'/g)) emitted.add(m[1]);
      for (const m of src.matchAll(/code: '([a-z]+(?:-[a-z0-9]+)+)'/g)) emitted.add(m[1]);
    }
    expect(emitted.size).toBeGreaterThan(25);
    expect([...emitted].filter((c) => !headings.has(c))).toEqual([]);
  });
});
