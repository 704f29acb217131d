/**
 * Entry point: wires the analysis worker, the live diagnostics, the providers, the status bar,
 * the panel and the commands together. Everything registered goes into context.subscriptions.
 */
import * as vscode from 'vscode';
import { AnalysisManager } from './analysisManager';
import { WorkerAnalyzer } from './analyzer';
import type { QpointApi } from './api';
import { checkWorkspace, exportReport, fixAllInEditor, type CommandContext } from './commands';
import { MonteCarloCommand, RUN_MONTE_CARLO_COMMAND } from './monteCarlo';
import { registerPanel } from './panel';
import { OPEN_PANEL_COMMAND, registerProviders } from './providers';
import { registerStatusBar } from './statusBar';
import { SpecDiagnostics } from './specDiagnostics';

export function activate(context: vscode.ExtensionContext): QpointApi {
  const t0 = performance.now();
  const log = vscode.window.createOutputChannel('qpoint', { log: true });
  const diagnostics = new SpecDiagnostics();
  const analyzer = new WorkerAnalyzer(vscode.Uri.joinPath(context.extensionUri, 'dist', 'worker.js').fsPath,
    { log: (m) => log.warn(m) });
  const manager = new AnalysisManager(analyzer, diagnostics, log);
  // Monte Carlo gets a thread of its own: no job time limit, and cancelling it (terminating
  // the thread) leaves the live analysis untouched.
  const mcAnalyzer = new WorkerAnalyzer(vscode.Uri.joinPath(context.extensionUri, 'dist', 'worker.js').fsPath,
    { jobTimeoutMs: 0, log: (m) => log.warn(m) });
  const monteCarlo = new MonteCarloCommand({ manager, analyzer: mcAnalyzer, log });
  context.subscriptions.push(log, diagnostics, { dispose: () => analyzer.dispose() }, manager,
    monteCarlo, { dispose: () => mcAnalyzer.dispose() });

  const panel = registerPanel(context, manager);
  const c: CommandContext = { extensionUri: context.extensionUri, version: String((context.extension.packageJSON as { version?: unknown }).version ?? 'unknown'), manager, analyzer, diagnostics, log };
  context.subscriptions.push(
    ...registerProviders(manager, analyzer),
    ...registerStatusBar(manager),
    vscode.commands.registerCommand(OPEN_PANEL_COMMAND, () => panel.show()),
    vscode.commands.registerCommand(RUN_MONTE_CARLO_COMMAND, (arg?: unknown) => monteCarlo.run(arg)),
    vscode.commands.registerCommand('qpoint.checkWorkspace', () => checkWorkspace(c)),
    vscode.commands.registerCommand('qpoint.fixAll', () => fixAllInEditor(c)),
    // Menus pass the editor's resource Uri as first argument: only `{ target: Uri }` (scripts,
    // tests) skips the save dialog, so a click can never overwrite the spec itself.
    vscode.commands.registerCommand('qpoint.exportReport', (arg?: unknown) =>
      exportReport(c, exportTarget(arg))),
  );

  const activationMs = performance.now() - t0;
  log.info(`activated in ${activationMs.toFixed(1)} ms`);
  return {
    analysisCount: () => manager.count,
    lastReport: (uri) => manager.reportFor(uri),
    activationMs,
    lastAnalysisMs: () => analyzer.lastJobMs,
    lastTiming: (uri) => manager.timingFor(uri),
    onDidUpdate: manager.onDidUpdate,
    monteCarloBusy: () => monteCarlo.busy(),
    monteCarloProgress: () => monteCarlo.progress(),
  };
}

function exportTarget(arg: unknown): vscode.Uri | undefined {
  if (typeof arg !== 'object' || arg === null || arg instanceof vscode.Uri) return undefined;
  const target = (arg as { target?: unknown }).target;
  return target instanceof vscode.Uri ? target : undefined;
}

export function deactivate(): void {
  // Everything is disposed through context.subscriptions.
}
