/**
 * SARIF output against the SARIF 2.1.0 JSON schema (the copy the SARIF SDK's multitool ships,
 * `sarif-2.1.0.json`, JSON Schema 2020-12, hence ajv's 2020 build), plus the position
 * convention: SARIF lines/columns are 1-based, endColumn is the column after the region
 * (SARIF 2.1.0 §3.30.5–3.30.8), LSP ranges are 0-based with an exclusive end. The multitool's
 * own validator runs on real CLI output in sarif-validator.test.ts.
 */
import { readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { dirname, join } from 'node:path';
import Ajv from 'ajv/dist/2020';
import addFormats from 'ajv-formats';
import { describe, expect, it } from 'vitest';
import type { Finding } from '../../src/core/types';
import { toSarif, toRegion, toUri } from '../../src/core/report/sarif';
import { DESIGN_RULES } from '../../src/core/rules/catalog';

const require = createRequire(import.meta.url);
const schemaPath = join(dirname(require.resolve('@microsoft/sarif-multitool-linux/package.json')), 'sarif-2.1.0.json');
const schema = JSON.parse(readFileSync(schemaPath, 'utf8')) as object;

function validator() {
  const ajv = new Ajv({ allErrors: true, strict: false });
  addFormats(ajv);
  return ajv.compile(schema);
}

const r = (l0: number, c0: number, l1: number, c1: number) => ({ start: { line: l0, character: c0 }, end: { line: l1, character: c1 } });

const findings: Finding[] = [
  {
    severity: 'error', code: 'not-saturated', message: '`out` is in triode at Vout = 300 mV',
    path: ['mirrors', 0, 'devices', 'out', 'w'], range: r(12, 14, 12, 16),
    related: [{ path: ['mirrors', 0, 'devices', 'ref'], range: r(11, 6, 11, 9), message: 'the reference device' }],
    fixes: [
      { title: 'Widen the mirror ×1.6: w 2u → 3.2u', edits: [{ range: r(12, 14, 12, 16), newText: '3.2u' }], preferred: true },
      { title: 'Insert an override', edits: [{ range: r(13, 0, 13, 0), newText: '      w: 3.2u\n' }] },
    ],
  },
  { severity: 'warning', code: 'low-margin', message: 'm', path: ['mirrors', 1], range: r(20, 4, 20, 4) },
  { severity: 'info', code: 'square-law-weak-inversion', message: 'ic 0.4', path: ['mirrors', 1], range: r(21, 4, 21, 8) },
  { severity: 'error', code: 'unknown-key', message: 'unknown key `widht`', path: ['mirrors', 1, 'size', 'widht'], range: r(22, 10, 22, 15) },
];

describe('toSarif', () => {
  const log = toSarif(
    [{ file: 'examples/sensor afe.bias.yaml', findings }, { file: 'b.bias.json', findings: [] }],
    { version: '0.1.0', rulesDoc: 'https://example.invalid/qpoint/docs/findings.md' },
  ) as Record<string, any>;

  it('validates against the SARIF 2.1.0 schema', () => {
    const validate = validator();
    const ok = validate(log);
    expect(validate.errors ?? []).toEqual([]);
    expect(ok).toBe(true);
  });

  it('the schema check can fail (a result without a message is rejected)', () => {
    const validate = validator();
    const broken = JSON.parse(JSON.stringify(log));
    delete broken.runs[0].results[0].message;
    expect(validate(broken)).toBe(false);
    const badLevel = JSON.parse(JSON.stringify(log));
    badLevel.runs[0].results[0].level = 'info'; // SARIF has none/note/warning/error only
    expect(validate(badLevel)).toBe(false);
  });

  it('names the tool and every design rule with its help link', () => {
    const driver = log.runs[0].tool.driver;
    expect(driver.name).toBe('qpoint');
    expect(driver.version).toBe('0.1.0');
    expect(driver.informationUri).toBe('https://example.invalid/qpoint/docs/findings.md');
    const ids = driver.rules.map((x: { id: string }) => x.id);
    for (const rule of DESIGN_RULES) expect(ids).toContain(rule.code);
    expect(ids).toContain('unknown-key'); // a spec code that occurs gets a rule too
    const ns = driver.rules.find((x: { id: string }) => x.id === 'not-saturated');
    expect(ns.helpUri).toBe('https://example.invalid/qpoint/docs/findings.md#not-saturated');
    expect(ns.shortDescription.text.length).toBeGreaterThan(10);
    expect(ns.fullDescription.text.length).toBeGreaterThan(ns.shortDescription.text.length);
    expect(ns.help.text).toMatch(/Fix:/);
    expect(ns.defaultConfiguration.level).toBe('error');
  });

  it('maps severities, positions, related locations and fixes', () => {
    const results = log.runs[0].results;
    expect(results.map((x: { level: string }) => x.level)).toEqual(['error', 'warning', 'note', 'error']);
    const first = results[0];
    expect(first.ruleId).toBe('not-saturated');
    expect(log.runs[0].tool.driver.rules[first.ruleIndex].id).toBe('not-saturated');
    const loc = first.locations[0].physicalLocation;
    expect(loc.artifactLocation.uri).toBe('examples/sensor%20afe.bias.yaml');
    // 0-based (12, 14)–(12, 16) → 1-based line 13, columns 15 up to (not incl.) 17.
    expect(loc.region).toEqual({ startLine: 13, startColumn: 15, endLine: 13, endColumn: 17 });
    expect(first.relatedLocations[0].message.text).toBe('the reference device');
    expect(first.fixes).toHaveLength(2);
    const rep = first.fixes[0].artifactChanges[0].replacements[0];
    expect(rep.deletedRegion).toEqual({ startLine: 13, startColumn: 15, endLine: 13, endColumn: 17 });
    expect(rep.insertedContent.text).toBe('3.2u');
    expect(first.fixes[0].description.text).toMatch(/preferred/);
    // An insertion is an empty deleted region.
    const ins = first.fixes[1].artifactChanges[0].replacements[0];
    expect(ins.deletedRegion.startColumn).toBe(ins.deletedRegion.endColumn);
  });

  it('converts ranges and file names', () => {
    expect(toRegion(r(0, 0, 0, 0))).toEqual({ startLine: 1, startColumn: 1, endLine: 1, endColumn: 1 });
    expect(toUri('C:\\chips\\kestrel.bias.yaml')).toBe('file:///C:/chips/kestrel.bias.yaml');
    // An absolute path is a file URI: a relative reference must not start with a slash.
    expect(toUri('/srv/chips/a b/x.bias.yaml')).toBe('file:///srv/chips/a%20b/x.bias.yaml');
  });

  it('an empty log is valid too', () => {
    const validate = validator();
    expect(validate(toSarif([], { version: '0.1.0', rulesDoc: 'https://example.invalid/f.md' }))).toBe(true);
  });
});

describe('toSarif on real findings', () => {
  it('the faulty fixture\'s findings and fixes form a valid SARIF 2.1.0 log', async () => {
    const { check } = await import('./helpers');
    const text = readFileSync(new URL('./fixtures/faulty.bias.yaml', import.meta.url), 'utf8');
    const { findings } = check(text, 'faulty.bias.yaml');
    expect(findings.some((f) => (f.fixes?.length ?? 0) > 0)).toBe(true);
    const log = toSarif([{ file: 'test/rules/fixtures/faulty.bias.yaml', findings }], { version: '0.1.0', rulesDoc: 'https://example.invalid/docs/findings.md' }) as Record<string, any>;
    const validate = validator();
    expect(validate(log), JSON.stringify(validate.errors)).toBe(true);
    const results = log.runs[0].results;
    expect(results).toHaveLength(findings.length);
    // Every fix's replacement deletes exactly the source text of its edit (1-based region back to 0-based).
    const lines = text.split('\n');
    for (const r of results) {
      for (const fix of r.fixes ?? []) {
        for (const rep of fix.artifactChanges[0].replacements) {
          const d = rep.deletedRegion;
          expect(d.startLine).toBeGreaterThanOrEqual(1);
          if (d.startLine === d.endLine) expect(lines[d.startLine - 1].length).toBeGreaterThanOrEqual(d.endColumn - 1);
        }
      }
    }
  });
});
