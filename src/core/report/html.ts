/**
 * The self-contained HTML report: one file with the panel's tables and plots for design reviews
 * and CI artifacts. Its body is static HTML — tables, and plots as inline SVG (static-html.ts) —
 * so it reads without JavaScript, prints and archives, and states the tool version, the date and
 * a hash of the input. With scripts on, the panel's own bundle (dist/webview.js, inlined) finds
 * the report as JSON in a `<script type="application/json">` element and shows the interactive
 * view on screen instead; printing always uses the static body. No network at all: the
 * Content-Security-Policy forbids every fetch.
 *
 * Pure core: no Node, no DOM. The caller (CLI, extension) reads the bundle and writes the file.
 */
import { CAUTION } from '../text/format';
import type { FileReport } from '../types';
import { renderStaticReport, type ReportStamp } from './static-html';
import { SCHEMATIC_CSS, type Schematic } from '../schematic';
import { NETWORK_TREE_CSS, type LaidTree } from '../network-tree';

export type { ReportStamp } from './static-html';

/** Id of the static body; the page script hides it on screen once it has drawn the live view. */
export const STATIC_ID = 'qpoint-static';

/** Id of the data element the page script reads. */
export const REPORT_DATA_ID = 'qpoint-report-data';


/** One complete HTML page. `assets.script` is the panel bundle's text; `assets.css` optional
 *  extra styles (the bundle carries its own); `stamp` what the page says about its making;
 *  `schematics` each output's drawing by name (`schematicsOf`, laid out beforehand). */
export function renderHtmlReport(report: FileReport, assets: { script: string; css?: string }, stamp?: ReportStamp, schematics?: ReadonlyMap<string, Schematic>, trees?: readonly LaidTree[]): string {
  const title = `qpoint report — ${report.title ?? baseName(report.file)}`;
  return [
    '<!DOCTYPE html>',
    '<html lang="en">',
    '<head>',
    '<meta charset="utf-8">',
    // No network: nothing may be fetched, inline script and styles only, images as data: URLs.
    `<meta http-equiv="Content-Security-Policy" content="default-src 'none'; script-src 'unsafe-inline'; style-src 'unsafe-inline'; img-src data:; font-src data:">`,
    '<meta name="viewport" content="width=device-width, initial-scale=1">',
    `<meta name="generator" content="${escapeHtml(stamp ? `qpoint ${stamp.version}` : 'qpoint')}">`,
    ...(stamp ? [`<meta name="date" content="${escapeHtml(stamp.date)}">`, `<meta name="qpoint-input" content="${escapeHtml(stamp.inputHash)}">`] : []),
    `<title>${escapeHtml(title)}</title>`,
    `<style>${escapeStyle(REPORT_THEME)}${assets.css ? `\n${escapeStyle(assets.css)}` : ''}</style>`,
    '</head>',
    '<body class="vscode-light qpoint-report">',
    `<div id="qpoint-caution" class="caution" role="note">${escapeHtml(CAUTION)}</div>`,
    `<div id="${STATIC_ID}">${renderStaticReport(report, stamp, schematics, trees)}</div>`,
    '<main id="qpoint-root"></main>',
    `<script type="application/json" id="${REPORT_DATA_ID}">${embedReportJson(report)}</script>`,
    `<script>${escapeScript(withoutSourceMap(assets.script))}</script>`,
    '</body>',
    '</html>',
    '',
  ].join('\n');
}

// ───────────────────────────── embedded data ─────────────────────────────

/** Tag for numbers JSON cannot hold: an ideal Rout is Infinity, an unmeasured figure NaN. */
const NUMBER_TAG = '$qpointNumber';

/** The report as JSON that is safe inside a `<script>` element: non-finite numbers tagged, and
 *  `<`, `>`, `&`, U+2028/U+2029 escaped so no `</script>` or `<!--` can end or alter it. */
export function embedReportJson(report: FileReport): string {
  const json = JSON.stringify(report, (_key, value: unknown) =>
    typeof value === 'number' && !Number.isFinite(value) ? { [NUMBER_TAG]: String(value) } : value);
  return json.replace(/[<>&\u2028\u2029]/g, (c) => `\\u${c.charCodeAt(0).toString(16).padStart(4, '0')}`);
}

/** Inverse of embedReportJson (the page calls it); not validated here — the caller guards. */
export function parseEmbeddedReport(text: string): unknown {
  return JSON.parse(text, (_key, value: unknown) => {
    if (typeof value === 'object' && value !== null && !Array.isArray(value)) {
      const keys = Object.keys(value);
      const tagged = (value as Record<string, unknown>)[NUMBER_TAG];
      if (keys.length === 1 && typeof tagged === 'string') return Number(tagged);
    }
    return value;
  });
}

// ───────────────────────────── escaping ─────────────────────────────

const HTML_ENTITIES: Record<string, string> = { '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' };

function escapeHtml(text: string): string {
  return text.replace(/[&<>"']/g, (c) => HTML_ENTITIES[c] ?? c);
}

/** The bundle's source-map comment names a file beside the bundle, which a saved page has not. */
function withoutSourceMap(code: string): string {
  return code.replace(/\n\/\/# sourceMappingURL=[^\n]*\s*$/, '\n');
}

/** Inline script text cannot contain `</script` (it would end the element) or `<!--` (it
 *  switches the parser into an escaped state). In JavaScript source both only occur in strings,
 *  regular expressions or comments, where `<\/` and `<\!` mean the same characters. */
export function escapeScript(code: string): string {
  return code.replace(/<\/(script)/gi, '<\\/$1').replace(/<!--/g, '<\\!--');
}

function escapeStyle(css: string): string {
  return css.replace(/<\/(style)/gi, '<\\/$1');
}

function baseName(file: string): string {
  return file.split(/[\\/]/).pop() ?? file;
}

// ───────────────────────────── theme ─────────────────────────────

/** Outside VS Code nobody supplies the `--vscode-*` variables the page is styled with, so the
 *  report defines them: VS Code's default light theme, and its dark theme when the reader's
 *  system prefers dark. Printing uses the light set. */
export const REPORT_THEME_LIGHT: Record<string, string> = {
  '--vscode-font-family': '-apple-system, BlinkMacSystemFont, "Segoe UI", Ubuntu, "Droid Sans", sans-serif',
  '--vscode-font-size': '13px',
  '--vscode-font-weight': 'normal',
  '--vscode-editor-font-family': 'Menlo, Monaco, Consolas, "Droid Sans Mono", "Courier New", monospace',
  '--vscode-foreground': '#616161',
  '--vscode-editor-foreground': '#3b3b3b',
  '--vscode-editor-background': '#ffffff',
  '--vscode-descriptionForeground': '#717171',
  '--vscode-errorForeground': '#a1260d',
  '--vscode-editorError-foreground': '#e51400',
  '--vscode-editorWarning-foreground': '#bf8803',
  '--vscode-editorInfo-foreground': '#1a85ff',
  '--vscode-testing-iconPassed': '#388a34',
  '--vscode-focusBorder': '#0090f1',
  '--vscode-panel-border': '#e5e5e5',
  '--vscode-widget-border': '#d4d4d4',
  '--vscode-list-hoverBackground': '#f0f0f0',
  '--vscode-list-activeSelectionBackground': '#e4e6f1',
  '--vscode-list-activeSelectionForeground': '#000000',
  '--vscode-textLink-foreground': '#006ab1',
  '--vscode-textLink-activeForeground': '#006ab1',
  '--vscode-textBlockQuote-background': '#f2f2f2',
  '--vscode-textBlockQuote-border': '#007acc80',
  '--vscode-textCodeBlock-background': '#dcdcdc66',
  '--vscode-badge-background': '#c4c4c4',
  '--vscode-badge-foreground': '#333333',
  '--vscode-button-background': '#007acc',
  '--vscode-button-foreground': '#ffffff',
  '--vscode-button-hoverBackground': '#0062a3',
  '--vscode-button-secondaryBackground': '#5f6a79',
  '--vscode-button-secondaryForeground': '#ffffff',
  '--vscode-button-secondaryHoverBackground': '#4c5561',
  '--vscode-charts-foreground': '#616161',
  '--vscode-charts-lines': '#61616180',
  '--vscode-charts-red': '#e51400',
  '--vscode-charts-blue': '#1a85ff',
  '--vscode-charts-yellow': '#bf8803',
  '--vscode-charts-orange': '#d18616',
  '--vscode-charts-green': '#388a34',
  '--vscode-charts-purple': '#652d90',
};

export const REPORT_THEME_DARK: Record<string, string> = {
  ...REPORT_THEME_LIGHT,
  '--vscode-foreground': '#cccccc',
  '--vscode-editor-foreground': '#d4d4d4',
  '--vscode-editor-background': '#1e1e1e',
  '--vscode-descriptionForeground': '#ccccccb3',
  '--vscode-errorForeground': '#f48771',
  '--vscode-editorError-foreground': '#f14c4c',
  '--vscode-editorWarning-foreground': '#cca700',
  '--vscode-editorInfo-foreground': '#3794ff',
  '--vscode-testing-iconPassed': '#73c991',
  '--vscode-focusBorder': '#007fd4',
  '--vscode-panel-border': '#80808059',
  '--vscode-widget-border': '#303031',
  '--vscode-list-hoverBackground': '#2a2d2e',
  '--vscode-list-activeSelectionBackground': '#04395e',
  '--vscode-list-activeSelectionForeground': '#ffffff',
  '--vscode-textLink-foreground': '#3794ff',
  '--vscode-textLink-activeForeground': '#3794ff',
  '--vscode-textBlockQuote-background': '#222222',
  '--vscode-textBlockQuote-border': '#007acc80',
  '--vscode-textCodeBlock-background': '#0a0a0a66',
  '--vscode-badge-background': '#4d4d4d',
  '--vscode-badge-foreground': '#ffffff',
  '--vscode-button-background': '#0e639c',
  '--vscode-button-hoverBackground': '#1177bb',
  '--vscode-button-secondaryBackground': '#3a3d41',
  '--vscode-button-secondaryHoverBackground': '#45494e',
  '--vscode-charts-foreground': '#cccccc',
  '--vscode-charts-lines': '#cccccc80',
  '--vscode-charts-red': '#f14c4c',
  '--vscode-charts-blue': '#3794ff',
  '--vscode-charts-yellow': '#cca700',
  '--vscode-charts-orange': '#d18616',
  '--vscode-charts-green': '#89d185',
  '--vscode-charts-purple': '#b180d7',
};

function declarations(vars: Record<string, string>): string {
  return Object.entries(vars).map(([k, v]) => `${k}: ${v};`).join(' ');
}

const REPORT_THEME = [
  `:root { ${declarations(REPORT_THEME_LIGHT)} }`,
  `@media screen and (prefers-color-scheme: dark) { :root { ${declarations(REPORT_THEME_DARK)} } }`,
  'body { margin: 0 auto; max-width: 1200px; background: var(--vscode-editor-background); }',
  // The static body (no script, print): plain tables in the theme's colours.
  `#${STATIC_ID} { color: var(--vscode-editor-foreground); font: var(--vscode-font-size) var(--vscode-font-family); padding: 0 16px; }`,
  `#${STATIC_ID} table.static { border-collapse: collapse; margin: 8px 0 16px; }`,
  `#${STATIC_ID} table.static caption { text-align: left; font-weight: 600; padding: 4px 0; }`,
  `#${STATIC_ID} table.static th, #${STATIC_ID} table.static td { border-bottom: 1px solid var(--vscode-panel-border); padding: 2px 8px; text-align: left; vertical-align: top; }`,
  `#${STATIC_ID} .bad, #${STATIC_ID} .severity-error { color: var(--vscode-errorForeground); font-weight: 600; }`,
  `#${STATIC_ID} .severity-warning { color: var(--vscode-editorWarning-foreground); }`,
  `#${STATIC_ID} .stamp { color: var(--vscode-descriptionForeground); }`,
  `#${STATIC_ID} svg { max-width: 100%; height: auto; margin: 4px 16px 8px 0; }`,
  `#${STATIC_ID} section { break-inside: avoid-page; }`,
  `#${STATIC_ID} .figures-schematic { display: flex; flex-wrap: wrap; gap: 0 24px; align-items: flex-start; }`,
  `#${STATIC_ID} .schematic-figure { margin: 8px 0 16px; }`,
  `#${STATIC_ID} .schematic-figure figcaption { color: var(--vscode-descriptionForeground); font-size: 90%; }`,
  SCHEMATIC_CSS,
  // A tree wider than the page scrolls on screen and shrinks to the page when printed (paper
  // clips what overflows it).
  `#${STATIC_ID} .network-figure { margin: 8px 0 16px; overflow-x: auto; }`,
  `#${STATIC_ID} .network-figure figcaption { color: var(--vscode-descriptionForeground); font-size: 90%; }`,
  `#${STATIC_ID} svg.net-tree { max-width: none; }`,
  NETWORK_TREE_CSS,
  // Printing and archiving use the static body, whatever the script drew on screen.
  `@media print { #${STATIC_ID} { display: block !important; } #qpoint-root { display: none !important; } #${STATIC_ID} .network-figure { overflow: visible; } #${STATIC_ID} svg.net-tree { max-width: 100%; height: auto; } }`,
].join('\n');
