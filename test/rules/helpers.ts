/** Shared pieces of the rules tests: the parse → solve → rules pipeline and the Halden 180 header. */
import type { Finding, Fix, Range } from '../../src/core/types';
import { resolveText } from '../../src/core/resolve';
import { analyzeSpec } from '../../src/core/analysis/index';
import { runRules } from '../../src/core/rules/index';
import { applyEdits } from '../../src/core/text/edits';

/** Spec findings plus design findings, as the front ends get them. */
export function check(text: string, file = 'case.bias.yaml'): { findings: Finding[]; parsed: boolean; specErrors: Finding[] } {
  // Resolved as the front ends resolve it: design targets sized, linked groups solved.
  const { parsed } = resolveText(text, file);
  const specErrors = parsed.findings.filter((f) => f.severity === 'error');
  if (!parsed.spec) return { findings: parsed.findings, parsed: parsed.parsed, specErrors };
  return { findings: [...parsed.findings, ...runRules(parsed, analyzeSpec(parsed.spec))], parsed: true, specErrors };
}

/** The invented Halden 180 process (design §2's example values), `mirrors:` last. Lines 0–6. */
export function header(vdd = 1.8, extra = ''): string {
  return [
    'format: 1',
    'process:',
    `  grid: 10n${extra}`,
    '  nmos: { kp: 280u, vt0: 0.45, lambda: 0.08, lref: 1u, gamma: 0.45, phi: 0.85, avt: 4e-9, abeta: 1e-8, lmin: 0.18u, wmin: 0.22u }',
    '  pmos: { kp: 70u, vt0: 0.48, lambda: 0.1, lref: 1u, gamma: 0.4, phi: 0.8, avt: 5e-9, abeta: 1e-8, lmin: 0.18u, wmin: 0.22u }',
    `supplies: { vdd: ${vdd} }`,
    'mirrors:',
  ].join('\n');
}

export function spec(lines: string[], vdd = 1.8): string {
  return `${header(vdd)}\n${lines.join('\n')}\n`;
}

export function textOf(text: string, r: Range): string {
  const lines = text.split('\n');
  if (r.start.line === r.end.line) return lines[r.start.line].slice(r.start.character, r.end.character);
  return [lines[r.start.line].slice(r.start.character), ...lines.slice(r.start.line + 1, r.end.line), lines[r.end.line].slice(0, r.end.character)].join('\n');
}

export function preferred(f: Finding): Fix | undefined {
  return f.fixes?.find((x) => x.preferred);
}

export function apply(text: string, fix: Fix): string {
  return applyEdits(text, fix.edits);
}

/** The mirror (and bank output) a finding belongs to, for "is it gone" after a fix. */
export function owner(f: Finding): string {
  const p = f.path;
  if (p[0] !== 'mirrors') return 'spec';
  return p[2] === 'outputs' ? `${p[1]}/${p[3]}` : `${p[1]}`;
}
