/**
 * Properties of every offered fix, on randomly generated Halden 180 specs (fast-check) and on the
 * faulty fixture: a fix edits only value tokens or inserts keys (every other byte, comments
 * included, survives), the edited file re-parses without a spec error, and the finding it was
 * offered for is gone. Fix-all clears every error of the faulty fixture.
 */
import { readFileSync } from 'node:fs';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import type { Finding, Fix } from '../../src/core/types';
import { fixAll, MAX_ROUNDS } from '../../src/core/rules/fix-all';
import { apply, check, header, owner, textOf } from './helpers';

const FAULTY = readFileSync(new URL('./fixtures/faulty.bias.yaml', import.meta.url), 'utf8');

/** What "the same finding" means after an edit: device findings name their device first. */
function subject(f: Finding): string {
  const dev = /`([^`]+)`/.exec(f.message)?.[1] ?? '';
  if (f.code === 'not-saturated' || f.code === 'low-margin') return `${f.code}@${owner(f)}:${dev}`;
  if (f.code === 'below-lmin' || f.code === 'below-wmin') return `${f.code}@${f.path.join('/')}`;
  return `${f.code}@${owner(f)}`;
}

function commentLines(text: string): string[] {
  return text.split('\n').map((l) => l.slice(l.indexOf('#'))).filter((c, i, all) => c.startsWith('#') && all.indexOf(c) === i);
}

/** Check one offered fix against the original text and its finding. */
function checkFix(text: string, f: Finding, fix: Fix): void {
  for (const e of fix.edits) {
    const old = textOf(text, e.range);
    const empty = e.range.start.line === e.range.end.line && e.range.start.character === e.range.end.character;
    // Minimal: an insertion, or one scalar token replaced (no line break, comment or key in it).
    if (!empty) expect(old, `edit replaces ${JSON.stringify(old)}`).toMatch(/^[^\n#:{}[\],]+$/);
    expect(e.newText).not.toMatch(/#/);
  }
  const fixed = apply(text, fix);
  // Every comment of the original survives, in order.
  const comments = commentLines(text);
  let at = 0;
  for (const c of comments) {
    const i = fixed.indexOf(c, at);
    expect(i, `comment ${c}`).toBeGreaterThanOrEqual(0);
    at = i + c.length;
  }
  const after = check(fixed);
  expect(after.parsed).toBe(true);
  expect(after.specErrors).toEqual([]);
  expect(after.findings.map(subject), `${fix.title}`).not.toContain(subject(f));
}

const arbMirror = fc.record({
  kind: fc.constantFrom('simple', 'cascode', 'wide-swing', 'wilson', 'wilson-balanced'),
  type: fc.constantFrom('nmos', 'pmos'),
  iin: fc.constantFrom('5u', '10u', '20u'),
  w: fc.constantFrom('1u', '2u', '4u', '8u'),
  l: fc.constantFrom('0.5u', '1u', '2u'),
  m: fc.integer({ min: 1, max: 4 }),
  voutFrac: fc.integer({ min: 5, max: 95 }),
  ratio: fc.boolean(),
  rout: fc.option(fc.constantFrom('1M', '5M', '50M'), { nil: undefined }),
  sigma: fc.option(fc.constantFrom('0.5%', '1%', '2%'), { nil: undefined }),
  flow: fc.boolean(),
  /** A second output (bias bank) for the kinds that take `outputs:`. */
  bank: fc.boolean(),
  vbias: fc.option(fc.constantFrom('0.7', '0.9', '1.1'), { nil: undefined }),
});

type ArbMirror = typeof arbMirror extends fc.Arbitrary<infer T> ? T : never;

function mirrorText(m: ArbMirror, i: number): string[] {
  const vout = (1.8 * m.voutFrac / 100).toFixed(2);
  const req = [m.ratio ? `ratio: ${m.kind.startsWith('wilson') ? 1 : m.m}` : '', m.rout ? `rout: ${m.rout}` : '', m.sigma ? `sigma: ${m.sigma}` : ''].filter(Boolean);
  const out = m.kind.startsWith('wilson') ? [] : m.flow ? [`    devices: { out: { m: ${m.m} } }   # parallel copies`] : ['    devices:', '      out:', `        m: ${m.m}      # parallel copies`];
  const vbias = m.kind === 'wide-swing' && m.vbias && m.type === 'nmos' ? [`    vbias: ${m.vbias}   # written cascode bias`] : [];
  if (m.bank && !m.kind.startsWith('wilson')) {
    return [
      `  # bank ${i}: generated`,
      `  - name: g${i}`,
      `    kind: ${m.kind}`,
      `    type: ${m.type}`,
      `    input: ${m.iin}`,
      `    size: { w: ${m.w}, l: ${m.l} }`,
      ...vbias,
      '    outputs:',
      '      - name: a        # first tap',
      `        devices: { out: { m: ${m.m} } }`,
      `        output: { v: ${vout} }`,
      ...(req.length ? [`        require: { ${req.join(', ')} }`] : []),
      '      - name: b',
      `        output: { v: ${(1.8 - Number(vout)).toFixed(2)} }`,
    ];
  }
  return [
    `  # mirror ${i}: generated`,
    `  - name: g${i}`,
    `    kind: ${m.kind}`,
    `    type: ${m.type}`,
    `    input: ${m.iin}        # ideal input current`,
    m.flow ? `    size: { w: ${m.w}, l: ${m.l} }` : `    size:\n      w: ${m.w}   # unit width\n      l: ${m.l}`,
    ...out,
    ...vbias,
    `    output: { v: ${vout} }`,
    ...(req.length ? [`    require: { ${req.join(', ')} }`] : []),
  ];
}

describe('offered fixes (property)', () => {
  it('random specs: every offered fix is minimal, keeps comments, re-parses and removes its finding', () => {
    let fixesSeen = 0;
    const fixedCodes = new Set<string>();
    fc.assert(fc.property(fc.array(arbMirror, { minLength: 1, maxLength: 2 }), (ms) => {
      const text = `# generated spec\n${header()}\n${ms.flatMap(mirrorText).join('\n')}\n`;
      const { findings, parsed } = check(text);
      expect(parsed).toBe(true);
      expect(findings.filter((f) => f.code === 'internal-error')).toEqual([]);
      for (const f of findings) {
        for (const fix of f.fixes ?? []) {
          fixesSeen++;
          fixedCodes.add(f.code);
          checkFix(text, f, fix);
        }
        if (f.fixes?.length) expect(f.fixes.filter((x) => x.preferred)).toHaveLength(1);
      }
    }), { numRuns: Number(process.env.QPOINT_PROP_RUNS ?? 16), seed: Number(process.env.QPOINT_PROP_SEED ?? 20240611) });
    // The generator must actually exercise fixes, or this property says nothing.
    expect(fixesSeen).toBeGreaterThan(10);
    if (process.env.QPOINT_PROP_SHOW) console.log(fixesSeen, [...fixedCodes]);
    expect(fixedCodes.size).toBeGreaterThanOrEqual(4);
  });

  it('faulty fixture: every offered fix holds', () => {
    const { findings } = check(FAULTY, 'faulty.bias.yaml');
    const codes = new Set(findings.map((f) => f.code));
    for (const c of ['not-saturated', 'ratio-error', 'vds-mismatch', 'low-rout', 'high-sigma']) expect(codes).toContain(c);
    for (const f of findings) for (const fix of f.fixes ?? []) checkFix(FAULTY, f, fix);
  });
});

describe('fixAll', () => {
  it('clears every error of the faulty fixture within the round limit, comments intact', () => {
    const before = check(FAULTY, 'faulty.bias.yaml').findings.filter((f) => f.severity === 'error');
    expect(before.length).toBeGreaterThanOrEqual(6);
    const r = fixAll(FAULTY, 'faulty.bias.yaml', (t) => check(t, 'faulty.bias.yaml'));
    expect(r.remaining.filter((f) => f.severity === 'error')).toEqual([]);
    expect(r.rounds).toBeGreaterThan(0);
    expect(r.rounds).toBeLessThanOrEqual(MAX_ROUNDS);
    expect(r.applied.map((a) => a.code)).toEqual(expect.arrayContaining(['not-saturated', 'ratio-error', 'low-rout', 'high-sigma']));
    for (const c of commentLines(FAULTY)) expect(r.text).toContain(c);
    // The result is what the check says it is.
    expect(check(r.text, 'faulty.bias.yaml').findings.filter((f) => f.severity === 'error')).toEqual([]);
    // The Wilson became balanced; the CLM-off sink was fixed at the cause, keeping its unit cell:
    // `out` is still four unit devices, and the width is still written through the param `wu`,
    // which the fix edited (only sink4 reads it).
    expect(r.text).toMatch(/kind: wilson-balanced/);
    expect(r.text).toMatch(/out: \{ m: 4 \} {12}# four unit devices in parallel/);
    expect(r.text).toMatch(/size: \{ w: wu, l: [0-9.]+u \}/);
    expect(r.text).not.toMatch(/wu: 2u /);
  });

  it('stops at once on a clean file and on one whose fixes do not help', () => {
    const clean = `${header()}\n  - name: ok\n    kind: cascode\n    type: nmos\n    input: 10u\n    size: { w: 2u, l: 1u }\n    output: { v: 1.2 }\n`;
    const r = fixAll(clean, 'ok.bias.yaml', (t) => check(t));
    expect(r.rounds).toBe(0);
    expect(r.text).toBe(clean);
    // A check whose fix never helps: one round tried, nothing kept.
    const stuck: Finding = { severity: 'error', code: 'x', message: 'x', path: ['mirrors', 0], range: { start: { line: 0, character: 0 }, end: { line: 0, character: 1 } },
      fixes: [{ title: 't', preferred: true, edits: [{ range: { start: { line: 0, character: 0 }, end: { line: 0, character: 1 } }, newText: 'F' }] }] };
    const r2 = fixAll('format: 1\n', 'x.bias.yaml', () => ({ findings: [stuck] }));
    expect(r2.rounds).toBe(1);
    expect(r2.applied).toEqual([]);
    expect(r2.text).toBe('format: 1\n');
  });
});
