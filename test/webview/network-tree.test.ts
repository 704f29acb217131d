// The panel's bias-network tree (design §9.3) in real headless Chromium, on a real core report of
// test/workbench/fixtures/network.bias.yaml: a reference bank feeding two PMOS mirrors, one of
// which feeds an NMOS tail; `adc_src`'s small input device pulls its link's node down, so that
// link is in trouble. The pure tree (src/core/network-tree/model.ts) is checked in Node first.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import type { Browser, Page } from 'playwright-core';
import { analyzeText } from '../../src/core/analyze';
import type { FileReport } from '../../src/core/types';
import { mirrorGroups, networkTree } from '../../src/core/network-tree/model';
import ELK from 'elkjs/lib/elk.bundled.js';
import { networkTreesOf } from '../../src/core/network-tree';
import { renderHtmlReport, STATIC_ID } from '../../src/core/report/html';
import { formatSI, formatSignedPercent } from '../../webview/format';
import { OUT, ROOT, applyTheme, ensureBundle, ensureDir, instrument, launch, until, writePanelPage, type ThemeKind } from './browser-harness';

const SPEC = join(ROOT, 'test', 'workbench', 'fixtures', 'network.bias.yaml');
const URI = pathToFileURL(SPEC).toString();
let cached: FileReport | undefined;
const report = (): FileReport => (cached ??= analyzeText(readFileSync(SPEC, 'utf8'), SPEC));
const out = (name: string) => report().mirrors.find((m) => m.name === name)!;

describe('the network tree, before layout', () => {
  it('one node per member and per leaf output, one edge per link and per leaf, labelled from the report', () => {
    const r = report();
    const tree = networkTree(r, r.networks![0]!);
    expect(tree.nodes.filter((n) => !n.leaf).map((n) => n.title)).toEqual(['ref_bank', 'amp_bank', 'adc_src', 'tail']);
    expect(tree.nodes.filter((n) => n.leaf).map((n) => n.select)).toEqual(r.networks![0]!.leaves);
    expect(tree.edges).toHaveLength(7);  // ref_bank: 3 outputs, amp_bank: 2, adc_src: 1, tail: 1
    const link = tree.edges.find((e) => e.id === `e0_0`)!;  // ref_bank.p_amp → amp_bank
    expect(link.label).toBe(`p_amp: ${formatSI(out('ref_bank.p_amp').iout, 'A')} · chain ${formatSignedPercent(out('ref_bank.p_amp').chainError!)}`);
    expect(link.target).toBe('m1');
  });
  it('marks the link whose upstream output the downstream input pushes out of saturation, in words', () => {
    const r = report();
    const up = out('ref_bank.p_adc');
    expect(up.headroom!).toBeLessThan(0);
    const tree = networkTree(r, r.networks![0]!);
    expect(tree.edges.find((e) => e.id === 'e0_1')!.trouble).toBe(`upstream out of saturation (headroom ${formatSI(up.headroom!, 'V')})`);
    expect(tree.edges.find((e) => e.id === 'e0_0')!.trouble).toBeUndefined();
  });
  it('groups the mirror list by network', () => {
    expect(mirrorGroups(report())).toEqual([{ network: 'ref_bank', mirrors: ['ref_bank', 'amp_bank', 'adc_src', 'tail'] }]);
  });
});

let browser: Browser;
let panelUrl: string;
beforeAll(async () => {
  await ensureBundle();
  panelUrl = writePanelPage();
  browser = await launch();
});
afterAll(async () => { await browser?.close(); });

async function openWithReport(theme: ThemeKind = 'dark', width = 1100): Promise<{ page: Page; errors: string[] }> {
  const page = await browser.newPage({ viewport: { width, height: 900 } });
  const probe = await instrument(page);
  await page.goto(panelUrl);
  await applyTheme(page, theme);
  await until('ready', async () => page.evaluate(() => ((window as unknown as { __posted: { type: string }[] }).__posted).some((m) => m.type === 'ready')));
  await page.evaluate((m) => window.postMessage(m, '*'), { type: 'report', uri: URI, report: report(), version: 1 });
  await page.locator('figure.network-figure[data-ready="true"]').waitFor();
  return { page, errors: probe.errors };
}

interface Box { x: number; y: number; width: number; height: number }
const overlap = (a: Box, b: Box): boolean => a.x < b.x + b.width && b.x < a.x + a.width && a.y < b.y + b.height && b.y < a.y + a.height;

describe('the network tree in the panel', () => {
  it('lays out every member and label with no two boxes overlapping, the troubled link dashed and in words', async () => {
    const { page, errors } = await openWithReport();
    const nodes = page.locator('svg.net-tree .net-node rect');
    const labels = page.locator('svg.net-tree .net-label-box');
    expect(await nodes.count()).toBe(8);   // 4 mirrors + 4 leaf outputs
    expect(await labels.count()).toBe(7);
    const boxes: Box[] = [];
    for (const loc of [nodes, labels]) for (let i = 0; i < await loc.count(); i++) boxes.push((await loc.nth(i).boundingBox())!);
    for (let i = 0; i < boxes.length; i++) for (let j = i + 1; j < boxes.length; j++) expect(overlap(boxes[i]!, boxes[j]!), `boxes ${i} and ${j}`).toBe(false);
    // The text of each label fits its box (the canvas measured what the SVG draws).
    const fits = await page.locator('svg.net-tree .net-link').evaluateAll((gs) => gs.every((g) => {
      const box = g.querySelector('rect')!.getBBox();
      const text = (g.querySelector('text') as SVGTextElement).getBBox();
      return text.x >= box.x - 0.5 && text.x + text.width <= box.x + box.width + 0.5;
    }));
    expect(fits).toBe(true);
    const trouble = page.locator('svg.net-tree .net-link.trouble');
    expect(await trouble.count()).toBe(1);
    expect(await trouble.getAttribute('data-edge')).toBe('e0_1');
    expect(await trouble.locator('text').textContent()).toContain('⚠ upstream out of saturation');
    // Shape and colour: dashed, in the theme's error foreground.
    const style = await trouble.locator('path.net-edge').evaluate((p) => { const s = getComputedStyle(p); return { dash: s.strokeDasharray, stroke: s.stroke }; });
    expect(style.dash).not.toBe('none');
    const errorColour = await page.evaluate(() => getComputedStyle(document.documentElement).getPropertyValue('--vscode-errorForeground').trim());
    expect(errorColour).not.toBe('');
    ensureDir(OUT);
    await page.locator('#networks').screenshot({ path: join(OUT, 'network-tree.png') });
    await page.screenshot({ path: join(OUT, 'panel-network.png'), fullPage: true });
    expect(errors).toEqual([]);
    await page.close();
  });

  it('a tree wider than the panel shrinks to the panel\'s width, down to two thirds of its size; past that it scrolls', async () => {
    for (const width of [1100, 640]) {
      const { page, errors } = await openWithReport('dark', width);
      const svg = page.locator('svg.net-tree');
      const natural = Number(await svg.getAttribute('width'));
      const figure = (await page.locator('figure.network-figure').boundingBox())!;
      const drawn = (await svg.boundingBox())!;
      // The fixture's tree (1 335 px at its own size) is wider than either panel.
      expect(natural, `${width}`).toBeGreaterThan(figure.width);
      expect(drawn.width, `${width}`).toBeCloseTo(Math.max(figure.width, natural * 2 / 3), 0);
      // Scaled, not cropped: the same proportions.
      expect(drawn.height / drawn.width).toBeCloseTo(Number(await svg.getAttribute('height')) / natural, 2);
      const scrolls = await page.locator('figure.network-figure .scroll-x').evaluate((d) => d.scrollWidth > d.clientWidth + 1);
      expect(scrolls, `${width}`).toBe(natural * 2 / 3 > figure.width);
      ensureDir(OUT);
      await page.locator('#networks').screenshot({ path: join(OUT, `network-tree-${width}.png`) });
      expect(errors).toEqual([]);
      await page.close();
    }
  });

  it('the report\'s static body: the tree at its own size in a scrolling figure on screen, shrunk to the page when printed', async () => {
    const trees = await networkTreesOf(new ELK(), report());
    ensureDir(OUT);
    const file = join(OUT, 'report-network-noscript.html');
    writeFileSync(file, renderHtmlReport(report(), { script: '' }, undefined, undefined, trees));
    const context = await browser.newContext({ viewport: { width: 700, height: 900 }, javaScriptEnabled: false });
    const page = await context.newPage();
    await page.goto(pathToFileURL(file).toString());
    const svg = page.locator(`#${STATIC_ID} svg.net-tree`);
    const natural = Number(await svg.getAttribute('width'));
    const body = (await page.locator(`#${STATIC_ID}`).boundingBox())!;
    expect(natural).toBeGreaterThan(body.width);
    expect((await svg.boundingBox())!.width).toBeCloseTo(natural, 0);
    expect(await page.locator(`#${STATIC_ID} .network-figure`).evaluate((f) => f.scrollWidth > f.clientWidth)).toBe(true);
    await page.emulateMedia({ media: 'print' });
    const printed = (await svg.boundingBox())!;
    const printedBody = (await page.locator(`#${STATIC_ID}`).boundingBox())!;
    expect(printed.width).toBeLessThanOrEqual(printedBody.width);
    expect(printed.height / printed.width).toBeCloseTo(Number(await svg.getAttribute('height')) / natural, 2);
    await context.close();
  });

  it('a click on a mirror selects it and reveals it in the spec; the list groups mirrors by network', async () => {
    const { page, errors } = await openWithReport('light');
    await page.locator('svg.net-tree .net-node[data-node="tail"]').click();
    const anchor = report().anchors.find((a) => a.kind === 'mirror' && a.path[1] === 3)!;
    await expect.poll(() => page.evaluate(() => (window as unknown as { __posted: { type: string }[] }).__posted.filter((m) => m.type === 'reveal').at(-1)))
      .toEqual({ type: 'reveal', uri: URI, range: anchor.range });
    await expect.poll(() => page.locator('article.mirror').getAttribute('data-mirror')).toBe('tail');
    const keys = await page.locator('#mirror-list tr[data-key]').evaluateAll((rows) => rows.map((r) => (r as HTMLElement).dataset.key));
    expect(keys).toEqual(['group:ref_bank', ...report().mirrors.map((m) => `mirror:${m.name}`)]);
    expect(await page.locator('#mirror-list tr.group').innerText()).toBe('Network of ref_bank');
    // Keyboard: the mirror nodes are in the tab order and act on Enter.
    await page.locator('svg.net-tree .net-node[data-node="amp_bank"]').focus();
    await page.keyboard.press('Enter');
    await expect.poll(() => page.locator('article.mirror').getAttribute('data-mirror')).toBe('amp_bank.ota');
    expect(errors).toEqual([]);
    await page.close();
  });
});
