/**
 * Fix-all round trips (src/core/rules/fix-all.ts, shared by `qpoint fix` and the editor's
 * fix-all): geometry first, convergence, and a named reason for every finding left over.
 * Specs on the invented Halden 180 process of test/rules/helpers.ts.
 */
import { describe, expect, it } from 'vitest';
import { analyzeText } from '../../src/core/analyze';
import { fixAll } from '../../src/core/rules/fix-all';
import { spec } from './helpers';

const run = (text: string) => fixAll(text, 'f.bias.yaml', (t) => analyzeText(t, 'f.bias.yaml'));

describe('fix-all', () => {
  it('raises L to lmin before it sizes the ratio, and ends with no error', () => {
    // L 0.15 µm < lmin 0.18 µm, and Vout 1.4 V against a diode VGS of about 0.5 V: length
    // modulation puts the 1:1 ratio about 37 % high (λ = 0.08·1µ/0.15µ, design §3).
    // The ratio finding sits on the mirror's name, above the size line, so reading order alone
    // would trim the ratio first and leave the length fix unverifiable against the trimmed ratio.
    const text = spec(['  - name: short', '    kind: simple', '    type: nmos', '    input: 10u', '    size: { w: 2u, l: 0.15u }',
      '    output: { v: 1.4 }', '    require: { ratio: 1 }']);
    const before = analyzeText(text, 'f.bias.yaml').findings.map((f) => f.code);
    expect(before.indexOf('ratio-error')).toBeLessThan(before.indexOf('below-lmin'));
    const r = run(text);
    expect(r.applied[0]?.code).toBe('below-lmin');
    expect(r.applied.map((a) => a.code)).toContain('ratio-error');
    expect(r.remaining.filter((f) => f.severity === 'error')).toEqual([]);
    expect(r.unfixed.filter((u) => u.finding.severity === 'error')).toEqual([]);
    // The result checks clean of errors on its own.
    expect(analyzeText(r.text, 'f.bias.yaml').findings.filter((f) => f.severity === 'error')).toEqual([]);
  });

  it('names the finding it could not fix and why', () => {
    // A resistor input with about 0.1 V across it (the cascode stack takes the rest of 1.2 V):
    // no size makes room, so input-headroom has no verified fix (findings.test.ts row).
    const text = spec(['  - name: tail', '    kind: cascode', '    type: nmos', '    input: { resistor: 100k }', '    size: { w: 2u, l: 1u }',
      '    output: { v: 1.0 }'], 1.2);
    const r = run(text);
    const left = r.unfixed.find((u) => u.finding.code === 'input-headroom');
    expect(left).toBeDefined();
    expect(left!.reason).toBe('no-fix');
    expect(left!.text).toBe('no verified fix');
    // Every remaining error or warning is accounted for.
    expect(r.unfixed.map((u) => u.finding)).toEqual(r.remaining.filter((f) => f.severity !== 'info'));
  });
});
