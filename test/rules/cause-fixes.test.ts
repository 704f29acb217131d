/**
 * Fixes that keep the design's structure: a VDS-mismatch ratio error is fixed at its cause before
 * a width trim (src/core/rules/checks/ratio.ts), and a size written through a param is fixed
 * through that param beside the local edit (src/core/rules/param-edits.ts). Every offered fix is
 * verified by re-solving; here each is applied and re-checked too. Specs on the invented
 * Halden 180 process of helpers.ts; the ratio errors are length modulation,
 * (1 + λ·VDS,out)/(1 + λ·VDS,ref) − 1 (Razavi §5, from memory; design §3's λ(L) = lambda·lref/L).
 */
import { describe, expect, it } from 'vitest';
import type { Finding, Fix } from '../../src/core/types';
import { apply, check, owner, preferred, spec } from './helpers';

const errorsOf = (text: string, code: string, who: string) => check(text).findings.filter((f) => f.code === code && owner(f) === who);

function fixed(text: string, f: Finding, fix: Fix): string {
  const after = apply(text, fix);
  expect(errorsOf(after, f.code, owner(f))).toEqual([]);
  return after;
}

describe('a VDS-mismatch ratio error is fixed at its cause', () => {
  // 1:1 at Vout 1.4 V against a diode VGS of about 0.63 V: +5.8 % with λ = 0.08/V at L = 1 µm.
  const text = spec(['  - name: copy', '    kind: simple', '    type: nmos', '    input: 10u', '    size: { w: 2u, l: 1u }',
    '    output: { v: 1.4 }', '    require: { ratio: 1 }']);
  const f = check(text).findings.find((x) => x.code === 'ratio-error')!;

  it('prefers lengthening at constant W/L, which keeps the unit cell (no per-device width)', () => {
    expect(f.message).toMatch(/VDS mismatch \+5\.8\d %/);
    const fix = preferred(f)!;
    expect(fix.title).toMatch(/^Lengthen the mirror ×\d+(\.\d+)? at constant W\/L for ratio 1 within ±1 %: w 2u → [\d.]+u, l 1u → [\d.]+u$/);
    const after = fixed(text, f, fix);
    expect(after).toMatch(/size: \{ w: [\d.]+u, l: [\d.]+u \}\n {4}output/);
    expect(after).not.toMatch(/devices:/);
  });

  it('offers the cascode, and keeps the width trim as a later, non-preferred option', () => {
    const titles = f.fixes!.map((x) => x.title);
    const cascode = titles.findIndex((t) => t.startsWith('Make it a cascode'));
    const trim = titles.findIndex((t) => t.startsWith('Size `out` for ratio 1'));
    expect(cascode).toBeGreaterThan(0);
    expect(trim).toBeGreaterThan(cascode);
    expect(f.fixes![trim]!.preferred).toBeUndefined();
    for (const i of [cascode, trim]) fixed(text, f, f.fixes![i]!);
    // The cascode changes the kind and nothing else.
    expect(f.fixes![cascode]!.edits.map((e) => e.newText)).toEqual(['cascode']);
  });

  it('a wrong parallel count is still fixed in m first (the cause is the count, not λ)', () => {
    const t = spec(['  - name: m3', '    kind: simple', '    type: nmos', '    input: 10u', '    size: { w: 2u, l: 1u }', '    devices:', '      out: { m: 4 }',
      '    output: { v: 0.64 }', '    require: { ratio: 3 }']);
    const r = check(t).findings.find((x) => x.code === 'ratio-error')!;
    expect(preferred(r)!.title).toMatch(/^Use 3 parallel `out` devices/);
  });
});

describe('a size written through a param is fixed through the param too', () => {
  // Two mirrors share `wn` and `ln`; `pair` must match to 1 % (1σ), it has about 3.1 % on 2 µm².
  const text = spec([
    '  - name: pair', '    kind: simple', '    type: nmos', '    input: 10u', '    size: { w: wn, l: ln }', '    output: { v: 0.65 }', '    require: { sigma: 1% }',
    '  - name: other', '    kind: simple', '    type: nmos', '    input: 10u', '    size: { w: 2*wn, l: ln }', '    output: { v: 0.65 }',
    'params: { wn: 2u, ln: 1u }',
  ]);
  const f = check(text).findings.find((x) => x.code === 'high-sigma')!;

  it('offers the local edit first (the params are shared) and the param edit beside it, naming the mirror that shares it', () => {
    expect(f.fixes?.length).toBeGreaterThanOrEqual(2);
    const [local, viaParam] = f.fixes!;
    expect(local!.preferred).toBe(true);
    expect(local!.title).toMatch(/^Scale the gate area ×\d[\d.]* at constant W\/L .*: w wn → [\d.]+u, l ln → [\d.]+u$/);
    expect(viaParam!.title).toMatch(/\(params `wn`, `ln`, also read by `other`\)$/);
  });

  it('both hold when applied: the local edit writes numbers in `pair` only, the param edit keeps every expression', () => {
    const [local, viaParam] = f.fixes!;
    const a = fixed(text, f, local!);
    expect(a).toMatch(/size: \{ w: 2\*wn, l: ln \}/);
    const b = fixed(text, f, viaParam!);
    expect(b).toMatch(/size: \{ w: wn, l: ln \}/);
    expect(b).toMatch(/size: \{ w: 2\*wn, l: ln \}/);
    expect(b).toMatch(/params: \{ wn: [\d.]+u, ln: [\d.]+u \}/);
    expect(b).not.toMatch(/wn: 2u/);
  });

  it('with a param only this mirror reads, the param edit is preferred', () => {
    const own = text.replace('size: { w: 2*wn, l: ln }', 'size: { w: 4u, l: 1u }');
    const g = check(own).findings.find((x) => x.code === 'high-sigma')!;
    expect(preferred(g)!.title).toMatch(/\(params `wn`, `ln`\)$/);
    fixed(own, g, preferred(g)!);
  });
});
