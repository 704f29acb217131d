/**
 * The "Run Monte Carlo Mismatch" command: the spec's current text is analysed with Monte Carlo
 * in a worker thread of its own (so live analysis goes on while it runs), under a cancellable
 * notification. Cancelling terminates that thread, which is the only way to stop a job inside
 * it; a newer run does the same to an older one. The finished report becomes the document's
 * report (diagnostics, panel, hover) until the next edit.
 */
import * as vscode from 'vscode';
import type { AnalysisManager } from './analysisManager';
import type { Progress, WorkerAnalyzer } from './analyzer';
import { monteCarloRun, percentDone, progressMessage, sampledOutputs, summaryMessage, type SampleCount } from './monteCarloText';
import { readSettings } from './settings';
import { isSpecDocument } from './specDocuments';

export const RUN_MONTE_CARLO_COMMAND = 'qpoint.runMonteCarlo';

/** What a run returns (the workbench tests assert on it). */
export interface MonteCarloSummary {
  uri: string;
  samples: number;
  seed: number;
  /** Cancelled by the user, or superseded by a newer run. */
  cancelled: boolean;
  /** The spec changed while it ran: the result was dropped. */
  stale: boolean;
  /** The result became the document's report. */
  adopted: boolean;
  /** Wall time of the run (ms), from the command to the result or the stopped thread. */
  ms: number;
  /** Why the run failed, when its thread crashed. */
  failed?: string;
  /** Samples done of the total as last reported by the worker while it ran (the progress bar). */
  progress?: SampleCount;
}

/** Arguments from scripts and tests; menus pass the editor's Uri instead. */
interface MonteCarloArgs {
  uri?: vscode.Uri;
  samples?: number;
  seed?: number;
  /** Cancels the run like the notification's Cancel button. */
  token?: vscode.CancellationToken;
}

export interface MonteCarloContext {
  manager: AnalysisManager;
  /** The Monte Carlo thread (no job time limit; stopped by `cancel`). */
  analyzer: Pick<WorkerAnalyzer, 'analyze' | 'cancel' | 'busy'>;
  log: vscode.LogOutputChannel;
}

export class MonteCarloCommand {
  private running: vscode.CancellationTokenSource | undefined;
  /** One key per run, so stopping an old run can never hit a newer one. */
  private runs = 0;
  /** The summary of the run in progress, whose `progress` the worker updates. */
  private current: MonteCarloSummary | undefined;

  constructor(private readonly c: MonteCarloContext) {}

  /** True while a run's thread is computing (it is false again once a cancelled thread exited). */
  busy(): boolean {
    return this.c.analyzer.busy();
  }

  /** Samples done of the total in the run in progress, as the worker last reported them. */
  progress(): SampleCount | undefined {
    return this.current?.progress;
  }

  async run(arg?: unknown): Promise<MonteCarloSummary | undefined> {
    const args = parseArgs(arg);
    const doc = await this.target(args);
    if (!doc) {
      void vscode.window.showWarningMessage('qpoint: open a bias spec (*.bias.yaml, *.bias.yml, *.bias.json) to run Monte Carlo.');
      return undefined;
    }
    const settings = readSettings(doc.uri);
    const run = monteCarloRun(args, settings.monteCarlo);
    const outputs = sampledOutputs(this.c.manager.reportAt(doc));
    if (outputs === 0) {
      void vscode.window.showWarningMessage('qpoint: no mirror of this spec has Pelgrom coefficients (process avt, abeta): Monte Carlo has nothing to vary.');
      return undefined;
    }

    // A newer run supersedes the older one: stop its thread before starting (one run at a time
    // also across specs: two would share two cores with the live analysis).
    this.running?.cancel();
    const key = `monte-carlo:${++this.runs}`;
    const mine = new vscode.CancellationTokenSource();
    this.running = mine;
    const sub = args.token?.onCancellationRequested(() => mine.cancel());
    const t0 = Date.now();
    const version = doc.version;
    const rel = vscode.workspace.asRelativePath(doc.uri, false);
    const summary: MonteCarloSummary = { uri: doc.uri.toString(), ...run, cancelled: false, stale: false, adopted: false, ms: 0 };
    this.current = summary;
    try {
      await vscode.window.withProgress(
        { location: vscode.ProgressLocation.Notification, title: `qpoint: Monte Carlo mismatch of ${rel}`, cancellable: true },
        async (progress, token) => {
          const stop = token.onCancellationRequested(() => mine.cancel());
          // The bar follows the samples the worker reports; the line also says for how long.
          let shown = 0;  // percent already on the bar
          const report = () => {
            const pct = summary.progress ? percentDone(summary.progress) : 0;
            progress.report({ message: progressMessage(run, outputs, Date.now() - t0, summary.progress), increment: pct - shown });
            shown = pct;
          };
          report();
          const tick = setInterval(report, 1000);
          const onProgress = (done: number, total: number) => {
            summary.progress = { done, total };
            if (percentDone(summary.progress) > shown) report();
          };
          try {
            summary.cancelled = !(await this.compute(doc, key, run, version, summary, mine.token, onProgress));
          } finally {
            clearInterval(tick);
            stop.dispose();
          }
        });
    } finally {
      sub?.dispose();
      if (this.running === mine) this.running = undefined;
      if (this.current === summary) this.current = undefined;
      mine.dispose();
    }
    summary.ms = Date.now() - t0;
    if (summary.cancelled) this.c.log.info(`Monte Carlo of ${rel} stopped after ${summary.ms} ms`);
    return summary;
  }

  /** False when cancelled or superseded (the thread has exited by then). */
  private async compute(doc: vscode.TextDocument, key: string, run: { samples: number; seed: number }, version: number,
    summary: MonteCarloSummary, token: vscode.CancellationToken, onProgress: Progress): Promise<boolean> {
    // Wait for an older run's thread to be gone, so that stopping it cannot take this job along.
    while (this.c.analyzer.busy()) await this.stoppedOnce;
    if (token.isCancellationRequested) return false;
    let sub: vscode.Disposable | undefined;
    const stopped = new Promise<void>((resolve) => {
      if (token.isCancellationRequested) resolve();
      sub = token.onCancellationRequested(() => resolve());
    }).then(() => this.stopping(key));
    const opts = { ...this.c.manager.optionsFor(doc.uri, true), mc: run };
    const t0 = Date.now();
    const job = this.c.analyzer.analyze(key, doc.getText(), vscode.workspace.asRelativePath(doc.uri, false), opts, onProgress);
    let report;
    try {
      report = await Promise.race([job, stopped.then(() => undefined)]);
    } catch (err) {
      // The thread crashed (out of memory on a huge sample count, a defect): say so, keep the live report.
      summary.failed = err instanceof Error ? err.message : String(err);
      this.c.log.error(`Monte Carlo of ${doc.uri.toString()} failed: ${summary.failed}`);
      void vscode.window.showErrorMessage(`qpoint: Monte Carlo failed: ${summary.failed}. See the qpoint output channel.`);
      return true;
    } finally {
      sub?.dispose();
    }
    if (token.isCancellationRequested) {
      await stopped;
      return false;
    }
    if (!report) return false;  // the extension is shutting down
    if (doc.isClosed || doc.version !== version) {
      summary.stale = true;
      void vscode.window.showWarningMessage('qpoint: the spec changed while Monte Carlo ran; run it again on the new text.');
      return true;
    }
    summary.adopted = this.c.manager.adopt(doc, version, report);
    void vscode.window.showInformationMessage(summaryMessage(report, run, Date.now() - t0));
    return true;
  }

  /** Resolves when the last thread stopped by `stopping` has exited. */
  private stoppedOnce: Promise<unknown> = Promise.resolve();

  private stopping(key: string): Promise<unknown> {
    this.stoppedOnce = this.c.analyzer.cancel(key);
    return this.stoppedOnce;
  }

  dispose(): void {
    this.running?.cancel();
  }

  /** The spec named by the arguments, else the active one, else the one the panel follows. */
  private async target(args: MonteCarloArgs): Promise<vscode.TextDocument | undefined> {
    if (args.uri) {
      const open = vscode.workspace.textDocuments.find((d) => d.uri.toString() === args.uri!.toString());
      return open ?? vscode.workspace.openTextDocument(args.uri).then((d) => (isSpecDocument(d) ? d : undefined), () => undefined);
    }
    const active = vscode.window.activeTextEditor?.document;
    if (active && isSpecDocument(active)) return active;
    const current = this.c.manager.current();
    return current ? vscode.workspace.textDocuments.find((d) => d.uri.toString() === current.uri.toString()) : undefined;
  }
}

function parseArgs(arg: unknown): MonteCarloArgs {
  if (arg instanceof vscode.Uri) return { uri: arg };
  if (typeof arg !== 'object' || arg === null) return {};
  const a = arg as Record<string, unknown>;
  const token = a.token as vscode.CancellationToken | undefined;
  return {
    uri: a.uri instanceof vscode.Uri ? a.uri : typeof a.uri === 'string' ? vscode.Uri.parse(a.uri, true) : undefined,
    samples: typeof a.samples === 'number' ? a.samples : undefined,
    seed: typeof a.seed === 'number' ? a.seed : undefined,
    token: token && typeof token.onCancellationRequested === 'function' ? token : undefined,
  };
}
