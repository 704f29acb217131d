/**
 * Findings on bipolar mirrors and their verified fixes (docs/findings.md): the device in
 * saturation, the ratio error split into base current, VCE mismatch and geometry, the switch to
 * the beta-helper mirror when base currents dominate, the emitter-area ratio for a target ratio.
 */
import { describe, expect, it } from 'vitest';
import { analyzeText } from '../../src/core/analyze';
import { applyEdits } from '../../src/core/text/edits';

const head = ['format: 1', 'process:', '  npn: { is: 1e-16, bf: 50 }', 'supplies: { vdd: 5 }', 'mirrors:'];
const mirror = (kind: string, extra: string[] = []): string => [...head,
  '  - name: m', `    kind: ${kind}`, '    type: npn', '    input: 100u', ...extra, '    output: { v: 2 }'].join('\n');

describe('bipolar ratio-error', () => {
  it('a simple NPN mirror at β = 50 misses by the base currents (−3.85 %): switching to the beta helper is the verified fix', () => {
    const text = mirror('simple');
    const r = analyzeText(text, 'b.bias.yaml');
    const f = r.findings.find((x) => x.code === 'ratio-error')!;
    expect(f.message).toContain('base current -3.85 %');
    expect(f.fixes![0]!.title).toContain('beta-helper');
    const after = analyzeText(applyEdits(text, f.fixes![0]!.edits), 'b.bias.yaml');
    expect(after.findings.filter((x) => x.code === 'ratio-error')).toEqual([]);
    // 1/(1 + 2/(β(β + 1))) = 0.999216301 at β = 50 (docs/references.md §12, computed)
    expect(after.mirrors[0]!.ratio).toBeCloseTo(0.999216301, 8);
  });
  it('a cascode NPN mirror is trimmed by the emitter area of out, with require.ratio written', () => {
    const text = mirror('cascode');
    const r = analyzeText(text, 'b.bias.yaml');
    const f = r.findings.find((x) => x.code === 'ratio-error')!;
    const area = f.fixes!.find((x) => x.title.startsWith('Set the emitter area'))!;
    expect(area.title).toContain('out.area: 1.08');
    const fixed = applyEdits(text, area.edits);
    expect(fixed).toContain('ratio: 1');
    expect(analyzeText(fixed, 'b.bias.yaml').findings.filter((x) => x.severity === 'error')).toEqual([]);
  });
  it('a Widlar without require.ratio is not judged against its area ratio', () => {
    const r = analyzeText(mirror('widlar', ['    degeneration: 5k']), 'b.bias.yaml');
    expect(r.findings.filter((x) => x.code === 'ratio-error')).toEqual([]);
  });
});

describe('spec errors of bipolar mirrors', () => {
  it('a MOSFET size key on a bipolar device, a kind of the wrong family, a missing degeneration', () => {
    const codes = (text: string): string[] => analyzeText(text, 'b.bias.yaml').findings.map((f) => `${f.code}: ${f.message}`);
    expect(codes(mirror('simple', ['    size: { w: 2u, l: 1u }'])).join('\n')).toContain('a bipolar device is sized by `area`');
    expect(codes(mirror('wide-swing')).join('\n')).toContain('a wide-swing mirror is built from mosfet devices');
    expect(codes(mirror('widlar')).join('\n')).toContain('is missing `degeneration`');
  });
});
