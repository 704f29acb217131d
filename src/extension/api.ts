/** What `activate()` returns: a small typed API for the extension-host tests. */
import type * as vscode from 'vscode';
import type { FileReport } from '../core/types';
import type { AnalysisTiming, ReportUpdate } from './analysisManager';

export interface QpointApi {
  /** Analyses whose report reached the editor since activation. */
  analysisCount(): number;
  /** The latest report of an open spec (undefined when not analysed or closed). */
  lastReport(uri: vscode.Uri): FileReport | undefined;
  /** Milliseconds spent in activate(). */
  readonly activationMs: number;
  /** Time the last job took inside the worker (ms). */
  lastAnalysisMs(): number;
  /** The last analysis of an open spec whose diagnostics were set: when it was asked of the
   *  worker (after the debounce), when its diagnostics and its report reached the editor, on
   *  this process's `performance.now()` clock, and its time inside the worker. */
  lastTiming(uri: vscode.Uri): AnalysisTiming | undefined;
  /** Fires when a report reaches the editor. */
  readonly onDidUpdate: vscode.Event<ReportUpdate>;
  /** True while a Monte Carlo thread computes; false again once a cancelled one has exited. */
  monteCarloBusy(): boolean;
  /** Samples done of the total in the Monte Carlo run in progress (undefined when none runs). */
  monteCarloProgress(): { done: number; total: number } | undefined;
}
