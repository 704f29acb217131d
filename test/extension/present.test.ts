/**
 * Hover, CodeLens and status text from a report. Displayed values are checked against the SI
 * prefixes (SI Brochure, 9th ed., Table 7: µ = 10⁻⁶, k = 10³, M = 10⁶) and the percent
 * (SI Brochure 9th ed. §5.4.7: % = 0.01) applied to the Razavi level-1 device of the fixture
 * (docs/references.md D; set from memory, values computed).
 */
import { describe, expect, it } from 'vitest';
import {
  contains, deviceFigures, hoverMarkdown, hoverTarget, lensPlacements, lensTitle,
  mirrorHoverMarkdown, statusSummary,
} from '../../src/extension/present';
import { CAUTION as CAUTION_TEXT } from '../../src/core/text/format';
import type { MirrorReport } from '../../src/core/types';
import { FILE, MIRROR, OUT, REF } from './fixture';

const pos = (line: number, character: number) => ({ line, character });

describe('device hover', () => {
  it('shows the ten operating-point figures of the D device with SI prefixes', () => {
    const f = Object.fromEntries(deviceFigures(OUT));
    // ID at VOUT = 1.5 V: 103.9103 µA (docs/references.md §9, computed from the square law).
    expect(f.ID).toBe('104 µA');
    expect(f.VGS).toBe('1.07 V');        // 0.7 + 0.367 234 V
    expect(f.VDS).toBe('1.5 V');
    expect(f.VDSsat).toBe('367 mV');     // VDSsat = VOV (design §3)
    expect(f.margin).toBe('1.13 V');     // 1.5 − 0.367 V
    expect(f.gm).toBe('566 µS');         // β·VOV·(1 + λ·1.5)
    expect(f.ro).toBe('111 kΩ');         // 1/(λ·β/2·VOV²) = 110.67 kΩ
    expect(f['gm/ID']).toBe('5.45 /V');  // 2/VOV·(1+λVDS)/(1+λVDS) = 5.446 /V
    expect(f.IC).toBe('43 (strong)');    // docs/references.md §6: D in EKV terms, IC = 42.95
    expect(f.region).toBe('saturation');
  });

  it('labels PMOS voltages source-referred', () => {
    const labels = deviceFigures({ ...OUT, type: 'pmos' }).map(([k]) => k);
    expect(labels).toContain('VSG');
    expect(labels).toContain('VSD');
    expect(labels).not.toContain('VGS');
  });

  it('marks a device out of saturation in bold and carries the caution line', () => {
    const md = hoverMarkdown({ kind: 'device', report: MIRROR, device: { ...REF, region: 'triode' } });
    expect(md).toContain('| **region** | **triode** |');
    expect(md).toContain(CAUTION_TEXT);
    expect(md).toContain('W/L = 10 µm / 1 µm');
  });

  it('is short enough to show whole in the editor\'s hover: a title line, five rows, the caution', () => {
    const md = hoverMarkdown({ kind: 'device', report: MIRROR, device: OUT });
    const lines = md.split('\n').filter((l) => l.trim() !== '');
    expect(lines).toHaveLength(1 + 1 + 5 + 1);   // title, table header and its rule … 5 rows of pairs, caution
    expect(lines[0]).toMatch(/^Operating point of \*\*out\*\* · NMOS · out of copy · W\/L = 10 µm \/ 1 µm$/);
    expect(md).toContain('| **gm/ID** | 5.45 /V | **IC** | 43 (strong) |');
  });
});

describe('mirror hover', () => {
  it('puts Rout beside the textbook formula and names the compliance side', () => {
    const md = hoverMarkdown({ kind: 'mirror', mirror: 'copy', reports: [{ ...MIRROR, routApprox: 100e3 }] });
    expect(md).toContain('| **Rout** | 111 kΩ (textbook 100 kΩ) |');
    expect(md).toContain('| **Iout** | 104 µA |');
    expect(md).toContain('| **compliance** | 367 mV (lowest Vout) |');
    // error = 103.9103/100 − 1 = +3.91 % (docs/references.md §9 constructed check)
    expect(md).toContain('| **error** | +3.91 % |');
    expect(md).toContain(CAUTION_TEXT);
  });

  it('lists every output of a bias bank in one table', () => {
    const a: MirrorReport = { ...MIRROR, name: 'tail.a', output: 'a', mirror: 'tail' };
    const b: MirrorReport = { ...MIRROR, name: 'tail.b', output: 'b', mirror: 'tail', iout: 2 * MIRROR.iout, sigma: 0.003 };
    const md = mirrorHoverMarkdown('tail', [a, b]);
    expect(md).toContain('bias bank of 2 outputs');
    expect(md.split('\n').filter((l) => l.startsWith('| a ') || l.startsWith('| b '))).toHaveLength(2);
    expect(md).toContain('208 µA');
    expect(md).toContain('0.3 %');
  });

  it('says when the solve did not converge', () => {
    const md = mirrorHoverMarkdown('copy', [{ ...MIRROR, converged: false, solveNote: 'Newton and source stepping failed' }]);
    expect(md).toContain('did not converge');
    expect(md).toContain('Newton and source stepping failed');
  });
});

describe('hover target', () => {
  it('finds the device on its key and on a size value inside its mapping', () => {
    expect(hoverTarget(FILE, pos(9, 7))).toMatchObject({ kind: 'device', device: { name: 'out' } });
    // `w: 10u` of out: only the cursor path tells, the anchor covers the key alone.
    expect(hoverTarget(FILE, pos(10, 12))).toBeUndefined();
    expect(hoverTarget(FILE, pos(10, 12), ['mirrors', 0, 'devices', 'out', 'w'])).toMatchObject({ kind: 'device', device: { name: 'out' } });
  });

  it('lists all devices on the mirror-level size', () => {
    const t = hoverTarget(FILE, pos(7, 12), ['mirrors', 0, 'size', 'w']);
    expect(t?.kind).toBe('devices');
    if (t?.kind === 'devices') expect(t.devices.map((d) => d.name)).toEqual(['ref', 'out']);
  });

  it('shows the mirror on its name, nothing elsewhere', () => {
    expect(hoverTarget(FILE, pos(3, 12))).toMatchObject({ kind: 'mirror', mirror: 'copy' });
    expect(hoverTarget(FILE, pos(3, 6), ['mirrors', 0, 'name'])).toMatchObject({ kind: 'mirror' });
    expect(hoverTarget(FILE, pos(4, 12), ['mirrors', 0, 'kind'])).toBeUndefined();
    expect(hoverTarget(FILE, pos(0, 2), ['format'])).toBeUndefined();
  });

  it('treats LSP ranges as containing both ends (hover at a word end)', () => {
    const range = { start: pos(9, 6), end: pos(9, 9) };
    expect(contains(range, pos(9, 6))).toBe(true);
    expect(contains(range, pos(9, 9))).toBe(true);
    expect(contains(range, pos(9, 10))).toBe(false);
    expect(contains(range, pos(8, 7))).toBe(false);
  });
});

describe('CodeLens and status bar', () => {
  it('puts Iout, error, Rout and compliance above the mirror', () => {
    expect(lensTitle(MIRROR)).toBe('Iout 104 µA · error +3.91 % · Rout 111 kΩ · compliance 367 mV');
    const lenses = lensPlacements(FILE);
    expect(lenses).toHaveLength(1);
    expect(lenses[0].range.start).toEqual(pos(3, 10));
  });

  it('gives a bank a summary lens and each output its own', () => {
    const a: MirrorReport = { ...MIRROR, name: 'tail.a', output: 'a', mirror: 'tail', path: ['mirrors', 0, 'outputs', 0] };
    const b: MirrorReport = { ...MIRROR, name: 'tail.b', output: 'b', mirror: 'tail', path: ['mirrors', 0, 'outputs', 1] };
    const lenses = lensPlacements({
      ...FILE, mirrors: [a, b],
      anchors: [
        { kind: 'mirror', path: ['mirrors', 0], range: { start: pos(3, 10), end: pos(3, 14) }, report: 'tail.a' },
        { kind: 'output', path: ['mirrors', 0, 'outputs', 0], range: { start: pos(6, 14), end: pos(6, 15) }, report: 'tail.a' },
        { kind: 'output', path: ['mirrors', 0, 'outputs', 1], range: { start: pos(8, 14), end: pos(8, 15) }, report: 'tail.b' },
      ],
    });
    expect(lenses.map((l) => l.title)).toEqual(['tail: bias bank of 2 outputs', lensTitle(a), lensTitle(b)]);
  });

  it('counts mirrors (not bank outputs) and errors', () => {
    const s = statusSummary(FILE);
    expect(s.text).toBe('$(warning) qpoint: 1 mirror, 0 errors');
    expect(s.hasErrors).toBe(false);
    const broken = statusSummary({ ...FILE, parsed: false, mirrors: [], findings: [] });
    expect(broken.text).toContain('does not parse');
    expect(broken.hasErrors).toBe(true);
    // A mirror with a spec error is set aside; the others are still solved.
    const err = { severity: 'error' as const, code: 'bad-value', message: 'kind', path: ['mirrors', 1, 'kind'], range: FILE.findings[0]?.range ?? { start: { line: 0, character: 0 }, end: { line: 0, character: 1 } } };
    const aside = { index: 1, name: 'load', range: err.range };
    const partial = statusSummary({ ...FILE, findings: [err], withheld: [aside] });
    expect(partial.text).toBe('$(error) qpoint: 1 of 2 mirrors, 1 error');
    expect(partial.tooltip).toContain('1 mirror with errors not solved until they are fixed');
    // … and a lens on it says so.
    const lens = lensPlacements({ ...FILE, findings: [err], withheld: [aside] }).find((l) => l.report === undefined);
    expect(lens).toEqual({ range: err.range, title: 'not solved until this mirror\'s errors are fixed' });
  });
});
