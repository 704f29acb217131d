/**
 * documentData (src/core/spec/data.ts) against the yaml package's own Document.toJS, the
 * reference it stands in for: equal, key for key and type for type, on every spec the repository
 * ships and on random documents — block and flow, repeated keys, keys that are also names on
 * Object.prototype, aliases, merge keys, tags, complex keys (the last four handed to toJS).
 */
import { readdirSync, readFileSync, statSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { parseDocument, stringify } from 'yaml';
import { documentData } from '../../src/core/spec/data';
import { YAML_OPTIONS } from '../../src/core/spec/yaml-options';
import { SPEC_LIMITS } from '../../src/core/defaults';

/** Each way's value, or the message it threw (a merge key over a scalar, an alias bomb). */
function both(text: string): { ours: unknown; theirs: unknown } | undefined {
  const doc = parseDocument(text, YAML_OPTIONS);
  if (doc.errors.length > 0) return undefined;
  const outcome = (f: () => unknown): unknown => {
    try { return f(); } catch (e) { return { threw: e instanceof Error ? e.message : String(e) }; }
  };
  return {
    ours: outcome(() => documentData(doc, SPEC_LIMITS.maxAliasCount)),
    theirs: outcome(() => doc.toJS({ maxAliasCount: SPEC_LIMITS.maxAliasCount })),
  };
}

function specFiles(dir: string): string[] {
  return readdirSync(dir).flatMap((f) => {
    const p = join(dir, f);
    if (statSync(p).isDirectory()) return specFiles(p);
    return /\.bias\.(ya?ml|json)$/.test(f) ? [p] : [];
  });
}

describe('documentData equals Document.toJS', () => {
  it('on every spec the repository ships', () => {
    const files = [...specFiles('examples'), ...specFiles('test')];
    expect(files.length).toBeGreaterThanOrEqual(5);
    for (const f of files) {
      const r = both(readFileSync(f, 'utf8'));
      if (r) expect(r.ours, f).toStrictEqual(r.theirs);
    }
  });

  it('on documents the fast walk hands to toJS, and on the keys toJS writes as own properties', () => {
    const texts = [
      'a: &x { w: 1u }\nb: *x\n',                       // alias
      'base: &b { l: 1u }\nm:\n  <<: *b\n  w: 2u\n',     // merge key
      'm: !!set { a, b }\n',                            // tagged collection
      '? [a, b]\n: 1\n',                                // complex key
      '__proto__: { polluted: 1 }\ntoString: 3\nconstructor: x\n',
      'a: 1\na: 2\n',                                   // repeated key (uniqueKeys: false)
      '1: one\ntrue: yes\n~: nothing\n0x10: hex\n1e3: e\n',
      '"<<": quoted\n',
      '- [1, 2.5, -0, .inf, -.inf, .nan]\n- { "": empty, "a b": 1 }\n- null\n- ~\n',
      'x: !custom 1\ny: !!str 2\n',
      'm:\n  <<: 3\n',                                // a merge of a scalar: both throw
      'a: &a [*a]\n',                                  // an alias inside its own anchor
      `a: &a [x, x]\nb: &b [*a, *a, *a, *a, *a, *a, *a, *a, *a, *a]\nc: &c [*b, *b, *b, *b, *b, *b, *b, *b, *b, *b]\nd: [*c, *c, *c, *c, *c, *c, *c, *c, *c, *c]\n`,
    ];
    for (const t of texts) {
      const r = both(t)!;
      expect(r, t).toBeDefined();
      expect(r.ours, t).toStrictEqual(r.theirs);
    }
  });

  it('on random documents, block and flow', () => {
    const key = fc.oneof(fc.string({ maxLength: 6 }), fc.constantFrom('__proto__', 'toString', 'hasOwnProperty', '1', 'true', 'null', '<<', 'w', 'l'));
    const leaf = fc.oneof(fc.integer(), fc.double(), fc.string({ maxLength: 8 }), fc.boolean(), fc.constant(null), fc.constantFrom('10u', '1e-6', 'yes', '0o17', '.5'));
    const { value } = fc.letrec((tie) => ({
      value: fc.oneof({ depthSize: 'small' }, leaf, fc.array(tie('value'), { maxLength: 4 }), fc.dictionary(key, tie('value'), { maxKeys: 4 })),
    }));
    fc.assert(fc.property(value, fc.constantFrom(false, true), fc.constantFrom(false, true), (v, flow, dup) => {
      let text = stringify(v, { collectionStyle: flow ? 'flow' : 'block' });
      // A repeated key written by hand (stringify writes each once).
      if (dup && /^\w+:/.test(text)) text += text.slice(0, text.indexOf('\n') + 1);
      const r = both(text);
      if (r) expect(r.ours, text).toStrictEqual(r.theirs);
    }), { numRuns: 400, seed: 20261205 });
  });
});
