/**
 * Fixes stay where the model is trusted (src/core/rules/trust.ts) and the wide-swing pick aims at
 * the worst device (src/core/analysis/vbias.ts). The square law is not trusted below an inversion
 * coefficient of about 1 (docs/references.md §6: gm·n·UT/ID = 2/(1 + √(1 + 4·IC)), so at IC = 1
 * the square law's gm/ID is already 1.6× the charge-based one); IC = ID/(2·n·β·UT²) (design §3).
 * Specs on the invented Halden 180 process of helpers.ts.
 */
import { describe, expect, it } from 'vitest';
import { analyzeText } from '../../src/core/analyze';
import { SQUARE_LAW_MIN_IC } from '../../src/core/rules/trust';
import { apply, check, preferred, spec } from './helpers';

const mirror = (name: string, kind: string, rest: string[]): string[] => [`  - name: ${name}`, `    kind: ${kind}`, '    type: nmos', ...rest];

describe('the wide-swing vbias pick', () => {
  it('aims at the worst of ref and out: neither is short of limits.margin, so no low-margin and no fix', () => {
    // 10 µA in 5/1 µm at Vout 0.5 V: outc has about 70 mV less VDS than refc, so length
    // modulation asks a little more VGS of it and `out` sat 0.3 mV short of the margin when the
    // pick aimed at `ref` alone; the offered fix then widened the mirror ×5.65 (IC 4.1 → 0.73).
    const text = spec(mirror('ws', 'wide-swing', ['    input: 10u', '    size: { w: 5u, l: 1u }', '    output: { v: 0.5 }']));
    const r = analyzeText(text, 'ws.bias.yaml');
    const m = r.mirrors[0]!;
    expect(m.vbiasPicked).toBe(true);
    const margin = (name: string) => m.devices.find((d) => d.name === name)!.margin;
    // The worst bottom device sits at the margin (design §2's rule, now for the worst device), to 1 µV.
    expect(Math.abs(Math.min(margin('ref'), margin('out')) - 0.1)).toBeLessThan(1e-6);
    expect(margin('out')).toBeGreaterThanOrEqual(0.1 - 1e-6);
    expect(margin('ref')).toBeGreaterThanOrEqual(0.1 - 1e-6);
    expect(r.findings.filter((f) => f.code === 'low-margin')).toEqual([]);
  });
});

describe('no fix moves a device where the square law is not trusted', () => {
  it('low-margin: the widening that meets it would put the mirror at IC 0.48, so it is not offered and the message says why', () => {
    // 10 µA in 20/1 µm: IC ≈ 1.03 (β = 5.6 mA/V², n = 1.3); 100 mV of margin at Vout 0.14 V needs
    // VOV ≈ 40 mV, about 2× wider, about IC 0.5.
    const text = spec(mirror('sink', 'simple', ['    input: 10u', '    size: { w: 20u, l: 1u }', '    output: { v: 0.14 }']));
    const f = check(text).findings.find((x) => x.code === 'low-margin')!;
    expect(f.fixes).toBeUndefined();
    expect(f.message).toMatch(/the size that meets it puts `ref` at inversion coefficient 0\.4\d, where the square law is not trusted: size it with `model: ekv`, or take a smaller step$/);
  });

  it('not-saturated: a smaller step (saturation only) when the full margin would leave the square law\'s ground', () => {
    // 10 µA in 2/1 µm at Vout 0.15 V: VOV 184 mV, in triode. 100 mV of margin needs VOV ≤ 50 mV,
    // about IC 0.75; saturation alone (5 mV) keeps IC above 1.
    const text = spec(mirror('sink', 'simple', ['    input: 10u', '    size: { w: 2u, l: 1u }', '    output: { v: 0.15 }']));
    const before = analyzeText(text, 'a.bias.yaml');
    expect(Math.min(...before.mirrors[0]!.devices.map((d) => d.ic))).toBeGreaterThan(SQUARE_LAW_MIN_IC);
    const f = before.findings.find((x) => x.code === 'not-saturated')!;
    const fix = preferred(f)!;
    expect(fix.title).toMatch(/^Widen the mirror ×1\.\d+ \(every W, ratios kept\) to saturate `out`/);
    const after = analyzeText(apply(text, fix), 'a.bias.yaml');
    expect(after.findings.filter((x) => x.code === 'not-saturated')).toEqual([]);
    for (const d of after.mirrors[0]!.devices) expect(d.ic).toBeGreaterThanOrEqual(SQUARE_LAW_MIN_IC);
  });
});
