/** Shared fixtures for the spec tests. */
import type { Finding, Range } from '../../src/core/types';

/** A minimal clean spec; tests replace parts of it. Line numbers (0-based) are in the comments. */
export const BASE = [
  'format: 1',                              // 0
  'process:',                               // 1
  '  nmos: { kp: 280u, vt0: 0.45 }',        // 2
  '  pmos: { kp: 70u, vt0: 0.48 }',         // 3
  'supplies: { vdd: 1.8 }',                 // 4
  'mirrors:',                               // 5
  '  - name: m1',                           // 6
  '    kind: simple',                       // 7
  '    type: nmos',                         // 8
  '    input: 10u',                         // 9
  '    size: { w: 2u, l: 1u }',             // 10
  '    output: { v: 0.9 }',                 // 11
  '',
].join('\n');

/** BASE with one exact substring replaced (fails loudly if it is not there exactly once). */
export function withText(from: string, to: string, base = BASE): string {
  const at = base.indexOf(from);
  if (at < 0 || base.indexOf(from, at + 1) >= 0) throw new Error(`fixture: \`${from}\` must occur once`);
  return base.slice(0, at) + to + base.slice(at + from.length);
}

/**
 * Strip ⟦ ⟧ markers from a text and return it with the marked range (LSP, 0-based), so a
 * table row states the exact token a finding must cover.
 */
export function marked(text: string): { text: string; range: Range } {
  const a = text.indexOf('⟦');
  const b = text.indexOf('⟧');
  if (a < 0 || b < a) throw new Error('fixture: needs ⟦…⟧');
  const clean = text.slice(0, a) + text.slice(a + 1, b) + text.slice(b + 1);
  const pos = (offset: number) => {
    const before = clean.slice(0, offset);
    const line = before.split('\n').length - 1;
    return { line, character: offset - (before.lastIndexOf('\n') + 1) };
  };
  return { text: clean, range: { start: pos(a), end: pos(b - 1) } };
}

export function codes(findings: Finding[]): string[] {
  return findings.map((f) => f.code);
}

/**
 * What an error leaves of the resolved spec (src/core/spec/index.ts): nothing when any error is
 * outside mirrors; else at most a partial spec without the mirrors the errors are in.
 */
export function expectErrorsBlock(p: { spec?: { mirrors: { path: (string | number)[] }[] }; withheld?: number[]; findings: Finding[] }): void {
  const errors = p.findings.filter((f) => f.severity === 'error');
  if (errors.length === 0) return;
  const inMirrors = errors.every((f) => f.path[0] === 'mirrors' && typeof f.path[1] === 'number');
  if (!inMirrors) {
    if (p.spec !== undefined) throw new Error('a spec error outside mirrors must leave no resolved spec');
    return;
  }
  if (!p.spec) return;
  for (const f of errors) {
    if (!p.withheld?.includes(f.path[1] as number)) throw new Error(`mirror ${String(f.path[1])} has an error but is not withheld`);
    if (p.spec.mirrors.some((m) => m.path[1] === f.path[1])) throw new Error(`mirror ${String(f.path[1])} has an error but is in the spec`);
  }
}
