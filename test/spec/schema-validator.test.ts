/**
 * The ahead-of-time schema validator (src/core/spec/schema-validator.generated.ts) is ajv's code
 * for the shipped schema: it must be current, and it must judge any data exactly as a validator
 * compiled at run time from the same schema does (same verdict, same error objects). The reference
 * is ajv itself (ajv.js.org/standalone.html: standalone code is the compiled function's source).
 */
import { readFileSync } from 'node:fs';
import Ajv from 'ajv';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { parse } from 'yaml';
import schema from '../../schema/qpoint-bias.schema.json';
import generated from '../../src/core/spec/schema-validator.generated';
// @ts-expect-error: a plain .mjs build script without type declarations
import { generateValidator } from '../../scripts/gen-schema-validator.mjs';

type Validate = ((data: unknown) => boolean) & { errors?: unknown[] | null };

function runtimeValidator(): Validate {
  const ajv = new Ajv({ allErrors: true, verbose: true, allowUnionTypes: true, strictTypes: false, strictRequired: false });
  ajv.addVocabulary(['defaultSnippets', 'markdownDescription']);
  return ajv.compile(schema) as Validate;
}

const EXAMPLE = parse(readFileSync(new URL('../../examples/sensor-afe.bias.yaml', import.meta.url), 'utf8')) as Record<string, unknown>;

/** What a finding mapper reads of an error (schema objects compared by value). */
function shape(errors: unknown[] | null | undefined): unknown {
  return JSON.parse(JSON.stringify(errors ?? []));
}

describe('generated schema validator', () => {
  it('is current with schema/qpoint-bias.schema.json (else: node scripts/gen-schema-validator.mjs)', () => {
    const onDisk = readFileSync(new URL('../../src/core/spec/schema-validator.generated.ts', import.meta.url), 'utf8');
    expect(onDisk === (generateValidator(schema) as string)).toBe(true);
  });

  it('judges random edits of the example exactly like a run-time compiled validator', () => {
    const reference = runtimeValidator();
    const aot = generated as unknown as Validate;
    const leaf = fc.oneof(fc.integer(), fc.double(), fc.string({ maxLength: 6 }), fc.boolean(), fc.constant(null),
      fc.constantFrom('10u', 'wu', 'cascode', 'nmos', 'pmos', 'auto', 'rail', 'source'), fc.array(fc.integer(), { maxLength: 3 }), fc.dictionary(fc.string({ maxLength: 4 }), fc.integer(), { maxKeys: 2 }));
    // Paths into the example: replace or delete one value somewhere.
    const paths: (string | number)[][] = [];
    const walk = (v: unknown, p: (string | number)[]) => {
      paths.push(p);
      if (Array.isArray(v)) v.forEach((x, i) => walk(x, [...p, i]));
      else if (v && typeof v === 'object') for (const [k, x] of Object.entries(v)) walk(x, [...p, k]);
    };
    walk(EXAMPLE, []);
    let invalid = 0;
    fc.assert(fc.property(fc.constantFrom(...paths.slice(1)), fc.option(leaf, { nil: undefined }), fc.string({ maxLength: 5 }), (path, value, extraKey) => {
      const data = structuredClone(EXAMPLE) as Record<string | number, unknown>;
      let cur = data;
      for (const seg of path.slice(0, -1)) cur = cur[seg] as Record<string | number, unknown>;
      const last = path[path.length - 1]!;
      if (value === undefined) delete cur[last];
      else cur[last] = value;
      if (extraKey && typeof cur === 'object' && !Array.isArray(cur)) cur[extraKey] = 1;
      const a = reference(data);
      const b = aot(data);
      expect(b).toBe(a);
      expect(shape(aot.errors)).toEqual(shape(reference.errors));
      if (!a) invalid++;
    }), { numRuns: 300, seed: 7 });
    // The property must see invalid data, or it compares nothing but `true`.
    expect(invalid).toBeGreaterThan(100);
  });
});
