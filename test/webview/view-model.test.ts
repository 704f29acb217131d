// What the panel shows, derived from a report: which findings belong to which output, whether
// each requirement holds, what a row reveals, which corner is worst, how numbers read.
import { describe, expect, it } from 'vitest';
import {
  concerns, cornerRows, monteCarloFigures, deviceAnchor, deviceColumns, deviceRow, failsRequirement, fileFindings,
  findingRows, findingsFor, mirrorAnchor, mirrorList, requirementViews, summaryFigures,
} from '../../webview/view-model';
import { axisScale, formatNumber, formatPercent, formatSI, formatSignedPercent } from '../../webview/format';
import { curvePlotData, histogramPlotData } from '../../webview/plot-data';
import { bankOutput, fixtureReport, tailMirror } from './fixtures';
import type { Finding } from '../../src/core/types';

const at = { start: { line: 0, character: 0 }, end: { line: 0, character: 1 } };
const finding = (over: Partial<Finding>): Finding => ({ severity: 'error', code: 'x', message: 'm', path: [], range: at, ...over });

describe('which findings concern an output', () => {
  const report = fixtureReport();
  const [tail, a, b] = report.mirrors;

  it('a single-output mirror owns everything under its path', () => {
    expect(findingsFor(report, tail).map((f) => f.code)).toEqual(['low-margin']);
  });

  it('a bank output owns its own findings and the shared reference, not its siblings', () => {
    expect(findingsFor(report, a).map((f) => f.code)).toEqual(['ratio-error', 'square-law-weak-inversion']);
    expect(findingsFor(report, b).map((f) => f.code)).toEqual(['ratio-error', 'not-saturated']);
    expect(concerns(a, finding({ path: ['mirrors', 1, 'outputs', 1, 'devices', 'out'] }))).toBe(false);
  });

  it('findings outside every mirror are the file\'s', () => {
    expect(fileFindings(report).map((f) => f.code)).toEqual(['unknown-key']);
  });
});

describe('requirements', () => {
  it('a requirement fails by a finding at require.<key>, by a related location there, or by its code', () => {
    expect(failsRequirement(finding({ path: ['mirrors', 0, 'require', 'rout'] }), 'rout')).toBe(true);
    expect(failsRequirement(finding({ path: ['mirrors', 0, 'devices', 'out', 'l'],
      related: [{ path: ['mirrors', 0, 'require', 'sigma'], range: at, message: 'required here' }] }), 'sigma')).toBe(true);
    // Codes of src/core/rules/catalog.ts.
    expect(failsRequirement(finding({ code: 'low-rout' }), 'rout')).toBe(true);
    expect(failsRequirement(finding({ code: 'high-sigma' }), 'sigma')).toBe(true);
    expect(failsRequirement(finding({ code: 'ratio-error' }), 'ratio')).toBe(true);
    expect(failsRequirement(finding({ code: 'compliance' }), 'compliance')).toBe(true);
    expect(failsRequirement(finding({ code: 'low-rout' }), 'ratio')).toBe(false);
    expect(failsRequirement(finding({ code: 'low-rout', severity: 'info' }), 'rout')).toBe(false);
  });

  it('lists every required figure with target, actual and met', () => {
    const m = tailMirror();
    const none = requirementViews(m, []);
    expect(none.map((r) => [r.key, r.target, r.actual, r.met])).toEqual([
      ['ratio', '= 4', '4.012', true],
      ['rout', '≥ 20 MΩ', '21.3 MΩ', true],
      ['compliance', '≤ 600 mV', '583.4 mV', true],
      ['sigma', '≤ 0.3 %', '0.29 %', true],
    ]);
    const failing = finding({ code: 'high-sigma', path: ['mirrors', 0, 'devices', 'out'] });
    const views = requirementViews(m, [failing]);
    expect(views.find((r) => r.key === 'sigma')).toMatchObject({ met: false, finding: failing });
    expect(views.filter((r) => !r.met)).toHaveLength(1);
  });

  it('PMOS compliance is an upper bound; no require → no rows', () => {
    const p = bankOutput('a', 0, { require: { compliance: 1.5 } });
    expect(requirementViews(p, [])[0].target).toBe('≥ 1.5 V');
    expect(requirementViews(tailMirror({ require: undefined }), [])).toEqual([]);
  });
});

describe('devices and anchors', () => {
  const report = fixtureReport();
  const [tail, a, b] = report.mirrors;

  it('reveals a device at its own key when the spec writes one', () => {
    expect(deviceAnchor(report, tail, tail.devices[2])?.range.start).toEqual({ line: 13, character: 6 });
    expect(deviceAnchor(report, b, b.devices[1])?.path).toEqual(['mirrors', 1, 'outputs', 1, 'devices', 'out']);
  });

  it('a shared reference device of a bank output reveals the key under the mirror', () => {
    expect(deviceAnchor(report, b, b.devices[0])?.path).toEqual(['mirrors', 1, 'devices', 'ref']);
  });

  it('an inherited device reveals its output, else its mirror', () => {
    expect(deviceAnchor(report, tail, tail.devices[0])?.kind).toBe('mirror');
    expect(deviceAnchor(report, a, a.devices[1])).toMatchObject({ kind: 'output', report: 'load.a' });
    expect(mirrorAnchor(report, tail)?.range.start.line).toBe(10);
  });

  it('formats a device row, flags triode and negative margin, marks computed sizes', () => {
    const row = deviceRow(report, b, b.devices[1], findingsFor(report, b));
    expect(row.severity).toBe('error');
    expect(row.cells[9]).toEqual({ text: 'triode', flag: 'bad' });
    expect(row.cells[8]).toMatchObject({ text: '-50 mV', flag: 'bad' });
    const sized = deviceRow(report, tail, tail.devices[2], []);
    expect(sized.cells[1]).toMatchObject({ text: '2 µm', flag: 'sized' });
    expect(sized.cells[4].text).toBe('40.12 µA');
    expect(deviceColumns('pmos').map((c) => c.label)).toContain('VSG');
    expect(deviceColumns('nmos')).toHaveLength(sized.cells.length);
  });
});

describe('summary, list, findings', () => {
  it('puts Rout beside the textbook formula and the error split in the detail', () => {
    const figs = summaryFigures(tailMirror());
    expect(figs.find((f) => f.key === 'rout')).toMatchObject({ value: '21.3 MΩ', detail: 'textbook 20.5 MΩ' });
    // A cause whose term is zero (geometry here) is not named (issue: never blame an absent cause).
    expect(figs.find((f) => f.key === 'error')).toMatchObject({ value: '+0.3 %', detail: 'VDS +0.25 % · body +0.05 %' });
    expect(figs.find((f) => f.key === 'compliance')?.detail).toBe('works down to');
  });

  it('summarises each output with its worst finding', () => {
    const list = mirrorList(fixtureReport());
    expect(list.map((l) => [l.name, l.worst, l.counts.error])).toEqual([['tail', 'warning', 0], ['load.a', 'error', 1], ['load.b', 'error', 2]]);
    expect(list[2].converged).toBe(false);
  });

  it('prints finding locations 1-based, like the CLI', () => {
    expect(findingRows([finding({ range: { start: { line: 11, character: 5 }, end: { line: 11, character: 9 } } })])[0].location).toBe('12:6');
  });
});

describe('corners', () => {
  it('marks the worst value of each column; the error colour only where a requirement fails', () => {
    // tailMirror requires ratio 4 (±1 %), Rout ≥ 20 MΩ, compliance ≤ 0.6 V, σ ≤ 0.3 %.
    const rows = cornerRows(tailMirror(), { error: 0.01 });
    const marked = (col: number) => rows.filter((r) => r.cells[col].flag !== undefined).map((r) => r.name);
    const bad = (col: number) => rows.filter((r) => r.cells[col].flag === 'bad').map((r) => r.name);
    expect(marked(3)).toEqual(['slow-cold']);  // largest |error|
    expect(marked(4)).toEqual(['slow-cold']);  // lowest Rout
    expect(marked(5)).toEqual(['slow-cold']);  // NMOS: highest compliance voltage
    expect(marked(7)).toEqual(['slow-cold']);  // smallest margin
    expect(rows[0].cells[7].text).toBe('20 mV (outc)');
    // 4.03 is +0.75 % from 4 (within ±1 %), a margin of +20 mV is saturated: worst, not failing.
    expect(rows[0].cells[3].flag).toBe('worst');
    expect(rows[0].cells[7].flag).toBe('worst');
    // 19 MΩ < 20 MΩ, 0.66 V > 0.6 V, 0.33 % > 0.3 %: these fail their requirement.
    expect(bad(4)).toEqual(['slow-cold']);
    expect(bad(5)).toEqual(['slow-cold']);
    expect(bad(6)).toEqual(['slow-cold']);
    expect(bad(3)).toEqual([]);
    expect(bad(7)).toEqual([]);
  });

  it('without requirements nothing is in the error colour, however bad it ranks', () => {
    const rows = cornerRows(tailMirror({ require: {} }), { error: 0.01 });
    expect(rows.flatMap((r) => r.cells.slice(1)).filter((c) => c.flag === 'bad')).toEqual([]);
    expect(rows[0].cells[4].flag).toBe('worst');
  });

  it('a ratio beyond limits.error of the required ratio and a negative margin are failures', () => {
    const m = tailMirror();
    m.corners![0] = { ...m.corners![0]!, ratio: 4.1, error: 0.025, minMargin: -0.01 };
    const rows = cornerRows(m, { error: 0.01 });
    expect(rows[0].cells[3].flag).toBe('bad');
    expect(rows[0].cells[7].flag).toBe('bad');
  });

  it('for PMOS the lowest compliance voltage is worst', () => {
    const m = tailMirror({ type: 'pmos' });
    expect(cornerRows(m).filter((r) => r.cells[5].flag !== undefined).map((r) => r.name)).toEqual(['fast-hot']);
  });
});

describe('Monte Carlo yield', () => {
  it('says how many samples fail and why, never "meets every requirement" below 100 %', () => {
    const m = tailMirror();
    m.mc = { ...m.mc!, samples: 2000, yield: 1991 / 2000, failures: { convergence: 0, saturation: 6, ratio: 3, compliance: 0 } };
    const y = monteCarloFigures(m).find((f) => f.key === 'yield')!;
    expect(y.value).toBe('99.55 %');
    expect(y.detail).toBe('9 of 2000 samples fail: 6 out of saturation, 3 ratio outside limits.tolerance');
  });
  it('names the per-sample checks when every sample passes', () => {
    const m = tailMirror();
    m.mc = { ...m.mc!, samples: 200, yield: 1 };
    expect(monteCarloFigures(m).find((f) => f.key === 'yield')!.detail).toBe('all 200 samples saturated, ratio within limits.tolerance, and at require.compliance');
  });
});

describe('number formatting', () => {
  // SI prefixes: SI Brochure, 9th ed. (2019), Table 7: µ = 1e-6, m = 1e-3, k = 1e3, M = 1e6, G = 1e9.
  it.each([
    [1.2e-5, 'A', '12 µA'],
    [2.13e7, 'Ω', '21.3 MΩ'],
    [0.6234, 'V', '623 mV'],
    [1.8, 'V', '1.8 V'],
    [1e9, 'Ω', '1 GΩ'],
  ])('formatSI(%s, %s) = %s', (v, unit, text) => {
    expect(formatSI(v, unit)).toBe(text);
  });

  it('shows an unmeasured figure as a dash and an ideal one as infinity', () => {
    expect(formatSI(Number.NaN, 'Ω')).toBe('—');
    expect(formatSI(Infinity, 'Ω')).toBe('∞ Ω');
    expect(formatNumber(Number.NaN)).toBe('—');
  });

  it('percent with a space before %, as the SI Brochure (9th ed., §5.4.7) writes it (from memory)', () => {
    expect(formatPercent(0.0025)).toBe('0.25 %');
    expect(formatSignedPercent(0.0025)).toBe('+0.25 %');
    expect(formatSignedPercent(-0.0123)).toBe('-1.23 %');
    expect(formatPercent(0)).toBe('0 %');
    // Shown to 0.0001 % at most: finer is numerical noise in a ratio error.
    expect(formatSignedPercent(5.85e-6)).toBe('+0.0006 %');
    expect(formatSignedPercent(2e-7)).toBe('0 %');
    expect(formatPercent(-1.23e-4)).toBe('-0.0123 %');
  });

  it('plain numbers switch to exponent form outside 1e-3 … 1e6', () => {
    expect(formatNumber(4.01234)).toBe('4.01');
    expect(formatNumber(42.95)).toBe('43');
    expect(formatNumber(2.5e-4)).toBe('2.5e-4');
    expect(formatNumber(3.2e7)).toBe('3.2e7');
  });

  it('one axis prefix from the largest magnitude', () => {
    expect(axisScale([1e-6, 4.1e-5], 'A')).toEqual({ factor: 1e-6, unit: 'µA' });
    expect(axisScale([5e3, 2.1e7, Infinity, Number.NaN], 'Ω')).toEqual({ factor: 1e6, unit: 'MΩ' });
    expect(axisScale([0], 'V')).toEqual({ factor: 1, unit: 'V' });
    // The micro sign U+00B5, as the core's formatter writes it.
    expect(axisScale([1e-5], 'A').unit.codePointAt(0)).toBe(0xb5);
  });
});

describe('plot data', () => {
  it('scales Iout to µA, drops unconverged points, keeps the nominal point and compliance edge', () => {
    const d = curvePlotData(tailMirror())!;
    expect(d.iScale.unit).toBe('µA');
    expect(d.x).toHaveLength(61);
    expect(d.iout[3]).toBeNull();
    expect(d.rout[3]).toBeNull();
    // The point with no operating point is listed for the plot's cross, not dropped silently.
    expect(d.failed).toEqual([d.x[3]]);
    expect(d.iout[60]).toBeCloseTo(40 * Math.tanh(9) * (1 + 1.8 / 25), 9);
    expect(d.nominal).toMatchObject({ x: 0.9 });
    expect(d.nominal.iout).toBeCloseTo(40.12, 9);
    expect(d.compliance).toBe(0.5834);
    expect(d.outside).toBe('below');
    expect(curvePlotData(tailMirror({ curve: undefined }))).toBeUndefined();
  });

  it('Rout that a log axis cannot show (≤ 0, infinite) is left out', () => {
    const m = tailMirror();
    m.curve![10].rout = 0;
    m.curve![11].rout = Infinity;
    const d = curvePlotData(m)!;
    expect(d.rout[10]).toBeNull();
    expect(d.rout[11]).toBeNull();
    expect(d.rScale.unit).toBe('MΩ');
  });

  it('histogram bins, ±3σ and requirement limits', () => {
    const d = histogramPlotData(tailMirror())!;
    expect(d.scale.unit).toBe('µA');
    expect(d.x[0]).toBeCloseTo(39.8, 9);
    expect(d.width).toBeCloseTo(0.2, 9);
    const mark = (label: string) => d.marks.find((k) => k.label === label)!.x;
    expect(mark('+3σ') - mark('mean')).toBeCloseTo(3 * 0.0032 * 40.11, 9);
    expect(mark('+3σ max') - mark('mean')).toBeCloseTo(3 * 0.003 * 40.11, 9);
    expect(mark('target')).toBeCloseTo(40, 9);
  });
});
