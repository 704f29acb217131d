/**
 * Corner findings get fixes verified at every corner (src/core/variation/corner-fixes.ts): the
 * size is searched against all corners at once, and the fix is offered only when the edited
 * spec, analysed again with its corners, no longer has the finding and has no new error.
 * The spec is on the invented Halden 180 process of test/rules/helpers.ts with the example's
 * slow corner (vt0 +50 mV, kp −10 %, 125 °C, vdd 1.62 V): kp(T) = kp·(T/Tnom)^bex (design §3)
 * lowers β by about 40 % there, so VOV = √(2·I/β) grows from 184 mV to about 240 mV: at
 * Vout = 0.22 V `out` keeps 36 mV of margin nominally and is in triode at ss.
 */
import { describe, expect, it } from 'vitest';
import { analyzeText } from '../../src/core/analyze';
import { applyEdits } from '../../src/core/text/edits';
import { fixAll } from '../../src/core/rules/fix-all';
import { spec } from '../rules/helpers';

const text = `${spec(['  - name: sink', '    kind: simple', '    type: nmos', '    input: 10u', '    size: { w: 2u, l: 1u }', '    output: { v: 0.22 }'])}` +
  'limits: { error: 5% }   # the 1:1 copy at 0.22 V is about 3 % low from length modulation\n' +
  'corners:\n  ss: { nmos: { vt0: +50m, kp: -10% }, pmos: { vt0: +50m, kp: -10% }, temperature: 125 C, vdd: 1.62 }\n' +
  '  ff: { nmos: { vt0: -50m, kp: +10% }, pmos: { vt0: -50m, kp: +10% }, temperature: -40 C, vdd: 1.98 }\n';

const errors = (t: string) => analyzeText(t, 'c.bias.yaml', { corners: true }).findings.filter((f) => f.severity === 'error');

describe('a corner finding', () => {
  const r = analyzeText(text, 'c.bias.yaml', { corners: true });
  const f = r.findings.find((x) => x.code.startsWith('corner-') && x.severity === 'error')!;

  it('gets a widening fix that holds at every corner', () => {
    expect(f.code).toBe('corner-not-saturated');
    expect(f.message).toMatch(/corner ss/);
    const fix = f.fixes?.[0];
    expect(fix?.preferred).toBe(true);
    expect(fix!.title).toMatch(/^Widen the mirror ×\d[\d.]* \(every W, ratios kept\) to keep every device saturated at every corner: w 2u → [\d.]+u \(verified at every corner\)$/);
    const after = analyzeText(applyEdits(text, fix!.edits), 'c.bias.yaml', { corners: true });
    expect(after.findings.filter((x) => x.code === 'corner-not-saturated')).toEqual([]);
    expect(after.findings.filter((x) => x.severity === 'error')).toEqual([]);
    // …and the worst corner margin is non-negative by the engine's own figures.
    for (const c of after.mirrors[0]!.corners!) expect(c.minMargin!).toBeGreaterThanOrEqual(0);
  });

  it('without corners there is no corner finding and no corner fix', () => {
    expect(analyzeText(text, 'c.bias.yaml').findings.filter((x) => x.code.startsWith('corner-'))).toEqual([]);
  });

  it('fix-all with corners clears it; without corners it is not seen', () => {
    expect(errors(text).map((x) => x.code)).toEqual(['corner-not-saturated']);
    const all = fixAll(text, 'c.bias.yaml', (t) => analyzeText(t, 'c.bias.yaml', { corners: true }));
    expect(all.applied.map((a) => a.code)).toContain('corner-not-saturated');
    expect(errors(all.text)).toEqual([]);
  });
});
