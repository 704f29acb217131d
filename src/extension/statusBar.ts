/** The status bar item: mirrors and errors of the active spec; a click opens the bias panel. */
import * as vscode from 'vscode';
import type { AnalysisManager } from './analysisManager';
import { statusSummary } from './present';
import { OPEN_PANEL_COMMAND } from './providers';
import { isSpecDocument } from './specDocuments';

export function registerStatusBar(manager: AnalysisManager): vscode.Disposable[] {
  const item = vscode.window.createStatusBarItem('qpoint.status', vscode.StatusBarAlignment.Left, 50);
  item.name = 'qpoint';
  item.command = OPEN_PANEL_COMMAND;
  const update = () => {
    const editor = vscode.window.activeTextEditor;
    // Another file in front: hide. No editor (the panel has focus): keep the last spec's numbers.
    const current = editor && !isSpecDocument(editor.document) ? undefined : manager.current();
    if (!current) {
      item.hide();
      return;
    }
    const s = statusSummary(current.report);
    item.text = s.text;
    item.tooltip = s.tooltip;
    item.backgroundColor = s.hasErrors ? new vscode.ThemeColor('statusBarItem.errorBackground') : undefined;
    item.show();
  };
  update();
  return [item, manager.onDidUpdate(update), vscode.window.onDidChangeActiveTextEditor(update)];
}
