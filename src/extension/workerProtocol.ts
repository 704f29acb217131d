/**
 * Messages between the extension host and its analysis worker thread. Requests carry a sequence
 * number; a newer request for the same key supersedes an older one that has not started, so the
 * worker never spends time on text the designer has already changed.
 * Pure: no `vscode`, no Node.
 */
import type { AnalyzeOptions } from '../core/analyze';
import type { FileReport } from '../core/types';
import type { FindingParts } from './diagnosticParts';
import type { FixAllResult } from '../core/rules/fix-all';

export type Job = 'analyze' | 'fixAll';

/** What the host asks of an analysis: the core's options and, for a spec on disk, its path, so
 *  the worker reads the characterisation tables it names (design §11) beside it. */
export type HostAnalyzeOptions = AnalyzeOptions & { specPath?: string };

export interface WorkerRequest {
  job: Job;
  seq: number;
  /** Requests with one key supersede each other (the document URI and the job). */
  key: string;
  text: string;
  file: string;
  opts: HostAnalyzeOptions;
}

export type WorkerResponse =
  /** The worker begins this job now (the host times each job from here). */
  | { type: 'started'; seq: number; key: string }
  /** An analysis's findings without their fixes, sent just before its report: the diagnostics
   *  need only these, and they cross the thread boundary in a fraction of the report's time (a
   *  500-mirror report is over a megabyte to copy). By part (diagnosticParts.ts: blocks of
   *  mirrors), a part the same as in this key's findings message `base` sent as `null`: a
   *  keystroke in one mirror sends that mirror's part. `ms`: the analysis inside the worker;
   *  `startedAt`, `sentAt`: when the worker began it and posted this, in ms since the epoch
   *  (`performance.timeOrigin + performance.now()`, comparable across threads). */
  | { type: 'findings'; seq: number; key: string; parts: FindingParts; base?: number; ms: number; startedAt: number; sentAt: number }
  | { type: 'report'; seq: number; key: string; report: FileReport; ms: number }
  | { type: 'fixed'; seq: number; key: string; result: FixAllResult; ms: number }
  | { type: 'superseded'; seq: number; key: string }
  /** While a Monte Carlo job runs: samples done over all outputs, of total. */
  | { type: 'progress'; seq: number; key: string; done: number; total: number }
  | { type: 'failed'; seq: number; key: string; message: string };

function isRecord(x: unknown): x is Record<string, unknown> {
  return typeof x === 'object' && x !== null && !Array.isArray(x);
}

export function isWorkerRequest(m: unknown): m is WorkerRequest {
  return isRecord(m) && (m.job === 'analyze' || m.job === 'fixAll') && typeof m.seq === 'number'
    && typeof m.key === 'string' && typeof m.text === 'string' && typeof m.file === 'string' && isRecord(m.opts);
}

export function isWorkerResponse(m: unknown): m is WorkerResponse {
  if (!isRecord(m) || typeof m.seq !== 'number' || typeof m.key !== 'string') return false;
  switch (m.type) {
    case 'findings': return Array.isArray(m.parts) && (m.base === undefined || typeof m.base === 'number') && typeof m.ms === 'number' && typeof m.startedAt === 'number' && typeof m.sentAt === 'number';
    case 'report': return isRecord(m.report) && typeof m.ms === 'number';
    case 'fixed': return isRecord(m.result) && typeof m.ms === 'number';
    case 'started':
    case 'superseded': return true;
    case 'progress': return typeof m.done === 'number' && typeof m.total === 'number';
    case 'failed': return typeof m.message === 'string';
    default: return false;
  }
}
