/** Hover, quick fixes, fix-all and CodeLens for bias specs: each a few lines over convert.ts. */
import * as vscode from 'vscode';
import type { AnalysisManager } from './analysisManager';
import type { Analyzer } from './analyzer';
import { FIX_ALL_KIND, toCodeLenses, toFixAllAction, toHover, toQuickFixes } from './convert';
import { minimalEdit } from '../core/text/edits';
import { readSettings } from './settings';
import { SPEC_SELECTOR } from './specDocuments';

export const OPEN_PANEL_COMMAND = 'qpoint.openPanel';

class HoverProvider implements vscode.HoverProvider {
  constructor(private readonly manager: AnalysisManager) {}
  async provideHover(doc: vscode.TextDocument, pos: vscode.Position): Promise<vscode.Hover | undefined> {
    const report = await this.manager.upToDate(doc);
    return report ? toHover(report, doc.getText(), pos) : undefined;
  }
}

class CodeActionProvider implements vscode.CodeActionProvider {
  static readonly kinds = [vscode.CodeActionKind.QuickFix, FIX_ALL_KIND];
  constructor(private readonly manager: AnalysisManager, private readonly analyzer: Analyzer) {}

  async provideCodeActions(doc: vscode.TextDocument, _range: vscode.Range, context: vscode.CodeActionContext,
    token: vscode.CancellationToken): Promise<vscode.CodeAction[]> {
    const actions: vscode.CodeAction[] = [];
    const report = this.manager.reportAt(doc);  // fixes hold ranges of exactly this text
    if (report && (!context.only || context.only.contains(vscode.CodeActionKind.QuickFix))) {
      actions.push(...toQuickFixes(report, doc.uri, context.diagnostics));
    }
    if (context.only?.contains(FIX_ALL_KIND)) {
      const version = doc.version;
      const text = doc.getText();
      const result = await this.analyzer.fixAll(doc.uri.toString(), text, vscode.workspace.asRelativePath(doc.uri, false),
        this.manager.optionsFor(doc.uri, false));
      if (result && !token.isCancellationRequested && doc.version === version) {
        actions.push(toFixAllAction(doc.uri, minimalEdit(text, result.text), result.applied.length));
      }
    }
    return actions;
  }
}

class CodeLensProvider implements vscode.CodeLensProvider {
  private readonly changed = new vscode.EventEmitter<void>();
  readonly onDidChangeCodeLenses = this.changed.event;
  constructor(private readonly manager: AnalysisManager) {}
  refresh(): void { this.changed.fire(); }
  dispose(): void { this.changed.dispose(); }
  provideCodeLenses(doc: vscode.TextDocument): vscode.CodeLens[] {
    if (!readSettings(doc.uri).codeLens) return [];
    const report = this.manager.reportAt(doc);
    return report ? toCodeLenses(report, OPEN_PANEL_COMMAND) : [];
  }
}

export function registerProviders(manager: AnalysisManager, analyzer: Analyzer): vscode.Disposable[] {
  const lenses = new CodeLensProvider(manager);
  return [
    vscode.languages.registerHoverProvider(SPEC_SELECTOR, new HoverProvider(manager)),
    vscode.languages.registerCodeActionsProvider(SPEC_SELECTOR, new CodeActionProvider(manager, analyzer),
      { providedCodeActionKinds: CodeActionProvider.kinds }),
    vscode.languages.registerCodeLensProvider(SPEC_SELECTOR, lenses),
    lenses,
    manager.onDidUpdate(() => lenses.refresh()),
    vscode.workspace.onDidChangeConfiguration((e) => {
      if (e.affectsConfiguration('qpoint.codeLens')) lenses.refresh();
    }),
  ];
}
