import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { applyEdits } from '../../src/core/text/edits';
import { parseSpec } from '../../src/core/spec/index';
import type { Finding, TemplateMirror } from '../../src/core/types';
import { applyDesignTargets } from '../../src/core/variation/index';
import { run } from './pipeline';

const AUTO = readFileSync(join(__dirname, 'fixtures', 'auto.bias.yaml'), 'utf8');
const byCode = (fs: Finding[], code: string): Finding[] => fs.filter((f) => f.code === code);
const at = (f: Finding): string => `${f.range.start.line}:${f.range.start.character}-${f.range.end.line}:${f.range.end.character}`;

describe('computed-size', () => {
  const r = run(AUTO, 'auto.bias.yaml');
  const found = byCode(r.findings, 'computed-size');

  it('is reported at each `auto` token, as info', () => {
    // `size: auto` on line 14 (0-based 13), `w: auto` inside `size:` on line 22 (0-based 21).
    expect(found.map(at)).toEqual(['13:10-13:14', '21:15-21:19']);
    expect(found.every((f) => f.severity === 'info')).toBe(true);
    expect(found[0]!.message).toMatch(/vov 150 mV: ref W\/L 2\.59 µm\/860 nm/);
    expect(found[1]!.message).toMatch(/gm\/ID 12 \/V: ref W 9\.96 µm, a\.out W 9\.84 µm, b\.out W 14\.8 µm/);
  });

  it('each fix writes exactly the computed sizes, keeps comments and re-parses without `auto`', () => {
    for (const f of found) {
      const fix = f.fixes?.[0];
      expect(fix?.preferred).toBe(true);
      const text = applyEdits(AUTO, fix!.edits);
      expect(text).toContain('# every role computed from the design target');
      expect(text).toContain('# Variation and sizing fixture');
      const p = parseSpec(text, 'auto.bias.yaml');
      expect(p.spec).toBeDefined();
      const users = r.sized.filter((s) => s.mirror === f.path[1] && f.message.includes(`${s.device} W`));
      expect(users.length).toBeGreaterThan(0);
      for (const s of users) {
        const m = p.spec!.mirrors[s.mirror] as TemplateMirror;
        const size = s.output !== undefined ? m.outputs[s.output]!.devices[s.role]! : m.devices[s.role]!;
        expect(size.auto?.w).toBeFalsy();
        expect(size.w).toBeCloseTo(s.w!, 15);
        if (s.l !== undefined) expect(size.l).toBeCloseTo(s.l, 15);
      }
      // Every line the fix does not touch is still there, in order.
      const touched = new Set(fix!.edits.flatMap((e) => [e.range.start.line, e.range.end.line]));
      const kept = AUTO.split('\n').filter((_, i) => !touched.has(i));
      let k = 0;
      for (const line of text.split('\n')) if (k < kept.length && line === kept[k]) k++;
      expect(k).toBe(kept.length);
    }
  });

  it('after both fixes nothing is auto and the analysis is unchanged', () => {
    let text = AUTO;
    for (let round = 0; round < 3; round++) {
      const f = byCode(run(text, 'auto.bias.yaml').findings, 'computed-size')[0];
      if (!f) break;
      text = applyEdits(text, f.fixes![0]!.edits);
    }
    const after = run(text, 'auto.bias.yaml');
    expect(byCode(after.findings, 'computed-size')).toEqual([]);
    expect(applyDesignTargets(after.parsed.spec!).sized).toEqual([]);
    after.reports.forEach((rep, i) => {
      expect(rep.iout).toBeCloseTo(r.reports[i]!.iout, 15);
      expect(rep.rout / r.reports[i]!.rout).toBeCloseTo(1, 9);
    });
  });

  it('keeps a JSON spec valid JSON', () => {
    const json = JSON.stringify({
      format: 1,
      process: { grid: '10n', nmos: { kp: '280u', vt0: 0.45, lambda: 0.08, lref: '1u' }, pmos: { kp: '70u', vt0: 0.48 } },
      supplies: { vdd: 1.8 },
      mirrors: [{ name: 't', kind: 'simple', type: 'nmos', input: '10u', size: 'auto', design: { vov: 0.2 }, output: { v: 0.9 }, require: { ratio: 2 } }],
    }, null, 2);
    const f = byCode(run(json, 'j.bias.json').findings, 'computed-size')[0]!;
    const text = applyEdits(json, f.fixes![0]!.edits);
    const data = JSON.parse(text) as { mirrors: { size: { w: string; l: string }; devices?: Record<string, { w: string }> }[] };
    expect(typeof data.mirrors[0]!.size.w).toBe('string');
    expect(parseSpec(text, 'j.bias.json').spec).toBeDefined();
  });

  it('a gm/ID beyond the weak-inversion limit is a design-unreachable warning at the target', () => {
    const text = AUTO.replace('process:\n', 'process:\n  model: ekv\n').replace('design: { gmid: 12 }', 'design: { gmid: 40 }');
    const f = byCode(run(text, 'auto.bias.yaml').findings, 'design-unreachable');
    expect(f.length).toBe(1);
    expect(f[0]!.severity).toBe('warning');
    expect(f[0]!.message).toMatch(/weak-inversion limit/);
    // The value `40` of `design: { gmid: 40 }` (0-based line 23).
    expect(at(f[0]!)).toBe('23:20-23:22');
  });
});

const CORNER = `# Corner fixture (invented process "Halden 180").
format: 1
process:
  tnom: 27 C
  nmos: { kp: 280u, vt0: 0.45, lambda: 0.08, lref: 1u, tcv: -1m, avt: 4 mV·µm, abeta: 1 %·µm }
  pmos: { kp: 70u, vt0: 0.48 }
supplies: { vdd: 1.8 }
mirrors:
  - name: sink
    kind: simple
    type: nmos
    input: 20u
    size: { w: 4u, l: 1u }
    devices:
      out: { m: 1 }
    output: { v: 0.3 }
corners:
  tt: { nmos: { kp: 0% } }
  slow: { nmos: { kp: -50% }, temperature: 125 C }
`;

describe('corner findings', () => {
  const r = run(CORNER, 'c.bias.yaml', { corners: true });

  it('flags the worst corner that takes a device out of saturation, at the device key', () => {
    const rep = r.reports[0]!;
    expect(Math.min(...rep.devices.map((d) => d.margin))).toBeGreaterThan(0);
    const slow = rep.corners!.find((c) => c.name === 'slow')!;
    expect(slow.minMargin!).toBeLessThan(0);
    const f = byCode(r.findings, 'corner-not-saturated');
    expect(f.length).toBe(1);
    expect(f[0]!.severity).toBe('error');
    expect(at(f[0]!)).toBe('14:6-14:9');   // `out:` under devices
    expect(f[0]!.message).toMatch(/^sink: `out` is not saturated at corner slow \(125 °C\): margin -\d/);
    expect(f[0]!.related?.[0]?.path).toEqual(['corners', 'slow']);
    expect(at({ ...f[0]!, range: f[0]!.related![0]!.range })).toBe('18:2-18:6');
  });

  it('leaves a check the nominal point already fails to the nominal rules', () => {
    // VDS mismatch 0.3 V vs ≈0.65 V with λ = 0.08 /V: the nominal ratio is already ≈2.6 % low.
    expect(Math.abs(r.reports[0]!.error!)).toBeGreaterThan(0.01);
    expect(byCode(r.findings, 'corner-ratio-error')).toEqual([]);
  });

  it('says nothing without corner results', () => {
    expect(run(CORNER, 'c.bias.yaml').findings.filter((f) => f.code.startsWith('corner-'))).toEqual([]);
  });
});

const LIMITS = `# Corner limits fixture (invented process "Halden 180").
format: 1
process:
  tnom: 27 C
  nmos: { kp: 280u, vt0: 0.45, lambda: 0.08, lref: 1u, gamma: 0.45, phi: 0.85, tcv: -1m, avt: 4 mV·µm, abeta: 1 %·µm }
  pmos: { kp: 70u, vt0: 0.48, lambda: 0.1, lref: 1u, gamma: 0.4, phi: 0.8, tcv: -1.2m }
supplies: { vdd: 1.8 }
mirrors:
  - name: tail
    kind: cascode
    type: nmos
    input: 10u
    size: { w: 4u, l: 1u }
    output: { v: 1.0 }
    require: { rout: 250M, compliance: 0.73, sigma: 3.5% }
  - name: src
    kind: cascode
    type: pmos
    input: 10u
    size: { w: 16u, l: 1u }
    output: { v: 0.8, range: [0.5, 1.0] }
corners:
  ss: { nmos: { vt0: +50m, kp: -10% }, pmos: { vt0: +50m, kp: -10% }, temperature: 125 C, vdd: 1.62 }
  ff: { nmos: { vt0: -50m, kp: +10% }, pmos: { vt0: -50m, kp: +10% }, temperature: -40 C, vdd: 1.98 }
`;

describe('corner findings against requirements', () => {
  const r = run(LIMITS, 'l.bias.yaml', { corners: true });
  const [tail, src] = r.reports;

  it('the nominal point meets every requirement (so the corners are what fails)', () => {
    expect(tail!.rout).toBeGreaterThan(250e6);
    expect(tail!.compliance).toBeLessThan(0.73);
    expect(tail!.sigma!).toBeLessThan(0.035);
    expect(src!.compliance).toBeGreaterThan(1.0);   // PMOS: must work up to the range's 1.0 V
  });

  it('each failing check points at its requirement and names the worst corner', () => {
    const one = (code: string): Finding => { const f = byCode(r.findings, code).filter((x) => x.path[1] === 0); expect(f.length).toBe(1); return f[0]!; };
    const rout = one('corner-low-rout');
    expect(at(rout)).toBe('14:21-14:25');          // `250M`
    expect(rout.message).toMatch(/^tail: Rout 2\d\d MΩ at corner ss \(125 °C, vdd 1\.62 V\) is below require\.rout 250 MΩ/);
    const comp = one('corner-compliance');
    expect(at(comp)).toBe('14:39-14:43');          // `0.73`
    expect(comp.message).toMatch(/at corner ss .*must work down to 730 mV \(require\.compliance\)/);
    const sig = one('corner-high-sigma');
    expect(at(sig)).toBe('14:52-14:56');           // `3.5%`
    // Cold and fast: lower overdrive, higher gm/ID, larger ΔVT sensitivity (Kinget 2005, from memory).
    expect(sig.message).toMatch(/at corner ff \(-40 °C, vdd 1\.98 V\)/);
  });

  it('PMOS compliance uses the top of output.range', () => {
    const f = byCode(r.findings, 'corner-compliance').filter((x) => x.path[1] === 1);
    expect(f.length).toBe(1);
    expect(at(f[0]!)).toBe('20:35-20:38');         // `1.0`, the top of `range: [0.5, 1.0]`
    expect(f[0]!.message).toMatch(/must work up to 1 V \(output\.range\)/);
  });
});

describe('Monte Carlo findings', () => {
  // Deep weak inversion (EKV, IC ≈ 0.002): iout ∝ exp(−ΔVT/(n·U_T)), so ln(iout) is normal and iout
  // lognormal: relative σ = sqrt(exp(s²) − 1) for a normal s of ln(iout) — larger than the
  // linearized s (lognormal moments, e.g. Aitchison & Brown 1957, from memory).
  const WEAK = `format: 1
process:
  model: ekv
  nmos: { kp: 134u, vt0: 0.5, n: 1.3, avt: 46 mV·µm }
  pmos: { kp: 40u, vt0: 0.5 }
supplies: { vdd: 1.8 }
mirrors:
  - name: weak
    kind: simple
    type: nmos
    input: 100n
    size: { w: 20u, l: 0.1u }
    output: { v: 0.6 }
    require: { ratio: 1 }
`;
  it('mc-nonlinear when the sampled sigma leaves the linearized one by more than 15 %', () => {
    const r = run(WEAK, 'w.bias.yaml', { mc: { samples: 20_000, seed: 5 } });
    const rep = r.reports[0]!;
    const s = rep.sigma!;
    expect(s).toBeGreaterThan(0.85);
    const lognormal = Math.sqrt(Math.expm1(s * s));
    // The sampled σ of a lognormal this wide is noisy (kurtosis ≈ 57: standard error ≈ 2.7 % at
    // N = 20 000); 10 % is more than three of them.
    expect(Math.abs(rep.mc!.sigma / lognormal - 1)).toBeLessThan(0.1);
    expect(rep.mc!.sigma / s - 1).toBeGreaterThan(0.15);
    const f = byCode(r.findings, 'mc-nonlinear');
    expect(f.length).toBe(1);
    expect(f[0]!.severity).toBe('info');
    expect(at(f[0]!)).toBe('7:10-7:14');   // the mirror's name: no require.sigma to point at
    // The ratio is spread far beyond the ±5 % default tolerance: yield is low and says why.
    const y = byCode(r.findings, 'mc-yield');
    expect(y.length).toBe(1);
    expect(y[0]!.message).toMatch(/with the ratio outside ±5 % \(limits\.tolerance\)/);
    expect(at(y[0]!)).toBe('13:4-13:11');  // the `require` key
  });

  it('no mc-nonlinear for small mismatch, no mc-yield without requirements', () => {
    const text = CORNER;
    const r = run(text, 'c.bias.yaml', { mc: { samples: 2000, seed: 1 } });
    expect(byCode(r.findings, 'mc-nonlinear')).toEqual([]);
    expect(byCode(r.findings, 'mc-yield')).toEqual([]);
    expect(r.reports[0]!.mc!.yield).toBeLessThan(1);  // the CLM error alone fails ±1 %
  });
});
