/**
 * Chromium harness for the panel page: the real bundle (dist/webview.js), the real shell HTML
 * (webview/shell.ts, with its CSP), a stand-in for the VS Code webview API that records what the
 * page posts, and the theme variables VS Code sets on <html> with its body classes.
 */
import { existsSync, mkdirSync, readdirSync, statSync, writeFileSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { pathToFileURL } from 'node:url';
import { randomBytes } from 'node:crypto';
import * as esbuild from 'esbuild';
import { chromium, type Browser, type Page } from 'playwright-core';
import { panelShellHtml } from '../../webview/shell';
import { REPORT_THEME_DARK, REPORT_THEME_LIGHT } from '../../src/core/report/html';

export const ROOT = resolve(__dirname, '../..');
export const OUT = join(ROOT, 'test-output', 'webview');
export const BUNDLE = join(ROOT, 'dist', 'webview.js');

/** dist/webview.js, rebuilt with the options of esbuild.mjs's webview target when a source
 *  under webview/ or src/ is newer (a plain `npm test` has just built it). */
export async function ensureBundle(): Promise<string> {
  const newest = Math.max(...['webview', 'src/protocol', 'src/core'].map((d) => newestMtime(join(ROOT, d))));
  if (!existsSync(BUNDLE) || statSync(BUNDLE).mtimeMs < newest) {
    await esbuild.build({
      entryPoints: { webview: join(ROOT, 'webview/main.ts') }, bundle: true, platform: 'browser', format: 'iife',
      target: 'es2022', outdir: join(ROOT, 'dist'), loader: { '.css': 'text' }, sourcemap: 'linked',
      logLevel: 'warning', legalComments: 'none',
    });
  }
  return BUNDLE;
}

function newestMtime(dir: string): number {
  let newest = 0;
  for (const entry of readdirSync(dir, { withFileTypes: true })) {
    const p = join(dir, entry.name);
    newest = Math.max(newest, entry.isDirectory() ? newestMtime(p) : statSync(p).mtimeMs);
  }
  return newest;
}

/**
 * Headless Chromium as root on a machine without a GPU and without network: no sandbox (root),
 * no GPU process, and none of the background fetches (QUIC, updates, sync) that would reach out.
 */
export const CHROMIUM_ARGS = ['--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run',
  '--disable-background-networking', '--disable-component-update', '--disable-sync'];

export function launch(): Promise<Browser> {
  return chromium.launch({ executablePath: '/usr/bin/chromium', headless: true, args: CHROMIUM_ARGS });
}

export type ThemeKind = 'light' | 'dark' | 'high-contrast';

/** The variables a VS Code theme sets (values of the default Light+, Dark+ and High Contrast
 *  themes, as VS Code defines them); the light and dark sets are the HTML report's own. */
export const THEMES: Record<ThemeKind, { bodyClass: string; vars: Record<string, string> }> = {
  light: { bodyClass: 'vscode-light', vars: REPORT_THEME_LIGHT },
  dark: { bodyClass: 'vscode-dark', vars: REPORT_THEME_DARK },
  'high-contrast': {
    bodyClass: 'vscode-high-contrast',
    vars: {
      ...REPORT_THEME_DARK,
      '--vscode-foreground': '#ffffff', '--vscode-editor-foreground': '#ffffff', '--vscode-editor-background': '#000000',
      '--vscode-descriptionForeground': '#ffffff', '--vscode-contrastBorder': '#6fc3df', '--vscode-contrastActiveBorder': '#f38518',
      '--vscode-focusBorder': '#f38518', '--vscode-panel-border': '#6fc3df', '--vscode-list-hoverBackground': '#00000000',
      '--vscode-list-activeSelectionBackground': '#00000000', '--vscode-list-activeSelectionForeground': '#ffffff',
      '--vscode-charts-foreground': '#ffffff', '--vscode-charts-lines': '#ffffff80', '--vscode-charts-blue': '#3794ff',
      '--vscode-charts-red': '#f48771', '--vscode-charts-orange': '#d18616', '--vscode-badge-background': '#000000',
      '--vscode-badge-foreground': '#ffffff', '--vscode-textBlockQuote-background': '#000000',
    },
  },
};

/** Apply a theme the way VS Code does: variables on <html>'s style, a class on <body>. */
export async function applyTheme(page: Page, kind: ThemeKind): Promise<void> {
  const theme = THEMES[kind];
  await page.evaluate(({ vars, bodyClass }) => {
    for (const [k, v] of Object.entries(vars)) document.documentElement.style.setProperty(k, v);
    document.body.classList.remove('vscode-light', 'vscode-dark', 'vscode-high-contrast');
    document.body.classList.add(bodyClass);
    document.body.dataset.vscodeThemeKind = bodyClass;
  }, theme);
}

/** Writes the shell page next to the test output and returns its file URL. */
export function writePanelPage(): string {
  mkdirSync(OUT, { recursive: true });
  const file = join(OUT, 'panel.html');
  writeFileSync(file, panelShellHtml({
    scriptUri: pathToFileURL(BUNDLE).toString(), cspSource: 'file:', nonce: randomBytes(18).toString('base64'),
  }));
  return pathToFileURL(file).toString();
}

export interface PageProbe {
  errors: string[];
}

/** Collects console errors, page errors and CSP violations; stands in for acquireVsCodeApi. */
export async function instrument(page: Page, initialState?: unknown): Promise<PageProbe> {
  const probe: PageProbe = { errors: [] };
  page.on('console', (m) => { if (m.type() === 'error') probe.errors.push(`console: ${m.text()}`); });
  page.on('pageerror', (e) => probe.errors.push(`pageerror: ${e.message}`));
  await page.addInitScript((state) => {
    const w = window as unknown as Record<string, unknown>;
    const posted: unknown[] = [];
    let saved: unknown = state;
    w.__posted = posted;
    w.__violations = [];
    document.addEventListener('securitypolicyviolation', (e) => (w.__violations as string[]).push(`${e.violatedDirective} ${e.blockedURI}`));
    w.acquireVsCodeApi = () => ({
      postMessage: (m: unknown) => posted.push(m),
      getState: () => saved,
      // VS Code keeps webview state as JSON: so does this stand-in.
      setState: (s: unknown) => { saved = JSON.parse(JSON.stringify(s)); w.__saved = saved; },
    });
  }, initialState);
  return probe;
}

/** Poll a condition in Node until it holds or the deadline passes (no fixed sleeps). */
export async function until<T>(what: string, probe: () => Promise<T | undefined | false>, timeoutMs = 10_000): Promise<T> {
  const deadline = Date.now() + timeoutMs;
  let last: unknown;
  while (Date.now() < deadline) {
    try {
      const v = await probe();
      if (v !== undefined && v !== false) return v;
    } catch (e) {
      last = e;
    }
    await new Promise((r) => setImmediate(r));
  }
  throw new Error(`timed out waiting for ${what}${last ? `: ${String(last)}` : ''}`);
}

/** Non-transparent pixels of every canvas in `selector` (uPlot draws on a transparent canvas),
 *  and how many of them are close to `rgb` (the series colour). */
export async function canvasInk(page: Page, selector: string, rgb?: [number, number, number]): Promise<{ canvases: number; inked: number; colour: number }[]> {
  return page.$$eval(`${selector} canvas`, (canvases, target) => canvases.map((c) => {
    const canvas = c as HTMLCanvasElement;
    const ctx = canvas.getContext('2d');
    if (!ctx || canvas.width === 0 || canvas.height === 0) return { canvases: 1, inked: 0, colour: 0 };
    const data = ctx.getImageData(0, 0, canvas.width, canvas.height).data;
    let inked = 0;
    let colour = 0;
    for (let i = 0; i < data.length; i += 4) {
      if (data[i + 3] > 0) inked++;
      if (target && data[i + 3] > 200 && Math.abs(data[i] - target[0]) < 8 && Math.abs(data[i + 1] - target[1]) < 8 && Math.abs(data[i + 2] - target[2]) < 8) colour++;
    }
    return { canvases: 1, inked, colour };
  }), rgb);
}

export function hexToRgb(hex: string): [number, number, number] {
  const m = /^#([0-9a-f]{2})([0-9a-f]{2})([0-9a-f]{2})/i.exec(hex);
  if (!m) throw new Error(`not a hex colour: ${hex}`);
  return [parseInt(m[1], 16), parseInt(m[2], 16), parseInt(m[3], 16)];
}

export function ensureDir(file: string): string {
  mkdirSync(dirname(file), { recursive: true });
  return file;
}

/** SI prefixes (SI Brochure, 9th ed., Table 7) for reading numbers back from the page. */
const PREFIX: Record<string, number> = { p: 1e-12, n: 1e-9, 'µ': 1e-6, m: 1e-3, '': 1, k: 1e3, M: 1e6, G: 1e9, T: 1e12 };

/** "40.12 µA" → 4.012e-5 (with the unit checked); "+0.3 %" → 0.003. */
export function readSI(text: string, unit: string): number {
  const t = text.trim();
  if (unit === '%') {
    const m = /^([+-]?\d+(?:\.\d+)?(?:e[+-]?\d+)?) %$/.exec(t);
    if (!m) throw new Error(`not a percentage: "${text}"`);
    return Number(m[1]) / 100;
  }
  const m = new RegExp(`^([+-]?\\d+(?:\\.\\d+)?(?:e[+-]?\\d+)?) ?([pnµmkMGT]?)${unit}$`).exec(t);
  if (!m) throw new Error(`not a value in ${unit}: "${text}"`);
  return Number(m[1]) * PREFIX[m[2]];
}
