/**
 * The palette commands: check every spec in the workspace, apply every preferred fix, export the
 * HTML report. Each returns a small summary, which the workbench tests assert on.
 */
import { createHash } from 'node:crypto';
import * as vscode from 'vscode';
import { renderHtmlReport } from '../core/report/html';
import { schematicsOf } from '../core/schematic';
import { networkTreesOf } from '../core/network-tree';
import type { AnalysisManager } from './analysisManager';
import type { Analyzer } from './analyzer';
import { toWorkspaceEdit } from './convert';
import type { SpecDiagnostics } from './specDiagnostics';
import { minimalEdit } from '../core/text/edits';
import { countFindings } from './present';
import { isSpecDocument, SPEC_GLOBS } from './specDocuments';
import type { FixAllResult } from '../core/rules/fix-all';

export interface CheckSummary { files: number; checked: number; errors: number; warnings: number; cancelled: boolean }
export interface FixAllSummary { applied: number; rounds: number; remaining: number; changed: boolean }

export interface CommandContext {
  extensionUri: vscode.Uri;
  /** The extension's version, stamped on exported reports. */
  version: string;
  manager: AnalysisManager;
  analyzer: Analyzer;
  diagnostics: SpecDiagnostics;
  log: vscode.LogOutputChannel;
}

/** The spec the user means: the active editor's, else the one the panel follows. */
function targetDocument(c: CommandContext): vscode.TextDocument | undefined {
  const active = vscode.window.activeTextEditor?.document;
  if (active && isSpecDocument(active)) return active;
  const current = c.manager.current();
  return current ? vscode.workspace.textDocuments.find((d) => d.uri.toString() === current.uri.toString()) : undefined;
}

async function findSpecs(token: vscode.CancellationToken): Promise<vscode.Uri[]> {
  const lists = await Promise.all(SPEC_GLOBS.map((g) => vscode.workspace.findFiles(g, '**/node_modules/**', undefined, token)));
  const seen = new Map<string, vscode.Uri>();
  for (const u of lists.flat()) seen.set(u.toString(), u);
  return [...seen.values()].sort((a, b) => a.path.localeCompare(b.path));
}

export async function checkWorkspace(c: CommandContext): Promise<CheckSummary> {
  const summary = await vscode.window.withProgress(
    { location: vscode.ProgressLocation.Notification, title: 'qpoint: checking bias specs', cancellable: true },
    async (progress, token): Promise<CheckSummary> => {
      const uris = await findSpecs(token);
      const s: CheckSummary = { files: uris.length, checked: 0, errors: 0, warnings: 0, cancelled: false };
      for (const uri of uris) {
        if (token.isCancellationRequested) break;
        const rel = vscode.workspace.asRelativePath(uri, false);
        progress.report({ message: rel, increment: 100 / Math.max(uris.length, 1) });
        const open = vscode.workspace.textDocuments.find((d) => d.uri.toString() === uri.toString());
        let report;
        try {
          if (open) {
            report = await c.manager.upToDate(open);
          } else {
            const text = new TextDecoder('utf-8').decode(await vscode.workspace.fs.readFile(uri));
            report = await c.analyzer.analyze(`check:${uri.toString()}`, text, rel, c.manager.optionsFor(uri, false));
            if (report) c.diagnostics.set(uri, report.findings);
          }
        } catch (err) {
          c.log.error(`could not check ${rel}: ${String(err)}`);
          continue;
        }
        if (!report) continue;
        const n = countFindings(report);
        s.checked++;
        s.errors += n.errors;
        s.warnings += n.warnings;
      }
      s.cancelled = token.isCancellationRequested;
      return s;
    });
  const head = summary.cancelled ? `qpoint: cancelled after ${summary.checked} of ${summary.files} bias specs` : `qpoint: checked ${summary.checked} bias spec${summary.checked === 1 ? '' : 's'}`;
  void vscode.window.showInformationMessage(`${head}: ${summary.errors} errors, ${summary.warnings} warnings.`);
  return summary;
}

export async function fixAllInEditor(c: CommandContext): Promise<FixAllSummary | undefined> {
  const doc = targetDocument(c);
  if (!doc) {
    void vscode.window.showWarningMessage('qpoint: open a bias spec (*.bias.yaml, *.bias.yml, *.bias.json) first.');
    return undefined;
  }
  const version = doc.version;
  const text = doc.getText();
  const result = await c.analyzer.fixAll(doc.uri.toString(), text, vscode.workspace.asRelativePath(doc.uri, false),
    c.manager.optionsFor(doc.uri, false));
  if (!result) return undefined;
  if (doc.version !== version) {
    void vscode.window.showWarningMessage('qpoint: the spec changed while fixes were computed; run the command again.');
    return undefined;
  }
  const edit = minimalEdit(text, result.text);
  if (edit) await vscode.workspace.applyEdit(toWorkspaceEdit(doc.uri, [edit]));
  const errors = result.remaining.filter((f) => f.severity === 'error').length;
  const summary: FixAllSummary = { applied: result.applied.length, rounds: result.rounds, remaining: result.remaining.length, changed: !!edit };
  void vscode.window.showInformationMessage(summary.applied > 0
    ? `qpoint: applied ${summary.applied} fix${summary.applied === 1 ? '' : 'es'}; ${errors} error${errors === 1 ? '' : 's'} remain${notFixed(result.unfixed)}.`
    : result.withheld ? 'qpoint: no fixes while the spec has errors; fix them first (the other mirrors are still checked).'
      : 'qpoint: no preferred fix improves this spec.');
  return summary;
}

/** `; could not fix ratio-error (line 14): …` for the errors fix-all left, so a stop is never silent. */
function notFixed(unfixed: FixAllResult['unfixed']): string {
  const errors = unfixed.filter((u) => u.finding.severity === 'error');
  if (errors.length === 0) return '';
  return `; could not fix ${errors.map((u) => `${u.finding.code} (line ${u.finding.range.start.line + 1}): ${u.text}`).join('; ')}`;
}

/** Writes the self-contained HTML report; `target` skips the save dialog (tests, scripts). */
export async function exportReport(c: CommandContext, target?: vscode.Uri): Promise<vscode.Uri | undefined> {
  const doc = targetDocument(c);
  if (!doc) {
    void vscode.window.showWarningMessage('qpoint: open a bias spec to export its report.');
    return undefined;
  }
  const report = await c.manager.upToDate(doc, { curve: true });
  if (!report) return undefined;
  const script = new TextDecoder('utf-8').decode(
    await vscode.workspace.fs.readFile(vscode.Uri.joinPath(c.extensionUri, 'dist', 'webview.js')));
  const stamp = {
    version: c.version,
    date: new Date().toISOString(),
    inputHash: `sha256:${createHash('sha256').update(doc.getText()).digest('hex')}`,
  };
  const { default: ELK } = await import('elkjs/lib/elk.bundled.js');
  const elk = new ELK();
  const html = renderHtmlReport(report, { script }, stamp, await schematicsOf(elk, report), await networkTreesOf(elk, report));
  const base = doc.uri.path.split('/').pop()?.replace(/\.bias\.(ya?ml|json)$/i, '') || 'qpoint-report';
  const uri = target ?? await vscode.window.showSaveDialog({
    defaultUri: doc.isUntitled ? undefined : vscode.Uri.joinPath(doc.uri, '..', `${base}.report.html`),
    filters: { 'HTML report': ['html'] },
    saveLabel: 'Export report',
  });
  if (!uri) return undefined;
  await vscode.workspace.fs.writeFile(uri, new TextEncoder().encode(html));
  if (!target) void vscode.window.showInformationMessage(`qpoint: report written to ${vscode.workspace.asRelativePath(uri, false)}`);
  return uri;
}
