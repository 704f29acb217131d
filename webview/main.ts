/**
 * Entry of the panel page (bundled to dist/webview.js). Inside VS Code it talks to the host by
 * postMessage; inside the self-contained HTML report it reads the embedded report instead.
 * Everything it shows comes from the core's report: this file only wires messages, state and
 * rendering together.
 */
import css from './styles.css';
import uplotCss from 'uplot/dist/uPlot.min.css';
import { SCHEMATIC_CSS } from '../src/core/schematic/draw';
import { NETWORK_TREE_CSS } from '../src/core/network-tree/draw';
import type { Range } from '../src/core/types';
import { REPORT_DATA_ID, STATIC_ID, parseEmbeddedReport } from '../src/core/report/html';
import { describeMessage, fromWire, isFileReport, isHostMessage, type PageMessage } from '../src/protocol/messages';
import { registerComponents } from './components';
import type { PlotHandle } from './plots';
import { renderPage, type RenderContext } from './render';
import { applyHostMessage, fromPersisted, initialState, selectMirror, toPersisted, type PanelState } from './state';
import { CAUTION } from '../src/core/text/format';

interface VsCodeApi {
  postMessage(message: PageMessage): void;
  getState(): unknown;
  setState(state: unknown): void;
}

const vscodeGlobal = globalThis as unknown as { acquireVsCodeApi?: () => VsCodeApi };

function adoptStyles(): void {
  // Constructed stylesheets need no 'unsafe-inline' under the panel's CSP.
  const sheets = [uplotCss, css, SCHEMATIC_CSS, NETWORK_TREE_CSS].map((text) => {
    const sheet = new CSSStyleSheet();
    sheet.replaceSync(text);
    return sheet;
  });
  document.adoptedStyleSheets = [...document.adoptedStyleSheets, ...sheets];
}

function ensure(id: string, tag: string, before?: Node | null): HTMLElement {
  const existing = document.getElementById(id);
  if (existing) return existing;
  const el = document.createElement(tag);
  el.id = id;
  document.body.insertBefore(el, before ?? null);
  return el;
}

function boot(): void {
  adoptStyles();
  registerComponents();
  const caution = ensure('qpoint-caution', 'div', document.body.firstChild);
  caution.className = 'caution';
  caution.setAttribute('role', 'note');
  caution.textContent = CAUTION;
  const root = ensure('qpoint-root', 'main');
  const status = ensure('qpoint-status', 'div');
  status.className = 'visually-hidden';
  status.setAttribute('role', 'status');

  const embedded = document.getElementById(REPORT_DATA_ID);
  if (embedded) bootReport(root, embedded.textContent ?? '');
  else bootPanel(root, status);
}

/** The HTML report: every mirror, no host. */
function bootReport(root: HTMLElement, json: string): void {
  let report: unknown;
  try {
    report = parseEmbeddedReport(json);
  } catch {
    report = undefined;
  }
  const state: PanelState = isFileReport(report)
    ? { version: 0, report, selected: report.mirrors[0]?.name }
    : { ...initialState, notice: 'This report file is damaged: its embedded data could not be read.' };
  const dark = globalThis.matchMedia?.('(prefers-color-scheme: dark)');
  const ctx: RenderContext = { mode: 'report', onSelect: () => undefined, onReveal: () => undefined };
  let plots: PlotHandle[] = [];
  const draw = () => {
    document.body.classList.toggle('vscode-dark', dark?.matches === true);
    document.body.classList.toggle('vscode-light', dark?.matches !== true);
    for (const p of plots) p.destroy();  // new theme colours: rebuild every plot
    plots = renderPage(root, state, ctx);
  };
  dark?.addEventListener('change', draw);
  draw();
  // The live view replaces the static body on screen; printing still uses the static one.
  const stat = document.getElementById(STATIC_ID);
  if (stat && isFileReport(report)) stat.hidden = true;
  document.body.dataset.qpointReady = 'true';
}

/** The live panel. */
function bootPanel(root: HTMLElement, status: HTMLElement): void {
  const api = vscodeGlobal.acquireVsCodeApi?.();
  let state = fromPersisted(api?.getState());
  let plots: PlotHandle[] = [];

  const log = (level: 'error' | 'warning' | 'info', message: string) => api?.postMessage({ type: 'log', level, message });
  globalThis.addEventListener('error', (e) => log('error', `panel: ${e.message}`));
  globalThis.addEventListener('unhandledrejection', (e) => log('error', `panel: ${String(e.reason)}`));

  const ctx: RenderContext = {
    mode: 'panel',
    onSelect(name) {
      update(selectMirror(state, name));
    },
    onReveal(range: Range) {
      if (state.uri) api?.postMessage({ type: 'reveal', uri: state.uri, range });
    },
    onRunMonteCarlo() {
      if (state.uri) api?.postMessage({ type: 'runMonteCarlo', uri: state.uri });
    },
  };

  /** `rebuild` after a theme switch: canvas colours are fixed when a plot is built. */
  const draw = (rebuild = false) => {
    if (rebuild) for (const p of plots.splice(0)) p.destroy();
    plots = renderPage(root, state, ctx, plots);
    document.body.dataset.qpointVersion = String(state.version);
    const r = state.report;
    const aside = r?.withheld?.length ? `, ${r.withheld.length} set aside until their errors are fixed` : '';
    status.textContent = r ? `${r.mirrors.length} mirrors${aside}, ${r.findings.filter((f) => f.severity === 'error').length} errors` : (state.notice ?? '');
  };

  function update(next: PanelState): void {
    if (next === state) return;
    state = next;
    api?.setState(toPersisted(state));
    draw();
  }

  globalThis.addEventListener('message', (event: MessageEvent) => {
    const message: unknown = fromWire(event.data);
    if (!isHostMessage(message)) {
      log('warning', `panel ignored a malformed message: ${describeMessage(message)}`);
      return;
    }
    update(applyHostMessage(state, message));
  });

  // The theme's colours reach the canvas only when a plot is rebuilt: redraw on a theme switch
  // (VS Code changes the body class and the variables on <html>).
  let pending = 0;
  const observer = new MutationObserver(() => {
    cancelAnimationFrame(pending);
    pending = requestAnimationFrame(() => draw(true));
  });
  observer.observe(document.body, { attributes: true, attributeFilter: ['class'] });
  observer.observe(document.documentElement, { attributes: true, attributeFilter: ['style', 'class'] });

  draw();
  document.body.dataset.qpointReady = 'true';
  api?.postMessage({ type: 'ready' });
}

boot();
