// Schematics in real headless Chromium: the static report (no JavaScript) for every kind in both
// polarities and for the example (its netlist included), with every label's rendered text
// measured; printing; and the panel, where a device in the drawing selects its row and reveals
// it. Screenshots go to test-output/webview/.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import ELK from 'elkjs/lib/elk.bundled.js';
import type { Browser } from 'playwright-core';
import { analyzeText } from '../../src/core/analyze';
import { exampleTables } from '../example-tables';
import { renderHtmlReport } from '../../src/core/report/html';
import { schematicsOf } from '../../src/core/schematic';
import type { FileReport } from '../../src/core/types';
import { OUT, ROOT, applyTheme, ensureBundle, instrument, launch, until, writePanelPage, type ThemeKind } from './browser-harness';
import { deviceRow, findingsFor } from '../../webview/view-model';
import { EXAMPLE, everyKindText, exampleText } from '../schematic/fixtures';

let browser: Browser;
let kinds: FileReport, example: FileReport;
const files: Record<string, string> = {};

beforeAll(async () => {
  await ensureBundle();
  browser = await launch();
  kinds = analyzeText(everyKindText, 'kinds.bias.yaml', { tables: exampleTables() });
  example = analyzeText(exampleText, EXAMPLE, { curve: true, tables: exampleTables() });
  mkdirSync(OUT, { recursive: true });
  const script = readFileSync(join(ROOT, 'dist', 'webview.js'), 'utf8');
  for (const [name, report] of [['kinds', kinds], ['example', example]] as const) {
    files[name] = join(OUT, `schematics-${name}.html`);
    writeFileSync(files[name], renderHtmlReport(report, { script }, undefined, await schematicsOf(new ELK(), report)));
  }
});

afterAll(async () => {
  await browser?.close();
});

interface Rect { x: number; y: number; w: number; h: number; what: string }
interface Measured { name: string; labels: Rect[]; symbols: Rect[]; planned: Rect[] }

/** Every schematic's label and symbol boxes as rendered (page px), and each label's planned box. */
async function measure(file: string): Promise<Measured[]> {
  const context = await browser.newContext({ viewport: { width: 1400, height: 900 }, javaScriptEnabled: false });
  const page = await context.newPage();
  await page.goto(pathToFileURL(file).toString());
  const out = await page.$$eval('svg[data-schematic]', (svgs) => svgs.map((svg) => {
    const r = (e: Element, what: string) => { const b = e.getBoundingClientRect(); return { x: b.x, y: b.y, w: b.width, h: b.height, what }; };
    const origin = svg.getBoundingClientRect();
    const scale = origin.width / Number(svg.getAttribute('width'));
    return {
      name: svg.getAttribute('data-schematic') ?? '',
      labels: [...svg.querySelectorAll('text.sch-label')].map((t) => r(t, t.textContent ?? '')),
      symbols: [...svg.querySelectorAll('g[transform]')].map((g) => r(g, g.parentElement?.getAttribute('data-device') || g.parentElement?.getAttribute('class') || '')),
      planned: [...svg.querySelectorAll('text.sch-label')].map((t) => {
        const [x, y, w, h] = (t.getAttribute('data-box') ?? '').split(' ').map(Number) as [number, number, number, number];
        return { x: origin.x + x * scale, y: origin.y + y * scale, w: w * scale, h: h * scale, what: t.textContent ?? '' };
      }),
    };
  }));
  await context.close();
  return out;
}

// Half a pixel of slack for anti-aliased glyph edges.
const apart = (a: Rect, b: Rect): boolean => a.x + a.w <= b.x + 0.5 || b.x + b.w <= a.x + 0.5 || a.y + a.h <= b.y + 0.5 || b.y + b.h <= a.y + 0.5;
const inside = (a: Rect, b: Rect): boolean => a.x >= b.x - 0.5 && a.y >= b.y - 0.5 && a.x + a.w <= b.x + b.w + 0.5 && a.y + a.h <= b.y + b.h + 0.5;

function checkApart(all: Measured[]): void {
  for (const s of all) {
    expect(s.labels.length, s.name).toBeGreaterThan(3);
    s.labels.forEach((l, i) => {
      // The text as the browser set it stays inside the box the layout kept free for it.
      expect(inside(l, s.planned[i]!), `${s.name}: "${l.what}" overflows its box`).toBe(true);
      for (const o of s.labels.slice(i + 1)) expect(apart(l, o), `${s.name}: "${l.what}" / "${o.what}"`).toBe(true);
      for (const o of s.symbols) expect(apart(l, o), `${s.name}: "${l.what}" / symbol ${o.what}`).toBe(true);
    });
  }
}

describe('schematics in Chromium', () => {
  it('every kind in both polarities: no label box meets another label or a symbol', async () => {
    const all = await measure(files.kinds!);
    expect(all.map((s) => s.name).sort()).toEqual(kinds.mirrors.map((m) => m.name).sort());
    checkApart(all);
  });

  it('the example, its netlist and bias bank included: no label box meets another or a symbol', async () => {
    const all = await measure(files.example!);
    expect(all.map((s) => s.name)).toContain('aux_net');
    expect(all.length).toBe(example.mirrors.length);
    checkApart(all);
  });

  it('print without JavaScript: every output\'s schematic is on the page', async () => {
    const context = await browser.newContext({ viewport: { width: 1000, height: 900 }, javaScriptEnabled: false });
    const page = await context.newPage();
    await page.goto(pathToFileURL(files.example!).toString());
    await page.emulateMedia({ media: 'print', colorScheme: 'light' });
    for (const m of example.mirrors) {
      const box = await page.locator(`svg[data-schematic="${m.name}"]`).boundingBox();
      expect(box?.width, m.name).toBeGreaterThan(200);
    }
    await page.pdf({ path: join(OUT, 'schematics-print.pdf') });
    await context.close();
  });

  it('in the panel: drawn beside the figures in every theme; a device selects its row and reveals it', async () => {
    const page = await browser.newPage({ viewport: { width: 900, height: 1000 } });
    const probe = await instrument(page);
    await page.goto(writePanelPage());
    await until('ready', async () => page.evaluate(() => ((window as unknown as { __posted: { type: string }[] }).__posted).some((m) => m.type === 'ready')));
    const uri = pathToFileURL(join(ROOT, EXAMPLE)).toString();
    await page.evaluate((m) => window.postMessage(m, '*'), { type: 'report', uri, report: example, version: 1 });
    const m = example.mirrors.find((x) => x.name === 'wilson_p')!;
    await page.locator(`#mirror-list tr[data-key="mirror:${m.name}"]`).click();
    const svg = page.locator(`article.mirror svg[data-schematic="${m.name}"]`);
    await svg.waitFor();
    for (const theme of ['light', 'dark', 'high-contrast'] as ThemeKind[]) {
      await applyTheme(page, theme);
      // A theme change draws the panel again in the next animation frame: let that frame pass,
      // then wait for the new schematic to be laid out (its figure drops aria-busy) before
      // taking the picture of the element that is there now.
      await page.evaluate(() => new Promise<void>((done) => requestAnimationFrame(() => requestAnimationFrame(() => done()))));
      await page.locator(`.schematic-figure[data-schematic-of="${m.name}"]:not([aria-busy]) svg`).waitFor();
      await page.locator('.figures-schematic').screenshot({ path: join(OUT, `schematic-${theme}.png`) });
    }
    // What the device's row reveals (its key, else where it inherits its size from).
    const reveal = deviceRow(example, m, m.devices.find((d) => d.name === 'bal')!, findingsFor(example, m)).reveal;
    expect(reveal).toBeDefined();
    await svg.locator('g.sch-device[data-device="bal"]').click();
    await expect.poll(() => page.locator(`table.devices tr[data-key="dev:${m.name}:bal"]`).getAttribute('aria-selected')).toBe('true');
    await expect.poll(async () => (await page.evaluate(() => (window as unknown as { __posted: { type: string }[] }).__posted)).filter((x) => x.type === 'reveal').at(-1))
      .toEqual({ type: 'reveal', uri, range: reveal });
    expect(await svg.locator('g.sch-device.selected').getAttribute('data-device')).toBe('bal');
    // Hover: the device's operating point as its title.
    expect(await svg.locator('g.sch-device[data-device="bal"] > title').textContent()).toContain('VDSsat');
    expect(await page.evaluate(() => (window as unknown as { __violations: string[] }).__violations)).toEqual([]);
    expect(probe.errors).toEqual([]);
    await page.close();
  });
});
