/** The docs cannot drift from the code: every design check is documented under its own heading. */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { DESIGN_RULES } from '../../src/core/rules/catalog';

const doc = readFileSync(new URL('../../docs/findings.md', import.meta.url), 'utf8');

describe('docs/findings.md', () => {
  for (const rule of DESIGN_RULES) {
    it(`documents ${rule.code} with its severity`, () => {
      const at = doc.indexOf(`\n## ${rule.code}\n`);
      expect(at, `## ${rule.code}`).toBeGreaterThan(0);
      const body = doc.slice(at + rule.code.length + 5).trimStart();
      const word = { error: 'Error.', warning: 'Warning.', info: 'Info.' }[rule.severity];
      expect(body.startsWith(word)).toBe(true);
    });
  }
  it('codes are kebab-case and unique', () => {
    const codes = DESIGN_RULES.map((r) => r.code);
    expect(new Set(codes).size).toBe(codes.length);
    for (const c of codes) expect(c).toMatch(/^[a-z]+(-[a-z]+)*$/);
  });
});
