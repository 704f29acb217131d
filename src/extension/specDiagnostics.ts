/**
 * The editor's qpoint diagnostics: one `DiagnosticCollection` per part of a file's findings
 * (`diagnosticParts.ts`: blocks of mirrors), each set again only when its diagnostics changed.
 * Every diagnostic keeps its source `qpoint`; the Problems panel, squiggles and hovers merge the
 * collections. VS Code's cap of diagnostics per file applies to each part.
 */
import * as vscode from 'vscode';
import type { Finding } from '../core/types';
import { changedParts, splitParts } from './diagnosticParts';
import { toDiagnostics } from './convert';

export class SpecDiagnostics implements vscode.Disposable {
  /** Part k's collection; the first is named `qpoint`, as the single collection was. */
  private readonly collections: vscode.DiagnosticCollection[] = [];
  /** Per file: the findings each part's diagnostics were made from. */
  private readonly shown = new Map<string, { uri: vscode.Uri; parts: Finding[][] }>();

  /** Shows `findings` for `uri`, handing VS Code the parts that changed. */
  set(uri: vscode.Uri, findings: readonly Finding[]): void {
    const key = uri.toString();
    const parts = splitParts(findings);
    const { set, clear } = changedParts(this.shown.get(key)?.parts ?? [], parts);
    for (const k of clear) this.collection(k).delete(uri);
    for (const k of set) this.collection(k).set(uri, toDiagnostics({ findings: parts[k]! }, uri));
    this.shown.set(key, { uri, parts });
  }

  delete(uri: vscode.Uri): void {
    const key = uri.toString();
    const s = this.shown.get(key);
    if (!s) return;
    this.shown.delete(key);
    s.parts.forEach((p, k) => { if (p) this.collection(k).delete(uri); });
  }

  /** The files that have diagnostics. */
  uris(): vscode.Uri[] {
    return [...this.shown.values()].map((s) => s.uri);
  }

  private collection(k: number): vscode.DiagnosticCollection {
    for (let j = this.collections.length; j <= k; j++) {
      this.collections.push(vscode.languages.createDiagnosticCollection(j === 0 ? 'qpoint' : `qpoint.part${j}`));
    }
    return this.collections[k]!;
  }

  dispose(): void {
    for (const c of this.collections.splice(0)) c.dispose();
    this.shown.clear();
  }
}
