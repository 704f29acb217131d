/**
 * The shipped example's outputs show all three drift and noise figures (design §12: supply
 * sensitivity, temperature coefficient with its box figure, noise) in every front end: the CLI's
 * text report, the HTML page's static body, the editor's hover, and the panel's figures and plots
 * (the CLI's JSON is the report itself, pinned by test/cli/golden).
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { analyzeText } from '../../../src/core/analyze';
import { renderText } from '../../../src/core/report/text';
import { renderStaticReport } from '../../../src/core/report/static-html';
import { mirrorFigures } from '../../../src/extension/present';
import { summaryFigures } from '../../../webview/view-model';
import { driftPlotData, noisePlotData } from '../../../webview/plot-data';
import { EXAMPLE_PATH, exampleTables } from '../../example-tables';

describe('the example, every output, every front end', () => {
  const report = analyzeText(readFileSync(EXAMPLE_PATH, 'utf8'), 'sensor-afe.bias.yaml', { tables: exampleTables(), curve: true });
  const n = report.mirrors.length;

  it('every output carries supplySensitivity, tc, tcBox and noise', () => {
    expect(n).toBeGreaterThan(15);
    for (const m of report.mirrors) {
      expect(m.supplySensitivity, m.name).toBeTypeOf('number');
      expect(m.tc, m.name).toBeTypeOf('number');
      expect(m.tcBox, m.name).toBeTypeOf('number');
      expect(m.noise?.density, m.name).toBeGreaterThan(0);
    }
  });
  it('the text report prints them once per output', () => {
    const text = renderText(report);
    expect(text.match(/^ {2}supply sensitivity .* tc .*box/gm)).toHaveLength(n);
    expect(text.match(/^ {2}noise .*A\/√Hz at/gm)).toHaveLength(n);
  });
  it('the HTML page’s static body has a row of each per output', () => {
    const html = renderStaticReport(report);
    for (const label of ['Supply sensitivity', 'Temperature coefficient', 'Noise']) {
      expect(html.match(new RegExp(`<tr><td>${label}</td>`, 'g')), label).toHaveLength(n);
    }
  });
  it('the editor’s hover and the panel’s figures and plots show them', () => {
    for (const m of report.mirrors) {
      const hover = mirrorFigures(m).map(([label]) => label);
      expect(hover, m.name).toEqual(expect.arrayContaining(['supply sensitivity', 'tc']));
      expect(hover.some((l) => l.startsWith('noise at')), m.name).toBe(true);
      expect(summaryFigures(m).map((f) => f.key), m.name).toEqual(expect.arrayContaining(['supplySensitivity', 'tc', 'noise']));
      expect(noisePlotData(m), m.name).toBeDefined();
      expect(driftPlotData(m), m.name).toBeDefined();
    }
  });
});
