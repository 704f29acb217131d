/**
 * Mirrors sized from design targets (`size: auto`, src/core/design/auto-size.ts): a fix is
 * verified on the sizes the analysis computes again for the edited text (src/core/rules/verify.ts),
 * and a sized device that ends out of saturation is reported as `design-unreachable`
 * (docs/findings.md). Specs on the invented Halden 180 process of test/rules/helpers.ts; the
 * square law's gm/ID = 2/VOV (design §3) in saturation.
 */
import { describe, expect, it } from 'vitest';
import { analyzeText } from '../../src/core/analyze';
import { applyEdits } from '../../src/core/text/edits';
import { spec } from '../rules/helpers';

const ws = (vbias: string) => spec(['  - name: wsa', '    kind: wide-swing', '    type: nmos', '    input: 10u', '    size: { w: auto, l: 1u }',
  '    design: { gmid: 14 }', ...(vbias ? [`    vbias: ${vbias}`] : []), '    output: { v: 0.6 }']);

describe('an auto-sized wide-swing cascode', () => {
  const text = ws('0.75');
  const r = analyzeText(text, 'a.bias.yaml');

  it('with too low a vbias: ref and out end in triode, and design-unreachable says so with the gm/ID they got', () => {
    const ref = r.mirrors[0]!.devices.find((d) => d.name === 'ref')!;
    expect(ref.region).toBe('triode');
    const f = r.findings.find((x) => x.code === 'design-unreachable')!;
    expect(f.message).toMatch(/^ref, out: ends in triode at Vout = 600 mV \(gm\/ID 1[0-3]\.\d \/V against the target 14 \/V\)/);
    // The reported gm/ID is the solved one (the message's figure comes from the device report).
    expect(f.message).toContain(`gm/ID ${ref.gmId!.toFixed(1)} /V`);
  });

  it('vbias-triode gets the same fix a hand-sized mirror gets, verified on the re-computed sizes', () => {
    const f = r.findings.find((x) => x.code === 'vbias-triode')!;
    const fix = f.fixes?.find((x) => x.preferred);
    expect(fix?.title).toMatch(/^Set vbias to \d+ mV/);
    const after = analyzeText(applyEdits(text, fix!.edits), 'a.bias.yaml');
    expect(after.findings.filter((x) => x.severity === 'error')).toEqual([]);
    expect(after.findings.filter((x) => x.code === 'design-unreachable')).toEqual([]);
    for (const d of after.mirrors[0]!.devices) expect(d.region).toBe('saturation');
  });

  it('with qpoint\'s own vbias every device lands on the target: no design-unreachable', () => {
    const clean = analyzeText(ws(''), 'a.bias.yaml');
    expect(clean.findings.filter((x) => x.code === 'design-unreachable')).toEqual([]);
    for (const d of clean.mirrors[0]!.devices) expect(Math.abs(d.gmId! / 14 - 1)).toBeLessThan(0.01);
  });
});
