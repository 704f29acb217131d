/** Hover, quick fixes, fix-all, CodeLens and link navigation (definition, references, rename) for
 *  bias specs: each a few lines over convert.ts and linkNav.ts. */
import * as vscode from 'vscode';
import type { AnalysisManager } from './analysisManager';
import type { Analyzer } from './analyzer';
import { FIX_ALL_KIND, toCodeLenses, toFixAllAction, toHover, toQuickFixes } from './convert';
import { minimalEdit } from '../core/text/edits';
import { readSettings } from './settings';
import { SPEC_SELECTOR } from './specDocuments';
import { linkSites, type LinkSites } from '../core/network/link-sites';
import { definitionAt, prepareRenameAt, referencesAt, renameAt } from './linkNav';
import { fromPosition, toRange } from './convert';

export const OPEN_PANEL_COMMAND = 'qpoint.openPanel';

/** Link sites of a document's current text (one parse per version, shared by the providers). */
class LinkSiteCache {
  private last: { uri: string; version: number; sites: LinkSites } | undefined;
  of(doc: vscode.TextDocument): LinkSites {
    const uri = doc.uri.toString();
    if (this.last?.uri !== uri || this.last.version !== doc.version) this.last = { uri, version: doc.version, sites: linkSites(doc.getText()) };
    return this.last.sites;
  }
}

class HoverProvider implements vscode.HoverProvider {
  constructor(private readonly manager: AnalysisManager, private readonly sites: LinkSiteCache) {}
  async provideHover(doc: vscode.TextDocument, pos: vscode.Position): Promise<vscode.Hover | undefined> {
    const report = await this.manager.upToDate(doc);
    return report ? toHover(report, doc.getText(), pos, this.sites.of(doc)) : undefined;
  }
}

/** Go to definition, find references and rename across `input: { from: PATH }` links. */
class LinkProvider implements vscode.DefinitionProvider, vscode.ReferenceProvider, vscode.RenameProvider {
  constructor(private readonly sites: LinkSiteCache) {}
  provideDefinition(doc: vscode.TextDocument, pos: vscode.Position): vscode.Location | undefined {
    const r = definitionAt(this.sites.of(doc), fromPosition(pos));
    return r ? new vscode.Location(doc.uri, toRange(r)) : undefined;
  }
  provideReferences(doc: vscode.TextDocument, pos: vscode.Position, context: vscode.ReferenceContext): vscode.Location[] {
    return referencesAt(this.sites.of(doc), fromPosition(pos), context.includeDeclaration).map((r) => new vscode.Location(doc.uri, toRange(r)));
  }
  prepareRename(doc: vscode.TextDocument, pos: vscode.Position): { range: vscode.Range; placeholder: string } {
    const r = prepareRenameAt(this.sites.of(doc), fromPosition(pos));
    if (!r) throw new Error('Only a mirror\'s or output\'s name, or a link\'s `from` value, can be renamed here.');
    if ('error' in r) throw new Error(r.error);
    return { range: toRange(r.range), placeholder: r.placeholder };
  }
  provideRenameEdits(doc: vscode.TextDocument, pos: vscode.Position, newName: string): vscode.WorkspaceEdit {
    const r = renameAt(this.sites.of(doc), fromPosition(pos), newName);
    if (!r) throw new Error('Only a mirror\'s or output\'s name, or a link\'s `from` value, can be renamed here.');
    if ('error' in r) throw new Error(r.error);
    const edit = new vscode.WorkspaceEdit();
    for (const e of r.edits) edit.replace(doc.uri, toRange(e.range), e.newText);
    return edit;
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
  const sites = new LinkSiteCache();
  const links = new LinkProvider(sites);
  return [
    vscode.languages.registerHoverProvider(SPEC_SELECTOR, new HoverProvider(manager, sites)),
    vscode.languages.registerDefinitionProvider(SPEC_SELECTOR, links),
    vscode.languages.registerReferenceProvider(SPEC_SELECTOR, links),
    vscode.languages.registerRenameProvider(SPEC_SELECTOR, links),
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
