/**
 * Fixes change values, never the rest of the file (design §6: "a fix replaces the value token only
 * (or inserts one key), keeps comments and formatting"). For every offered fix and for fix-all,
 * on random faulty specs with comments, flow and block style, anchors, aliases and merge keys,
 * CRLF line breaks, and on the project's specs:
 *  - every replaced range is exactly one value token of the original (a scalar or an alias);
 *  - the edited file, read as YAML tokens, is the original's token sequence with values
 *    replaced and tokens inserted: every key, indicator, line break, comment, anchor and tag of
 *    the original survives, in order, byte for byte (comments, anchors and tags are not added either);
 *  - the edited file still reads as YAML without an error.
 * The token reader is the yaml package's own lexer (eemeli.org/yaml, "Lexer").
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { CST, Lexer, parseDocument } from 'yaml';
import type { Finding, Fix } from '../../src/core/types';
import { analyzeText } from '../../src/core/analyze';
import { applyEdits } from '../../src/core/text/edits';
import { fixAll } from '../../src/core/rules/fix-all';
import { LineIndex } from '../../src/core/text/lines';
import { arbFaultySpec } from './faulty-specs';
import { seedSpecs } from './inputs';

interface Tok { sig: string; start: number; end: number; value: boolean }

/** The YAML tokens of a text: keys and everything structural verbatim, values as `V`. */
function yamlTokens(text: string): Tok[] {
  const raw: { type: string; src: string; start: number }[] = [];
  let at = 0;
  let plainNext = false;
  for (const lexeme of new Lexer().lex(text)) {
    const type: string = CST.tokenType(lexeme) ?? (plainNext ? 'plain' : 'other');
    plainNext = type === 'scalar';
    if (type !== 'scalar' && type !== 'doc-mode' && type !== 'space') raw.push({ type, src: lexeme, start: at });
    if (type !== 'doc-mode' && type !== 'scalar' && type !== 'flow-error-end') at += lexeme.length;
  }
  const out: Tok[] = [];
  raw.forEach((t, i) => {
    const scalarLike = t.type === 'plain' || t.type === 'double-quoted-scalar' || t.type === 'single-quoted-scalar' || t.type === 'alias';
    const end = t.start + t.src.length;
    if (!scalarLike) {
      out.push({ sig: t.type === 'newline' ? 'NL' : `${t.type}:${t.src}`, start: t.start, end, value: false });
      return;
    }
    const key = raw[i + 1]?.type === 'map-value-ind';
    out.push({ sig: key ? `key:${t.src}` : 'V', start: t.start, end, value: !key });
  });
  return out;
}

function kept(tokens: Tok[]): string[] {
  return tokens.filter((t) => /^(comment|anchor|tag):/.test(t.sig)).map((t) => t.sig);
}

/** Why `after` is not `before` with values replaced and tokens inserted (undefined: it is). */
function structureProblem(before: string, after: string): string | undefined {
  const a = yamlTokens(before);
  const b = yamlTokens(after);
  let j = 0;
  for (const t of a) {
    while (j < b.length && b[j].sig !== t.sig) j++;
    if (j >= b.length) return `token ${JSON.stringify(t.sig)} at offset ${t.start} is gone`;
    j++;
  }
  const ka = kept(a).join('\n');
  const kb = kept(b).join('\n');
  if (ka !== kb) return `comments, anchors or tags differ:\n${ka}\n---\n${kb}`;
  return undefined;
}

function checkFix(text: string, f: Finding, fix: Fix): void {
  const lines = new LineIndex(text);
  const values = yamlTokens(text).filter((t) => t.value);
  for (const e of fix.edits) {
    const s = lines.offset(e.range.start);
    const end = lines.offset(e.range.end);
    if (s !== end) {
      const hit = values.find((v) => v.start === s && v.end === end);
      expect(hit, `${f.code}: "${fix.title}" replaces ${JSON.stringify(text.slice(s, end))}, not one value token`).toBeDefined();
    }
    expect(e.newText, `${f.code}: inserted text adds a comment, anchor, alias or tag`).not.toMatch(/#|&\w|\*\w|!/);
  }
  const fixed = applyEdits(text, fix.edits);
  expect(structureProblem(text, fixed), `${f.code}: "${fix.title}"`).toBeUndefined();
  expect(parseDocument(fixed).errors.map((x) => x.message), `${f.code}: "${fix.title}" leaves YAML errors`).toEqual([]);
}

function allFixes(text: string, file: string): number {
  const r = analyzeText(text, file);
  let n = 0;
  for (const f of r.findings) for (const fix of f.fixes ?? []) { checkFix(text, f, fix); n++; }
  return n;
}

describe('fixes edit values only', () => {
  it('random faulty specs (comments, flow and block, anchors, merge keys, CRLF): every offered fix', () => {
    let fixes = 0;
    fc.assert(fc.property(arbFaultySpec, (text) => { fixes += allFixes(text, 'random.bias.yaml'); }), { numRuns: 80, seed: 2718 });
    expect(fixes).toBeGreaterThan(100);
  });

  it('the project specs: every offered fix', () => {
    let fixes = 0;
    for (const s of seedSpecs()) fixes += allFixes(s.text, s.name);
    expect(fixes).toBeGreaterThan(10);
  });

  it('fix-all keeps every key, comment, anchor, alias target and flow bracket', () => {
    let changed = 0;
    const specs = [...seedSpecs().map((s) => ({ text: s.text, file: s.name })), ...fc.sample(arbFaultySpec, { numRuns: 16, seed: 31 }).map((text) => ({ text, file: 'random.bias.yaml' }))];
    for (const { text, file } of specs) {
      const r = fixAll(text, file, (t) => analyzeText(t, file));
      if (r.text !== text) changed++;
      expect(structureProblem(text, r.text), file).toBeUndefined();
      expect(parseDocument(r.text).errors).toEqual([]);
    }
    expect(changed).toBeGreaterThan(8);
  });

  it('the structure check itself sees a lost comment, a renamed key and a dropped anchor', () => {
    const t = 'a: &x { w: 2u, l: 1u }  # c\nb: *x\n';
    expect(structureProblem(t, 'a: &x { w: 3u, l: 1u, m: 2 }  # c\nb: *x\n')).toBeUndefined();
    expect(structureProblem(t, 'a: &x { w: 2u, l: 1u }\nb: *x\n')).toMatch(/comment/);
    expect(structureProblem(t, 'a: &x { w: 2u, k: 1u }  # c\nb: *x\n')).toMatch(/key:l/);
    expect(structureProblem(t, 'a: { w: 2u, l: 1u }  # c\nb: *x\n')).toMatch(/anchor/);
    expect(structureProblem(t, 'a: &x [ w, l ]  # c\nb: *x\n')).toMatch(/flow-map-start/);
  });
});
