// The self-contained HTML report as text: escaping, embedded data, no network. The browser test
// (browser.test.ts) opens the same file in Chromium.
import { describe, expect, it } from 'vitest';
import {
  REPORT_DATA_ID, STATIC_ID, embedReportJson, escapeScript, parseEmbeddedReport, renderHtmlReport,
} from '../../src/core/report/html';
import { isFileReport } from '../../src/protocol/messages';
import { fixtureReport } from './fixtures';

const HOSTILE = '</script><script>alert(1)</script><!-- \u2028';

describe('embedded report data', () => {
  it('round-trips, including Infinity and NaN that plain JSON loses', () => {
    const report = fixtureReport();
    report.mirrors[0].rout = Infinity;
    report.mirrors[0].routApprox = -Infinity;
    report.mirrors[0].sigma = Number.NaN;
    const back = parseEmbeddedReport(embedReportJson(report));
    expect(isFileReport(back)).toBe(true);
    expect(back).toEqual(report);  // toEqual treats NaN as equal to NaN
  });

  it('cannot end its <script> element, whatever a title or message says', () => {
    const report = fixtureReport();
    report.title = HOSTILE;
    report.findings[0].message = HOSTILE;
    const json = embedReportJson(report);
    expect(json).not.toMatch(/[<>&\u2028\u2029]/);
    expect((parseEmbeddedReport(json) as typeof report).title).toBe(HOSTILE);
  });
});

describe('renderHtmlReport', () => {
  const script = 'window.x = "</script>"; /* <!-- */ document.body.dataset.ran = "1";';

  it('is one page with the data element, the inlined script and a no-network policy', () => {
    const report = fixtureReport();
    report.title = HOSTILE;
    const html = renderHtmlReport(report, { script, css: 'body { margin: 0 }' });
    expect(html.startsWith('<!DOCTYPE html>')).toBe(true);
    expect(html).toContain(`<script type="application/json" id="${REPORT_DATA_ID}">`);
    expect(html).toContain("default-src 'none'");
    // Exactly two script elements close: the data and the bundle. No hostile text closed one early.
    expect(html.match(/<\/script>/gi)).toHaveLength(2);
    expect(html).not.toContain('<script>alert(1)');
    // No external references of any kind.
    expect(html).not.toMatch(/\b(src|href)\s*=/i);
    expect(html).not.toMatch(/https?:\/\//i);
    expect(html).toContain('confirm with transistor-level simulation on the foundry&#39;s models and corners');
    expect(html).toContain('<title>qpoint report — &lt;/script&gt;');
  });

  it('reads without JavaScript: findings, figures and devices as tables, plots as inline SVG, and its own stamp', () => {
    const report = fixtureReport();
    const stamp = { version: '9.8.7', date: '2026-01-02T03:04:05.000Z', inputHash: 'sha256:0123abcd' };
    const html = renderHtmlReport(report, { script }, stamp);
    const body = html.slice(html.indexOf(`<div id="${STATIC_ID}">`), html.indexOf('<main id="qpoint-root">'));
    expect(body).toContain('qpoint 9.8.7 · written 2026-01-02T03:04:05.000Z · input sha256:0123abcd');
    expect(html).toContain('<meta name="qpoint-input" content="sha256:0123abcd">');
    for (const m of report.mirrors) {
      expect(body).toContain(`<caption>Figures of ${m.name}</caption>`);
      expect(body).toContain(`<caption>Devices of ${m.name}</caption>`);
    }
    // tailMirror's curve: one Iout and one Rout plot; the point that did not converge is marked.
    expect(body.match(/<svg class="plot-svg"/g)!.length).toBeGreaterThanOrEqual(3);  // + the MC histogram
    expect(body).toContain('<title>Iout versus Vout — tail</title>');
    expect(body).toContain('class="failed"');
    expect(body).toContain('Monte Carlo: 200 samples (seed 7)');
    expect(body).toContain('7 of 200 samples fail');   // yield 0.965 of 200
    // Printing uses the static body; nothing is fetched, no script needed to read it.
    expect(html).toContain(`@media print { #${STATIC_ID} { display: block !important; }`);
    expect(body).not.toMatch(/<script/i);
  });

  it('leaves out the bundle\'s source-map comment: the map it names is not beside a saved page', () => {
    const html = renderHtmlReport(fixtureReport(), { script: `${script}\n//# sourceMappingURL=webview.js.map\n` });
    expect(html).not.toContain('sourceMappingURL');
    expect(html).toContain('document.body.dataset.ran = "1";');
  });

  it('escapes the bundle so a "</script" or "<!--" inside it means the same characters', () => {
    const escaped = escapeScript(script);
    expect(escaped).not.toMatch(/<\/script/i);
    expect(escaped).not.toContain('<!--');
    // The escaped source evaluates to the same string values.
    const scope: { x?: string } = {};
    new Function('window', 'document', escaped)(scope, { body: { dataset: {} } });
    expect(scope.x).toBe('</script>');
  });
});
