/**
 * Keeps every open bias spec analysed: at once on open, debounced on change (a newer edit
 * supersedes an older request), diagnostics cleared on close. While the bias panel is open, the
 * active spec is analysed with its Iout/Vout curve for the plots (a sweep costs about as much
 * as the rest of the analysis, so it is skipped when nobody looks). Every analysis solves the
 * spec's `corners:` unless `qpoint.corners.enabled` is off. A Monte Carlo report (`adopt`) stays
 * the document's report until the next edit or an analysis setting changes. Other parts (panel,
 * status bar, CodeLens) listen to `onDidUpdate`.
 */
import * as vscode from 'vscode';
import type { HostAnalyzeOptions } from './workerProtocol';
import type { FileReport } from '../core/types';
import type { Analyzer, EarlyFindings } from './analyzer';
import type { SpecDiagnostics } from './specDiagnostics';
import { readSettings } from './settings';
import { isSpecDocument } from './specDocuments';
import { PANEL_VIEW_TYPE } from './panel';

export interface ReportUpdate { uri: vscode.Uri; report: FileReport; version: number }

/**
 * One analysis of a document as the editor saw it, on the extension host's clock
 * (`performance.now()`): when it was asked of the worker (after the debounce, for an edit), when
 * its diagnostics were set (the findings arrive just before the report), when its report was
 * published, and how long it took inside the worker.
 */
export interface AnalysisTiming {
  version: number;
  startedAt: number;
  /** When the worker began the analysis, posted its findings, and they arrived here. */
  workerStartedAt?: number;
  findingsSentAt?: number;
  findingsReceivedAt?: number;
  diagnosticsAt?: number;
  reportAt?: number;
  workerMs?: number;
}

interface Entry {
  uri: vscode.Uri;
  timer?: NodeJS.Timeout;
  report?: FileReport;
  /** Document version the report belongs to. */
  reportVersion?: number;
  hasCurve: boolean;
  /** Version whose report came from a Monte Carlo run: a plain analysis of the same version
   *  (a race, a panel opening) must not replace it. */
  pinnedVersion?: number;
  /** The last analysis whose diagnostics were set. */
  timing?: AnalysisTiming;
}

/** Settings that change what the core computes: a change re-analyses every open spec. */
const ANALYSIS_SETTINGS = ['qpoint.limits', 'qpoint.corners'];

export class AnalysisManager implements vscode.Disposable {
  private readonly entries = new Map<string, Entry>();
  private readonly emitter = new vscode.EventEmitter<ReportUpdate>();
  private readonly disposables: vscode.Disposable[] = [];
  private lastActive: string | undefined;
  /** One error message per session is enough; the log has every failure. */
  private failureShown = false;
  /** Analyses whose report reached the editor. */
  count = 0;
  readonly onDidUpdate = this.emitter.event;

  constructor(
    private readonly analyzer: Analyzer,
    private readonly diagnostics: SpecDiagnostics,
    private readonly log: vscode.LogOutputChannel,
  ) {
    this.disposables.push(
      this.emitter,
      vscode.workspace.onDidOpenTextDocument((d) => this.open(d)),
      vscode.workspace.onDidChangeTextDocument((e) => {
        if (e.contentChanges.length > 0) this.changed(e.document);
      }),
      vscode.workspace.onDidCloseTextDocument((d) => this.close(d)),
      vscode.window.onDidChangeActiveTextEditor((e) => this.activeChanged(e)),
      vscode.workspace.onDidChangeConfiguration((e) => {
        if (ANALYSIS_SETTINGS.some((k) => e.affectsConfiguration(k))) this.reanalyzeAll();
      }),
      vscode.window.tabGroups.onDidChangeTabs(() => this.panelMayHaveOpened()),
      // A workspace check leaves diagnostics on files that are not open: drop them with the file.
      vscode.workspace.onDidDeleteFiles((e) => { for (const u of e.files) this.forgetUnder(u); }),
      vscode.workspace.onDidRenameFiles((e) => { for (const f of e.files) this.forgetUnder(f.oldUri); }),
      // A characterisation table changed on disk: every open spec is analysed again (the worker
      // reads a table again only when its size or time changed).
      ...this.watchTables(),
    );
    for (const d of vscode.workspace.textDocuments) this.open(d);
    this.activeChanged(vscode.window.activeTextEditor);
  }

  /** The active spec (or the last one that was active, while the panel has focus). */
  current(): { uri: vscode.Uri; report: FileReport } | undefined {
    // Focus may sit in the panel or a quick input (no active editor): then the last active spec,
    // else a visible one.
    const active = vscode.window.activeTextEditor?.document;
    const keys = [
      active && isSpecDocument(active) ? active.uri.toString() : undefined,
      this.lastActive,
      ...vscode.window.visibleTextEditors.filter((ed) => isSpecDocument(ed.document)).map((ed) => ed.document.uri.toString()),
    ];
    for (const key of keys) {
      const e = key ? this.entries.get(key) : undefined;
      if (e?.report) return { uri: e.uri, report: e.report };
    }
    return undefined;
  }

  /** The report of the document's current text, if it is finished. */
  reportFor(uri: vscode.Uri): FileReport | undefined {
    return this.entries.get(uri.toString())?.report;
  }

  /** The timing of the last analysis of `uri` whose diagnostics were set. */
  timingFor(uri: vscode.Uri): AnalysisTiming | undefined {
    return this.entries.get(uri.toString())?.timing;
  }

  /** The report of exactly this version of the document, analysing now if needed. */
  async upToDate(doc: vscode.TextDocument, opts: { curve?: boolean } = {}): Promise<FileReport | undefined> {
    // A live re-analysis may supersede ours; then its report (of the same text) serves too.
    for (let attempt = 0; attempt < 3; attempt++) {
      const e = this.entries.get(doc.uri.toString()) ?? this.track(doc);
      if (e.report && e.reportVersion === doc.version && (!opts.curve || e.hasCurve)) return e.report;
      if (e.timer) clearTimeout(e.timer);
      e.timer = undefined;
      const report = await this.run(doc, e, opts.curve === true || this.wantsCurve(doc));
      if (report) return report;
      if (doc.isClosed) return undefined;
    }
    return undefined;
  }

  /** The finished report, only when it belongs to the document's current version. */
  reportAt(doc: vscode.TextDocument): FileReport | undefined {
    const e = this.entries.get(doc.uri.toString());
    return e?.report && e.reportVersion === doc.version ? e.report : undefined;
  }

  /** Options for the core from the settings (the fallback margin, corners on or off). */
  optionsFor(uri: vscode.Uri, curve: boolean): HostAnalyzeOptions {
    const s = readSettings(uri);
    // A spec on disk: the worker reads the tables it names beside it (design §11).
    return { curve, corners: s.corners, limitsDefaults: { margin: s.margin }, ...(uri.scheme === 'file' ? { specPath: uri.fsPath } : {}) };
  }

  /** A report computed on purpose for exactly `version` of `doc` (Monte Carlo): it becomes the
   *  document's report — diagnostics, panel, hover — until the next edit. False when the
   *  document changed or closed meanwhile. */
  adopt(doc: vscode.TextDocument, version: number, report: FileReport): boolean {
    const e = this.entries.get(doc.uri.toString());
    if (!e || doc.isClosed || doc.version !== version) return false;
    e.pinnedVersion = version;
    this.publish(doc.uri, e, report, version, report.mirrors.some((m) => m.curve !== undefined));
    return true;
  }

  private track(doc: vscode.TextDocument): Entry {
    const e: Entry = { uri: doc.uri, hasCurve: false };
    this.entries.set(doc.uri.toString(), e);
    return e;
  }

  private isActive(doc: vscode.TextDocument): boolean {
    return vscode.window.activeTextEditor?.document.uri.toString() === doc.uri.toString()
      || this.lastActive === doc.uri.toString();
  }

  /** The active spec gets its curve while the bias panel is open. */
  private wantsCurve(doc: vscode.TextDocument): boolean {
    return this.isActive(doc) && panelIsOpen();
  }

  private panelMayHaveOpened(): void {
    if (!this.lastActive || !panelIsOpen()) return;
    const e = this.entries.get(this.lastActive);
    const doc = vscode.workspace.textDocuments.find((d) => d.uri.toString() === this.lastActive);
    if (e && doc && !e.hasCurve && !e.timer) void this.run(doc, e, true);
  }

  private open(doc: vscode.TextDocument): void {
    if (!isSpecDocument(doc) || this.entries.has(doc.uri.toString())) return;
    void this.run(doc, this.track(doc), this.wantsCurve(doc));
  }

  private changed(doc: vscode.TextDocument): void {
    if (!isSpecDocument(doc)) return;
    const e = this.entries.get(doc.uri.toString()) ?? this.track(doc);
    if (e.timer) clearTimeout(e.timer);
    e.timer = setTimeout(() => {
      e.timer = undefined;
      void this.run(doc, e, this.wantsCurve(doc));
    }, readSettings(doc.uri).debounceMs);
  }

  private close(doc: vscode.TextDocument): void {
    const key = doc.uri.toString();
    const e = this.entries.get(key);
    if (e?.timer) clearTimeout(e.timer);
    this.entries.delete(key);
    this.diagnostics.delete(doc.uri);
    if (this.lastActive === key) this.lastActive = undefined;
  }

  /** Diagnostics of `uri` and, for a folder, of every file below it. */
  private forgetUnder(uri: vscode.Uri): void {
    const prefix = uri.toString().replace(/\/?$/, '/');
    for (const u of this.diagnostics.uris()) {
      const k = u.toString();
      if (k === uri.toString() || k.startsWith(prefix)) this.diagnostics.delete(u);
    }
  }

  private activeChanged(editor: vscode.TextEditor | undefined): void {
    const doc = editor?.document;
    if (!doc || !isSpecDocument(doc)) return;
    this.lastActive = doc.uri.toString();
    const e = this.entries.get(this.lastActive);
    if (!e) this.open(doc);
    else if (!e.hasCurve && !e.timer && panelIsOpen()) void this.run(doc, e, true);
    else if (e.report) this.emitter.fire({ uri: e.uri, report: e.report, version: e.reportVersion ?? doc.version });
  }

  private watchTables(): vscode.Disposable[] {
    const w = vscode.workspace.createFileSystemWatcher('**/*.{csv,CSV}');
    const again = (): void => this.reanalyzeAll();
    return [w, w.onDidChange(again), w.onDidCreate(again), w.onDidDelete(again)];
  }

  private reanalyzeAll(): void {
    for (const doc of vscode.workspace.textDocuments) {
      const e = this.entries.get(doc.uri.toString());
      if (!e) continue;
      e.pinnedVersion = undefined;  // the settings changed what a report means
      void this.run(doc, e, this.wantsCurve(doc));
    }
  }

  private async run(doc: vscode.TextDocument, e: Entry, curve: boolean): Promise<FileReport | undefined> {
    const version = doc.version;
    const timing: AnalysisTiming = { version, startedAt: performance.now() };
    // The diagnostics as soon as the findings arrive, on the terms the report is published on.
    const early: EarlyFindings = (findings, ms, at) => {
      if (this.entries.get(doc.uri.toString()) !== e || (e.pinnedVersion !== undefined && e.pinnedVersion >= version)) return;
      this.diagnostics.set(doc.uri, findings);
      timing.diagnosticsAt = performance.now();
      timing.workerMs = ms;
      // The worker's clock to this one's: both count from the epoch.
      timing.workerStartedAt = at.started - performance.timeOrigin;
      timing.findingsSentAt = at.sent - performance.timeOrigin;
      timing.findingsReceivedAt = at.received - performance.timeOrigin;
      e.timing = timing;
    };
    let report: FileReport | undefined;
    try {
      report = await this.analyzer.analyze(doc.uri.toString(), doc.getText(),
        vscode.workspace.asRelativePath(doc.uri, false), this.optionsFor(doc.uri, curve), undefined, early);
    } catch (err) {
      this.log.error(`analysis of ${doc.uri.toString()} failed: ${String(err)}`);
      if (!this.failureShown) {
        this.failureShown = true;
        void vscode.window.showErrorMessage(`qpoint could not analyse ${vscode.workspace.asRelativePath(doc.uri, false)}: ${err instanceof Error ? err.message : String(err)}. See the qpoint output channel.`);
      }
      return undefined;
    }
    // Superseded by a newer request, or the document was closed meanwhile.
    if (!report || this.entries.get(doc.uri.toString()) !== e) return undefined;
    // A Monte Carlo report of this text (or newer) stays: it holds everything this one does.
    if (e.pinnedVersion !== undefined && e.pinnedVersion >= version) return e.report;
    e.pinnedVersion = undefined;
    // Its findings set the diagnostics already (handing VS Code nothing again), unless the report
    // is another (the worker's budget ran out between the two messages).
    this.publish(doc.uri, e, report, version, curve);
    if (e.timing === timing) timing.reportAt = performance.now();
    return report;
  }

  private publish(uri: vscode.Uri, e: Entry, report: FileReport, version: number, curve: boolean): void {
    e.report = report;
    e.reportVersion = version;
    e.hasCurve = curve;
    this.diagnostics.set(uri, report.findings);
    this.count++;
    this.emitter.fire({ uri, report, version });
  }

  dispose(): void {
    for (const e of this.entries.values()) if (e.timer) clearTimeout(e.timer);
    this.entries.clear();
    for (const d of this.disposables.splice(0)) d.dispose();
  }
}

function panelIsOpen(): boolean {
  return vscode.window.tabGroups.all.some((g) => g.tabs.some((t) =>
    t.input instanceof vscode.TabInputWebview && t.input.viewType.endsWith(PANEL_VIEW_TYPE)));
}
