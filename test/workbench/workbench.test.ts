/**
 * qpoint in the real VS Code workbench: code-server 4.100.3 (workbench 1.100.3) installed on
 * demand into .cache/code-server/, driven by Debian's Chromium through playwright-core.
 *
 * 1. The extension-host suite (test/workbench/suite) runs with the real `vscode` API and reports
 *    its exit code through window.codeAutomationExit.
 * 2. A UI pass on a second, untouched copy of the fixtures: the squiggle is drawn, the Problems
 *    panel lists the finding, the hover shows the operating-point table, the panel's webview
 *    shows the mirrors and follows an edit. Screenshots go to test-output/workbench/.
 *
 * Expected values: the FAULT marker of the faulty fixture (the range is the value that must
 * change, design §6); the ideal input source sets the reference branch current (KCL, no gate
 * current), so after `input: 10u` → `15u` the panel must show Iin = 15 µA.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import type { BrowserContext, Page } from 'playwright-core';
import { ensureCodeServer } from '../../scripts/workbench/install';
import { startCodeServer, type WorkbenchServer } from '../../scripts/workbench/server';
import { launchBrowser } from '../../scripts/workbench/browser';
import { freshWorkspace, prepareRun, type PreparedRun } from '../../scripts/workbench/prepare';
import { analyzeText } from '../../src/core/analyze';

const ROOT = resolve(__dirname, '../..');
const OUT = join(ROOT, 'test-output', 'workbench');
const CACHE = join(ROOT, '.cache', 'code-server');

let server: WorkbenchServer | undefined;
let browser: BrowserContext | undefined;
let run: PreparedRun;
let codeServerEntry = '';
const timings: Record<string, number> = {};

/** Wait (with a deadline) until the page stops changing between two screenshots. */
async function stableScreenshot(page: Page, deadlineMs: number): Promise<void> {
  const end = Date.now() + deadlineMs;
  let last = await page.screenshot();
  while (Date.now() < end) {
    const next = await page.screenshot();
    if (next.equals(last)) return;
    last = next;
  }
}

function shot(page: Page, name: string): Promise<Buffer> {
  return page.screenshot({ path: join(OUT, `${name}.png`) });
}

/** Warnings the panel wrote to its output channel (e.g. a report the page rejected). */
function panelWarnings(): string {
  const logs = join(OUT, 'state', 'data', 'logs');
  if (!existsSync(logs)) return '';
  const lines: string[] = [];
  for (const session of readdirSync(logs)) {
    for (const host of readdirSync(join(logs, session)).filter((d) => d.startsWith('exthost'))) {
      const f = join(logs, session, host, 'qpoint-dev.qpoint', 'qpoint panel.log');
      if (existsSync(f)) lines.push(...readFileSync(f, 'utf8').split('\n').filter((l) => /\[(warning|error)\]/.test(l)).map((l) => l.slice(0, 300)));
    }
  }
  return lines.length ? `\npanel log:\n${lines.join('\n')}` : '';
}

/** Wait for the workbench shell, then dismiss nothing: the quiet settings keep it clean. */
async function openWorkbench(page: Page, url: string): Promise<void> {
  await page.goto(url);
  await page.locator('.monaco-workbench').waitFor({ state: 'visible', timeout: 60_000 });
}

async function runCommand(page: Page, title: string): Promise<void> {
  await page.keyboard.press('F1');
  const input = page.locator('.quick-input-widget input');
  await input.waitFor({ state: 'visible', timeout: 10_000 });
  await input.fill(`>${title}`);
  await page.locator('.quick-input-list .monaco-list-row', { hasText: title }).first().waitFor({ timeout: 10_000 });
  await page.keyboard.press('Enter');
}

// QPOINT_SKIP_WORKBENCH=1 skips this file on a machine without Chromium (see test/workbench/README.md).
describe.skipIf(process.env.QPOINT_SKIP_WORKBENCH === '1')('qpoint in a real VS Code workbench (code-server + Chromium)', () => {
  beforeAll(async () => {
    rmSync(OUT, { recursive: true, force: true });
    mkdirSync(OUT, { recursive: true });
    const t0 = Date.now();
    const install = await ensureCodeServer(CACHE, join(OUT, 'install.log'));
    timings.installMs = install.ms;
    timings.installed = install.installed ? 1 : 0;
    codeServerEntry = install.entry;
    run = await prepareRun(ROOT, OUT);
    server = await startCodeServer({
      entry: install.entry,
      stateDir: join(OUT, 'state'),
      logFile: join(OUT, 'code-server.log'),
      env: { QPOINT_SUITE_RESULT: run.resultFile, QPOINT_EXPECT_SPECS: String(run.specs.length) },
    });
    timings.startMs = Date.now() - t0 - install.ms;
    browser = await launchBrowser(OUT);
  }, 600_000);

  afterAll(async () => {
    // Stop what we started, even when a test failed.
    await browser?.close().catch(() => undefined);
    await server?.stop();
    console.log(`workbench timings: ${JSON.stringify(timings)}`);
  }, 60_000);

  it('passes the extension-host suite', async () => {
    expect(server && browser).toBeTruthy();
    const page = await browser!.newPage();
    let exitCode: (code: number) => void = () => undefined;
    const exited = new Promise<number>((r) => { exitCode = r; });
    await page.exposeFunction('codeAutomationExit', (code: number) => exitCode(code));
    const t0 = Date.now();
    await page.goto(server!.url({ folder: run.workspace, extensionDevelopmentPath: ROOT, extensionTestsPath: run.suiteDir }));
    let timer: NodeJS.Timeout | undefined;
    const code = await Promise.race([exited, new Promise<'timeout'>((r) => { timer = setTimeout(() => r('timeout'), 150_000); })]);
    clearTimeout(timer);
    timings.suiteMs = Date.now() - t0;
    await shot(page, '1-suite-end').catch(() => undefined);
    let result: { results: { name: string; ok: boolean; ms: number; detail?: string }[]; metrics: Record<string, unknown> } | undefined;
    try { result = JSON.parse(readFileSync(run.resultFile, 'utf8')); } catch { /* reported below */ }
    for (const r of result?.results ?? []) console.log(`${r.ok ? 'ok  ' : 'FAIL'} ${r.name} (${r.ms} ms)${r.detail ? `\n     ${r.detail}` : ''}`);
    console.log(`extension-host metrics: ${JSON.stringify(result?.metrics ?? {})}`);
    await page.close();
    expect(code, `suite did not finish: see ${OUT}/code-server.log`).not.toBe('timeout');
    expect(result, 'suite wrote no result file').toBeDefined();
    expect(result!.results.filter((r) => !r.ok).map((r) => r.name)).toEqual([]);
    expect(result!.results.length).toBeGreaterThanOrEqual(10);
    expect(code).toBe(0);
  }, 200_000);

  it('draws the squiggle, lists the finding in Problems, and shows the hover table', async () => {
    const ws = freshWorkspace(ROOT, OUT, 'ui-workspace');
    const page = await browser!.newPage();
    const t0 = Date.now();
    await openWorkbench(page, server!.url({ folder: ws.dir, extensionDevelopmentPath: ROOT }));
    // Click the file in the explorer.
    const row = page.locator('.explorer-folders-view .monaco-list-row', { hasText: 'faulty.bias.yaml' });
    await row.waitFor({ state: 'visible', timeout: 30_000 });
    await row.click();
    // The editor draws decorations of visible lines only: bring the FAULT line into view.
    const faultLine = readFileSync(join(ws.dir, 'faulty.bias.yaml'), 'utf8').split('\n').findIndex((l) => l.includes('FAULT ratio-error'));
    expect(faultLine).toBeGreaterThan(0);
    await page.locator('.monaco-editor .view-line').first().waitFor({ state: 'visible', timeout: 30_000 });
    await runCommand(page, 'Go to Line/Column...');
    await page.keyboard.type(`${faultLine + 1}`);
    await page.keyboard.press('Enter');
    const squiggle = page.locator('.monaco-editor .squiggly-error').first();
    await squiggle.waitFor({ state: 'attached', timeout: 30_000 });
    timings.uiOpenToSquiggleMs = Date.now() - t0;
    await shot(page, '2-squiggle');

    // Problems panel lists the finding with its code.
    await runCommand(page, 'View: Focus Problems');
    const problems = page.locator('.markers-panel .monaco-list-row', { hasText: 'ratio-error' });
    await problems.first().waitFor({ state: 'visible', timeout: 15_000 });
    expect(await problems.first().innerText()).toContain('off the required 4');
    await shot(page, '3-problems');

    // Hover on the `out:` key of the lna output (the FAULT line): the operating-point table.
    const line = page.locator('.monaco-editor .view-line', { hasText: 'FAULT ratio-error' });
    await line.waitFor({ state: 'visible', timeout: 10_000 });
    const key = line.locator('span span', { hasText: /^out$/ }).first();
    await key.hover();
    const hover = page.locator('.monaco-hover', { hasText: 'Operating point' });
    await hover.first().waitFor({ state: 'visible', timeout: 15_000 });
    const hoverText = await hover.first().innerText();
    expect(hoverText).toContain('VDSsat');
    expect(hoverText).toContain('confirm with transistor-level simulation');
    // The hover fades in: take the screenshot once two frames in a row are identical.
    await stableScreenshot(page, 5_000);
    await shot(page, '4-hover');
    await page.close();
  }, 120_000);

  it('opens the bias panel, which shows the mirrors and follows an edit', async () => {
    const ws = freshWorkspace(ROOT, OUT, 'panel-workspace');
    const page = await browser!.newPage();
    await openWorkbench(page, server!.url({ folder: ws.dir, extensionDevelopmentPath: ROOT }));
    const row = page.locator('.explorer-folders-view .monaco-list-row', { hasText: 'faulty.bias.yaml' });
    await row.waitFor({ state: 'visible', timeout: 30_000 });
    await row.click();
    // The status bar item appears with the first report.
    await page.locator('.statusbar-item', { hasText: 'qpoint:' }).first().waitFor({ state: 'visible', timeout: 30_000 });
    await runCommand(page, 'qpoint: Open Bias Panel');
    const frame = page.frameLocator('iframe.webview.ready').frameLocator('#active-frame');
    const body = frame.locator('body');
    try {
      for (const name of ['lna', 'load_p', 'ws_bias', 'wilson_ref', 'aux_net']) {
        await body.filter({ hasText: name }).waitFor({ state: 'visible', timeout: 30_000 });
      }
    } catch (e) {
      await shot(page, 'fail-panel');
      throw new Error(`the panel did not show the mirrors: ${(e as Error).message}${panelWarnings()}`);
    }
    expect(await body.innerText()).not.toContain('15 µA');
    await shot(page, '5-panel');

    // The selected output's schematic, in the light, dark and high-contrast themes: set as the
    // workspace's colour theme, which the workbench applies live; the drawing's wires take the
    // theme's editor foreground each time.
    const wire = frame.locator('svg[data-schematic] .sch-wire').first();
    await wire.waitFor({ state: 'attached', timeout: 30_000 });
    await frame.locator('svg[data-schematic]').first().scrollIntoViewIfNeeded();
    const strokes = new Set<string>();
    const themeClass = { light: 'vs', dark: 'vs-dark', 'high-contrast': 'hc-black' } as const;
    const themeOf = async (): Promise<string | undefined> => (await page.locator('.monaco-workbench').first().getAttribute('class'))
      ?.split(/\s+/).find((c) => ['vs', 'vs-dark', 'hc-black', 'hc-light'].includes(c));
    const initial = await themeOf();
    const settingsDir = join(ws.dir, '.vscode');
    mkdirSync(settingsDir, { recursive: true });
    for (const [name, theme] of [['light', 'Default Light Modern'], ['dark', 'Default Dark Modern'], ['high-contrast', 'Default High Contrast']] as const) {
      writeFileSync(join(settingsDir, 'settings.json'), JSON.stringify({ 'workbench.colorTheme': theme }));
      await page.locator(`.monaco-workbench.${themeClass[name]}`).waitFor({ timeout: 20_000 });
      const previous = [...strokes].at(-1) ?? '';
      await expect.poll(() => wire.evaluate((e) => getComputedStyle(e).stroke), { timeout: 10_000 }).not.toBe(previous);
      strokes.add(await wire.evaluate((e) => getComputedStyle(e).stroke));
      await stableScreenshot(page, 5_000);
      await shot(page, `5-schematic-${name}`);
    }
    expect(strokes.size).toBe(3);
    // Back to the theme the run started in, for the screenshots that follow.
    rmSync(settingsDir, { recursive: true, force: true });
    await expect.poll(themeOf, { timeout: 20_000 }).toBe(initial);

    // Edit the tail bank's input current in the editor, as a designer types it: go to the
    // value `10u` of `input:` and overtype `10` with `15`.
    const lines = readFileSync(join(ws.dir, 'faulty.bias.yaml'), 'utf8').split('\n');
    const lineIndex = lines.findIndex((l) => /^\s+input: 10u\s+# ideal input current/.test(l));
    expect(lineIndex).toBeGreaterThan(0);
    const column = lines[lineIndex].indexOf('10u') + 1;
    const t0 = Date.now();
    // Focus the spec's editor (the panel may hold the focus), then go to the value. A command,
    // not a click: clicking the centre of a long view-line makes the browser scroll the
    // editor's DOM sideways, which a user's click never does.
    await runCommand(page, 'View: Focus First Editor Group');
    await runCommand(page, 'Go to Line/Column...');
    await page.keyboard.type(`${lineIndex + 1}:${column}`);
    await page.keyboard.press('Enter');
    await page.keyboard.press('Delete');
    await page.keyboard.press('Delete');
    await page.keyboard.type('15');
    try {
      await page.locator('.monaco-editor .view-line', { hasText: 'input: 15u' }).first().waitFor({ state: 'visible', timeout: 10_000 });
      await body.filter({ hasText: '15 µA' }).waitFor({ state: 'visible', timeout: 20_000 });
    } catch (e) {
      await shot(page, 'fail-panel-edit');
      throw new Error(`the panel did not follow the edit: ${(e as Error).message}${panelWarnings()}`);
    }
    timings.uiEditToPanelMs = Date.now() - t0;
    await shot(page, '6-panel-after-edit');

    // Variation: the live report carries the spec's corners (qpoint.corners.enabled is on by
    // default), so the selected output shows its corner table, one row per corner of the spec.
    const cornerRows = frame.locator('section[id^="corners-"] table.corners tbody tr');
    try {
      await cornerRows.first().waitFor({ state: 'visible', timeout: 20_000 });
    } catch (e) {
      await shot(page, 'fail-panel-corners');
      throw new Error(`the panel shows no corner table: ${(e as Error).message}${panelWarnings()}`);
    }
    expect((await cornerRows.allInnerTexts()).map((r) => r.trim().split(/\s+/)[0])).toEqual(['ss', 'ff']);
    // Monte Carlo from the palette (samples and seed from the settings), with the spec's editor
    // still focused from the edit: the histogram appears.
    await runCommand(page, 'qpoint: Run Monte Carlo Mismatch');
    const histogram = frame.locator('section[id^="mc-"] canvas');
    const t1 = Date.now();
    try {
      await histogram.first().waitFor({ state: 'visible', timeout: 90_000 });
    } catch (e) {
      await shot(page, 'fail-panel-mc');
      throw new Error(`the panel shows no Monte Carlo histogram: ${(e as Error).message}${panelWarnings()}`);
    }
    timings.uiMonteCarloMs = Date.now() - t1;
    expect(await frame.locator('[data-figures="mc"] [data-figure="samples"] .value').innerText()).toMatch(/^10\s?000$/);
    await frame.locator('section[id^="mc-"]').first().scrollIntoViewIfNeeded();
    await stableScreenshot(page, 5_000);
    await shot(page, '8-panel-variation');
    // The panel's own button asks the host for the same run (a page → host message).
    const version = Number(await body.getAttribute('data-qpoint-version'));
    await frame.locator('vscode-button', { hasText: 'Run Monte Carlo again' }).first().click();
    await expect.poll(async () => Number(await body.getAttribute('data-qpoint-version')), { timeout: 90_000 }).toBeGreaterThan(version);
    await histogram.first().waitFor({ state: 'visible', timeout: 10_000 });

    // A typo in one mirror while typing: `wide-swing` loses its hyphen. That mirror gets a lens
    // saying it is not solved and a row in the panel; the other mirrors stay in the panel.
    const kindLine = lines.findIndex((l) => /^\s+kind: wide-swing\s*$/.test(l));
    expect(kindLine).toBeGreaterThan(0);
    await runCommand(page, 'View: Focus First Editor Group');
    await runCommand(page, 'Go to Line/Column...');
    await page.keyboard.type(`${kindLine + 1}:${lines[kindLine].indexOf('wide-swing') + 'wide'.length + 1}`);
    await page.keyboard.press('Enter');
    await page.keyboard.press('Delete');
    const lens = page.locator('.monaco-editor .codelens-decoration', { hasText: 'not solved until this mirror' });
    try {
      await page.locator('.monaco-editor .view-line', { hasText: 'kind: wideswing' }).first().waitFor({ state: 'visible', timeout: 10_000 });
      await lens.first().waitFor({ state: 'visible', timeout: 20_000 });
      await body.filter({ hasText: 'not solved: fix its errors' }).waitFor({ state: 'visible', timeout: 20_000 });
    } catch (e) {
      await shot(page, 'fail-typo');
      throw new Error(`a typo in one mirror did not show as set aside: ${(e as Error).message}${panelWarnings()}`);
    }
    expect(await body.innerText()).toContain('wilson_ref');  // the next mirror is still solved
    await shot(page, '9-typo-set-aside');
    await page.keyboard.type('-');
    await lens.first().waitFor({ state: 'detached', timeout: 20_000 });
    await page.close();
  }, 240_000);

  it('bias networks: F12 on a from value jumps to the output; the panel draws the tree, a click reveals the mirror', async () => {
    const ws = freshWorkspace(ROOT, OUT, 'network-workspace');
    const page = await browser!.newPage();
    await openWorkbench(page, server!.url({ folder: ws.dir, extensionDevelopmentPath: ROOT }));
    const row = page.locator('.explorer-folders-view .monaco-list-row', { hasText: 'network.bias.yaml' });
    await row.waitFor({ state: 'visible', timeout: 30_000 });
    await row.click();
    await page.locator('.statusbar-item', { hasText: 'qpoint:' }).first().waitFor({ state: 'visible', timeout: 30_000 });
    const lines = readFileSync(join(ws.dir, 'network.bias.yaml'), 'utf8').split('\n');
    const fromLine = lines.findIndex((l) => l.includes('from: ref_bank.p_amp'));
    const outputLine = lines.findIndex((l) => l.includes('- name: p_amp'));
    const tailLine = lines.findIndex((l) => l.includes('- name: tail'));
    expect(Math.min(fromLine, outputLine, tailLine)).toBeGreaterThan(0);
    const cursor = page.locator('.statusbar-item[id="status.editor.selection"]');
    await runCommand(page, 'Go to Line/Column...');
    await page.keyboard.type(`${fromLine + 1}:${lines[fromLine]!.indexOf('p_amp') + 2}`);
    await page.keyboard.press('Enter');
    await expect.poll(() => cursor.innerText(), { timeout: 10_000 }).toMatch(new RegExp(`Ln ${fromLine + 1},`));
    await page.keyboard.press('F12');
    try {
      await expect.poll(() => cursor.innerText(), { timeout: 15_000 }).toMatch(new RegExp(`Ln ${outputLine + 1}, Col ${lines[outputLine]!.indexOf('p_amp') + 1}\\b`));
    } catch (e) {
      await shot(page, 'fail-definition');
      throw e;
    }
    await shot(page, '10-go-to-definition');

    await runCommand(page, 'qpoint: Open Bias Panel');
    const frame = page.frameLocator('iframe.webview.ready').frameLocator('#active-frame');
    const tail = frame.locator('svg.net-tree .net-node[data-node="tail"]');
    try {
      await tail.waitFor({ state: 'visible', timeout: 30_000 });
    } catch (e) {
      await shot(page, 'fail-network-tree');
      throw new Error(`the panel drew no network tree: ${(e as Error).message}${panelWarnings()}`);
    }
    expect(await frame.locator('svg.net-tree .net-node').count()).toBe(8);
    expect(await frame.locator('svg.net-tree .net-link.trouble').count()).toBe(1);
    expect(await frame.locator('#mirror-list tr.group').innerText()).toBe('Network of ref_bank');
    await frame.locator('#networks').scrollIntoViewIfNeeded();
    await stableScreenshot(page, 5_000);
    await shot(page, '11-network-tree');
    await tail.click();
    await expect.poll(() => cursor.innerText(), { timeout: 15_000 }).toMatch(new RegExp(`Ln ${tailLine + 1},`));
    await page.close();
  }, 180_000);

  it('installs the packed vsix into a fresh workbench, where it works on the example', async () => {
    // `npm run package` in small: vsce packs the built dist/ (allow-list .vscodeignore), then
    // code-server installs the file exactly as a user's `--install-extension` would.
    const vsix = join(OUT, 'qpoint.vsix');
    const vsce = join(ROOT, 'node_modules', '@vscode', 'vsce', 'vsce');
    const pack = spawnSync(process.execPath, [vsce, 'package', '--no-dependencies', '--out', vsix], { cwd: ROOT, encoding: 'utf8', input: '', timeout: 120_000 });
    expect(pack.status, pack.stderr + pack.stdout).toBe(0);
    const stateDir = join(OUT, 'vsix-state');
    rmSync(stateDir, { recursive: true, force: true });
    const xdg = (n: string) => { const d = join(stateDir, n); mkdirSync(d, { recursive: true }); return d; };
    const install = spawnSync(process.execPath, [codeServerEntry, '--install-extension', vsix,
      '--extensions-dir', xdg('extensions'), '--user-data-dir', xdg('data'), '--config', join(xdg('config'), 'config.yaml')],
    { encoding: 'utf8', timeout: 180_000, env: { ...process.env, XDG_CONFIG_HOME: xdg('xdg-config'), XDG_DATA_HOME: xdg('xdg-data'), XDG_CACHE_HOME: xdg('xdg-cache') } });
    expect(install.status, install.stderr + install.stdout).toBe(0);
    expect(readdirSync(join(stateDir, 'extensions')).some((d) => d.startsWith('qpoint-dev.qpoint-'))).toBe(true);

    const second = await startCodeServer({ entry: codeServerEntry, stateDir, logFile: join(OUT, 'code-server-vsix.log') });
    const page = await browser!.newPage();
    try {
      const ws = freshWorkspace(ROOT, OUT, 'vsix-workspace');
      await openWorkbench(page, second.url({ folder: ws.dir }));   // no development path: the installed copy
      const row = page.locator('.explorer-folders-view .monaco-list-row', { hasText: 'faulty.bias.yaml' });
      await row.waitFor({ state: 'visible', timeout: 30_000 });
      await row.click();
      const status = page.locator('.statusbar-item', { hasText: 'qpoint:' }).first();
      await status.waitFor({ state: 'visible', timeout: 60_000 });
      // The example's bank, with its one deliberate fault (3 parallel devices for ratio 4), and
      // the errors of its corners: as many as the engine finds on the same text.
      const text = readFileSync(join(ws.dir, 'faulty.bias.yaml'), 'utf8');
      const errors = analyzeText(text, 'faulty.bias.yaml', { corners: true }).findings.filter((f) => f.severity === 'error');
      expect(errors.filter((f) => !f.code.startsWith('corner-')).map((f) => f.code)).toEqual(['ratio-error']);
      await expect.poll(() => status.innerText(), { timeout: 30_000 }).toMatch(new RegExp(`\\b${errors.length} errors?\\b`));
      await runCommand(page, 'View: Focus Problems');
      await page.locator('.markers-panel .monaco-list-row', { hasText: 'ratio-error' }).first().waitFor({ state: 'visible', timeout: 15_000 });
      await shot(page, '7-vsix-installed');
    } finally {
      await page.close();
      await second.stop();
    }
  }, 300_000);
});
