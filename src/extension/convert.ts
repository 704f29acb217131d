/**
 * The one place where core results become vscode objects: diagnostics, hovers, code actions,
 * CodeLenses, workspace edits. Providers call these and stay a few lines each.
 */
import * as vscode from 'vscode';
import type { FileReport, Finding, Fix, Position, Range, Severity, TextEdit } from '../core/types';
import { hoverMarkdown, hoverTarget, lensPlacements } from './present';
import { pathAt } from './specPath';
import type { LinkSites } from '../core/network/link-sites';
import { linkHoverAt } from './linkNav';

const DIAGNOSTIC_SOURCE = 'qpoint';
export const FIX_ALL_KIND = vscode.CodeActionKind.SourceFixAll.append('qpoint');
const FINDINGS_DOC = 'https://github.com/qpoint-dev/qpoint/blob/main/docs/findings.md';

function findingDocUri(code: string): vscode.Uri {
  return vscode.Uri.parse(`${FINDINGS_DOC}#${code}`);
}

function toPosition(p: Position): vscode.Position {
  return new vscode.Position(Math.max(p.line, 0), Math.max(p.character, 0));
}

export function toRange(r: Range): vscode.Range {
  return new vscode.Range(toPosition(r.start), toPosition(r.end));
}

export function fromPosition(p: vscode.Position): Position {
  return { line: p.line, character: p.character };
}

const SEVERITY: Record<Severity, vscode.DiagnosticSeverity> = {
  error: vscode.DiagnosticSeverity.Error,
  warning: vscode.DiagnosticSeverity.Warning,
  info: vscode.DiagnosticSeverity.Information,
};

function toDiagnostic(f: Finding, uri: vscode.Uri): vscode.Diagnostic {
  const d = new vscode.Diagnostic(toRange(f.range), f.message, SEVERITY[f.severity]);
  d.source = DIAGNOSTIC_SOURCE;
  d.code = { value: f.code, target: findingDocUri(f.code) };
  if (f.related?.length) {
    d.relatedInformation = f.related.map((r) =>
      new vscode.DiagnosticRelatedInformation(new vscode.Location(uri, toRange(r.range)), r.message));
  }
  return d;
}

export function toDiagnostics(report: Pick<FileReport, 'findings'>, uri: vscode.Uri): vscode.Diagnostic[] {
  return report.findings.map((f) => toDiagnostic(f, uri));
}

/** The stable finding code of a qpoint diagnostic. */
function diagnosticCode(d: vscode.Diagnostic): string | undefined {
  if (d.source !== DIAGNOSTIC_SOURCE) return undefined;
  const c = d.code;
  if (typeof c === 'string') return c;
  if (typeof c === 'object' && c !== null && typeof c.value === 'string') return c.value;
  return undefined;
}

/** The finding behind a diagnostic: same code, same range. */
function findingFor(report: FileReport, d: vscode.Diagnostic): Finding | undefined {
  const code = diagnosticCode(d);
  if (!code) return undefined;
  return report.findings.find((f) => f.code === code && toRange(f.range).isEqual(d.range));
}

export function toWorkspaceEdit(uri: vscode.Uri, edits: TextEdit[]): vscode.WorkspaceEdit {
  const we = new vscode.WorkspaceEdit();
  for (const e of edits) we.replace(uri, toRange(e.range), e.newText);
  return we;
}

function toQuickFix(fix: Fix, uri: vscode.Uri, diagnostic: vscode.Diagnostic): vscode.CodeAction {
  const a = new vscode.CodeAction(fix.title, vscode.CodeActionKind.QuickFix);
  a.diagnostics = [diagnostic];
  a.isPreferred = fix.preferred === true;
  a.edit = toWorkspaceEdit(uri, fix.edits);
  return a;
}

/** Quick fixes for the qpoint diagnostics in the request, each bound to its diagnostic. */
export function toQuickFixes(report: FileReport, uri: vscode.Uri, diagnostics: readonly vscode.Diagnostic[]): vscode.CodeAction[] {
  const actions: vscode.CodeAction[] = [];
  for (const d of diagnostics) {
    const f = findingFor(report, d);
    for (const fix of f?.fixes ?? []) actions.push(toQuickFix(fix, uri, d));
  }
  return actions;
}

export function toFixAllAction(uri: vscode.Uri, edit: TextEdit | undefined, applied: number): vscode.CodeAction {
  const a = new vscode.CodeAction(
    applied > 0 ? `qpoint: apply ${applied} preferred fix${applied === 1 ? '' : 'es'}` : 'qpoint: no preferred fixes to apply',
    FIX_ALL_KIND);
  if (edit) a.edit = toWorkspaceEdit(uri, [edit]);
  return a;
}

export function toHover(report: FileReport, text: string, pos: vscode.Position, sites?: LinkSites): vscode.Hover | undefined {
  const p = fromPosition(pos);
  const onLink = sites ? linkHoverAt(report, sites, p) : undefined;
  const target = onLink === undefined ? hoverTarget(report, p, pathAt(text, p)) : undefined;
  const markdown = onLink ?? (target ? hoverMarkdown(target) : undefined);
  if (markdown === undefined) return undefined;
  const md = new vscode.MarkdownString(markdown);
  md.supportThemeIcons = false;
  md.isTrusted = false;
  return new vscode.Hover(md);
}

export function toCodeLenses(report: FileReport, command: string): vscode.CodeLens[] {
  return lensPlacements(report).map(({ range, title }) =>
    new vscode.CodeLens(toRange(range), { title, command, tooltip: 'Open the qpoint bias panel' }));
}
