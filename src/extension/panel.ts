/**
 * The bias panel's controller: one webview panel beside the editor that follows the active bias
 * spec, sends it each finished report, and reveals in the editor whatever the designer clicks.
 * No physics here — the report comes from the analysis manager through `PanelSource`.
 */
import * as vscode from 'vscode';
import { randomBytes } from 'node:crypto';
import type { FileReport } from '../core/types';
import { describeMessage, isPageMessage, toWire, type HostMessage, type PageMessage } from '../protocol/messages';
import { panelShellHtml } from '../../webview/shell';
import { RUN_MONTE_CARLO_COMMAND } from './monteCarlo';

export interface PanelSource {
  current(): { uri: vscode.Uri; report: FileReport } | undefined;
  onDidUpdate: vscode.Event<{ uri: vscode.Uri; report: FileReport }>;
}

/** Webview type; package.json needs `onWebviewPanel:qpoint.biasPanel` so a restored panel
 *  activates the extension after a reload. */
export const PANEL_VIEW_TYPE = 'qpoint.biasPanel';
const TITLE = 'qpoint: Bias';

export function registerPanel(context: vscode.ExtensionContext, source: PanelSource): { show(): void } {
  const log = vscode.window.createOutputChannel('qpoint panel', { log: true });
  context.subscriptions.push(log);
  let controller: PanelController | undefined;

  const adopt = (panel: vscode.WebviewPanel) => {
    controller?.dispose();
    const c = new PanelController(panel, context.extensionUri, source, log);
    c.onDispose(() => { if (controller === c) controller = undefined; });
    controller = c;
  };

  context.subscriptions.push(
    vscode.window.registerWebviewPanelSerializer(PANEL_VIEW_TYPE, {
      async deserializeWebviewPanel(panel: vscode.WebviewPanel, _state: unknown) {
        // The page restores its own last view from getState(); the host then sends the current report.
        adopt(panel);
      },
    }),
    { dispose: () => controller?.dispose() },
  );

  return {
    show() {
      if (controller) {
        controller.reveal();
        return;
      }
      const panel = vscode.window.createWebviewPanel(PANEL_VIEW_TYPE, TITLE,
        { viewColumn: vscode.ViewColumn.Beside, preserveFocus: true }, panelOptions(context.extensionUri));
      adopt(panel);
    },
  };
}

/** Scripts on; the page may load files from the extension's dist/ folder and nothing else. */
function webviewOptions(extensionUri: vscode.Uri): vscode.WebviewOptions {
  return { enableScripts: true, localResourceRoots: [vscode.Uri.joinPath(extensionUri, 'dist')] };
}

function panelOptions(extensionUri: vscode.Uri): vscode.WebviewPanelOptions & vscode.WebviewOptions {
  // The page restores from getState() when shown again: no need to keep it alive while hidden.
  return { ...webviewOptions(extensionUri), retainContextWhenHidden: false };
}

class PanelController {
  private readonly disposables: vscode.Disposable[] = [];
  private readonly disposeListeners: (() => void)[] = [];
  private shownUri: string | undefined;
  /** The last report sent, resent when the page reloads (it is not kept alive while hidden). */
  private shown: { uri: vscode.Uri; report: FileReport } | undefined;
  /** Rises with every report sent; the page drops a report older than the one it shows. */
  private version = 0;
  private ready = false;
  private disposed = false;
  /** A post VS Code has not yet delivered, and the message to send after it: every message
   *  replaces the page's whole state (a report, or none), so while one is on its way only the
   *  latest waiting one matters. Posting copies the whole report (1.4 MB on a 500-mirror spec);
   *  typing faster than posts land would otherwise queue one copy per keystroke. */
  private posting = false;
  private waiting: HostMessage | undefined;

  constructor(
    private readonly panel: vscode.WebviewPanel,
    extensionUri: vscode.Uri,
    private readonly source: PanelSource,
    private readonly log: vscode.LogOutputChannel,
  ) {
    const webview = panel.webview;
    webview.options = webviewOptions(extensionUri);
    webview.html = panelShellHtml({
      scriptUri: webview.asWebviewUri(vscode.Uri.joinPath(extensionUri, 'dist', 'webview.js')).toString(),
      cspSource: webview.cspSource,
      nonce: randomBytes(18).toString('base64'),
    });
    this.disposables.push(
      panel.onDidDispose(() => this.dispose()),
      webview.onDidReceiveMessage((m: unknown) => this.receive(m)),
      source.onDidUpdate((e) => this.onUpdate(e.uri, e.report)),
      vscode.window.onDidChangeActiveTextEditor(() => this.followActive()),
      vscode.workspace.onDidCloseTextDocument((doc) => {
        if (doc.uri.toString() === this.shownUri) this.clear('The bias spec shown here was closed.');
      }),
    );
  }

  onDispose(listener: () => void): void {
    this.disposeListeners.push(listener);
  }

  reveal(): void {
    this.panel.reveal(undefined, true);
    this.followActive();
  }

  /** A new report: show it if it is the active spec's, or an update of the one shown. */
  private onUpdate(uri: vscode.Uri, report: FileReport): void {
    const key = uri.toString();
    const active = this.source.current();
    if (key === this.shownUri || active?.uri.toString() === key) this.sendReport(uri, report);
  }

  private followActive(): void {
    const current = this.source.current();
    if (current && current.uri.toString() !== this.shownUri) this.sendReport(current.uri, current.report);
  }

  private sendReport(uri: vscode.Uri, report: FileReport): void {
    this.shownUri = uri.toString();
    this.shown = { uri, report };
    this.panel.title = `${TITLE} — ${report.title ?? baseName(uri)}`;
    this.post({ type: 'report', uri: this.shownUri, report, version: ++this.version });
  }

  private clear(message: string): void {
    this.shownUri = undefined;
    this.shown = undefined;
    this.panel.title = TITLE;
    this.post({ type: 'clear', message });
  }

  private post(message: HostMessage): void {
    if (this.disposed || !this.ready) return;  // the page asks with `ready` and gets the latest then
    if (this.posting) {
      this.waiting = message;
      return;
    }
    let sent: Thenable<boolean>;
    try {
      sent = this.panel.webview.postMessage(toWire(message));
    } catch (err) {
      this.log.warn(`could not post ${message.type} to the panel: ${String(err)}`);
      return;
    }
    this.posting = true;
    void Promise.resolve(sent).catch((err: unknown) => this.log.warn(`could not post ${message.type} to the panel: ${String(err)}`)).then(() => {
      this.posting = false;
      const next = this.waiting;
      this.waiting = undefined;
      if (next) this.post(next);
    });
  }

  private receive(message: unknown): void {
    if (!isPageMessage(message)) {
      this.log.warn(`rejected a malformed message from the panel: ${describeMessage(message)}`);
      return;
    }
    this.handle(message);
  }

  private handle(message: PageMessage): void {
    switch (message.type) {
      case 'ready': {
        this.ready = true;
        const current = this.source.current() ?? this.shown;
        if (current) this.sendReport(current.uri, current.report);
        else this.post({ type: 'clear' });
        return;
      }
      case 'reveal':
        void this.revealInEditor(message.uri, message.range);
        return;
      case 'log':
        this.log[message.level === 'warning' ? 'warn' : message.level](message.message);
        return;
      case 'runMonteCarlo':
        // Only the spec this panel shows, as for reveal.
        if (message.uri !== this.shownUri) {
          this.log.warn(`ignored a Monte Carlo request for ${message.uri}: the panel shows ${this.shownUri ?? 'nothing'}`);
          return;
        }
        void vscode.commands.executeCommand(RUN_MONTE_CARLO_COMMAND, { uri: vscode.Uri.parse(message.uri, true) });
        return;
    }
  }

  private async revealInEditor(uriText: string, range: { start: { line: number; character: number }; end: { line: number; character: number } }): Promise<void> {
    // Only the spec this panel shows: the page cannot make the host open other files.
    if (uriText !== this.shownUri) {
      this.log.warn(`ignored a reveal for ${uriText}: the panel shows ${this.shownUri ?? 'nothing'}`);
      return;
    }
    const uri = vscode.Uri.parse(uriText, true);
    const selection = new vscode.Range(range.start.line, range.start.character, range.end.line, range.end.character);
    const visible = vscode.window.visibleTextEditors.find((e) => e.document.uri.toString() === uriText);
    try {
      const editor = await vscode.window.showTextDocument(uri, {
        selection, viewColumn: visible?.viewColumn ?? vscode.ViewColumn.One, preserveFocus: false,
      });
      editor.revealRange(selection, vscode.TextEditorRevealType.InCenterIfOutsideViewport);
    } catch (err) {
      this.log.error(`could not reveal ${uriText}: ${String(err)}`);
    }
  }

  dispose(): void {
    if (this.disposed) return;
    this.disposed = true;
    for (const d of this.disposables.splice(0)) d.dispose();
    this.panel.dispose();
    for (const l of this.disposeListeners.splice(0)) l();
  }
}

function baseName(uri: vscode.Uri): string {
  return uri.path.split('/').pop() ?? uri.toString();
}
