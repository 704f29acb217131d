/**
 * Client side of the analysis worker (dist/worker.js). A request for a key supersedes the
 * pending one of that key, whose promise resolves `undefined` at once; answers to superseded
 * sequence numbers are dropped. A crashed worker is replaced on the next request.
 *
 * Every open spec shares the one worker, so each job has a time budget, counted from the moment
 * the worker says it starts it: a job that runs over is stopped (the thread terminated, the only
 * way to stop it), its file gets an `analysis-timeout` finding, and a fresh worker takes the other
 * jobs. One hostile file thus holds the others up for one budget at most.
 * No `vscode` here, so it is tested with the real worker bundle.
 */
import { Worker } from 'node:worker_threads';
import type { HostAnalyzeOptions } from './workerProtocol';
import type { FileReport, Finding } from '../core/types';
import type { FixAllResult } from '../core/rules/fix-all';
import { isWorkerResponse, type Job, type WorkerRequest, type WorkerResponse } from './workerProtocol';
import { expandParts, SentParts } from './diagnosticParts';

export interface Analyzer {
  /** Resolves undefined when a newer request for `key` superseded this one. `onProgress` hears a
   *  Monte Carlo job's samples done of total while it runs. */
  analyze(key: string, text: string, file: string, opts: HostAnalyzeOptions, onProgress?: Progress, onFindings?: EarlyFindings): Promise<FileReport | undefined>;
  /** The core's verified multi-round fix-all, off the main thread. */
  fixAll(key: string, text: string, file: string, opts: HostAnalyzeOptions): Promise<FixAllResult | undefined>;
  dispose(): void;
}

export type Progress = (done: number, total: number) => void;
/** Hears an analysis's findings (without their fixes) just before its report arrives: `ms` the
 *  analysis inside the worker; `at` when the worker began it, posted the findings and the host
 *  received them, in ms since the epoch. */
export type EarlyFindings = (findings: Finding[], ms: number, at: { started: number; sent: number; received: number }) => void;

interface Inflight {
  req: WorkerRequest;
  onProgress?: Progress;
  onFindings?: EarlyFindings;
  resolve(r: WorkerResponse | undefined): void;
  reject(e: Error): void;
}

/**
 * ms one analysis may take in the shared worker. Far above a real spec's analysis (the largest
 * file qpoint reads takes well under a second; the verification of fixes stops itself after 4 s)
 * and far below the 20 s the single worker used to be allowed while every other file waited.
 */
const ANALYSIS_BUDGET_MS = 6000;
/** Fix-all re-analyses the file a few rounds: its budget is this many analyses. */
const FIX_ALL_BUDGET_FACTOR = 3;

export interface WorkerAnalyzerOptions {
  /** The budget of one analysis (ms; fix-all gets FIX_ALL_BUDGET_FACTOR times it); 0: no limit
   *  (a job the user started and can cancel, such as Monte Carlo). Also how long a worker may
   *  stay silent with jobs waiting before it is taken for hung. */
  jobTimeoutMs?: number;
  log?: (message: string) => void;
}

/** What the editor shows for a file whose analysis ran over its budget. */
function timeoutReport(file: string, budgetMs: number): FileReport {
  return {
    file, parsed: true, mirrors: [], anchors: [],
    findings: [{
      severity: 'error', code: 'analysis-timeout', path: [],
      range: { start: { line: 0, character: 0 }, end: { line: 0, character: 0 } },
      message: `qpoint stopped analysing this file after ${budgetMs / 1000} s so that the other open specs are analysed meanwhile; `
        + 'nothing in it is checked until it is edited. `qpoint check` in a terminal has no such limit; please report a file that takes this long',
    }],
  };
}

export class WorkerAnalyzer implements Analyzer {
  private worker: Worker | undefined;
  private seq = 0;
  private readonly inflight = new Map<number, Inflight>();
  private readonly latest = new Map<string, number>();
  private disposed = false;
  private readonly jobTimeoutMs: number;
  private readonly log: (m: string) => void;
  /** The job the worker said it started and has not answered yet (it may be one the host no
   *  longer waits for: superseded while it ran). */
  private running: { seq: number; job: Job } | undefined;
  /** Fires when the running job is over its budget, or when a worker with jobs waiting has
   *  said nothing for a budget (then the worker itself is stuck). */
  private watchdog: NodeJS.Timeout | undefined;
  /** The parts of each key's last findings message from the current worker (`diagnosticParts.ts`). */
  private readonly received = new SentParts();
  /** Analysis time of the last finished job inside the worker (ms). */
  lastJobMs = 0;

  constructor(private readonly workerPath: string, opts: WorkerAnalyzerOptions = {}) {
    this.jobTimeoutMs = opts.jobTimeoutMs ?? ANALYSIS_BUDGET_MS;
    this.log = opts.log ?? (() => undefined);
  }

  async analyze(key: string, text: string, file: string, opts: HostAnalyzeOptions, onProgress?: Progress, onFindings?: EarlyFindings): Promise<FileReport | undefined> {
    const r = await this.request('analyze', key, text, file, opts, onProgress, onFindings);
    return r?.type === 'report' ? r.report : undefined;
  }

  async fixAll(key: string, text: string, file: string, opts: HostAnalyzeOptions): Promise<FixAllResult | undefined> {
    const r = await this.request('fixAll', `fix:${key}`, text, file, opts);
    return r?.type === 'fixed' ? r.result : undefined;
  }

  private request(job: Job, key: string, text: string, file: string, opts: HostAnalyzeOptions, onProgress?: Progress, onFindings?: EarlyFindings): Promise<WorkerResponse | undefined> {
    if (this.disposed) return Promise.resolve(undefined);
    const seq = ++this.seq;
    const older = this.latest.get(key);
    if (older !== undefined) this.settle(older, undefined);
    this.latest.set(key, seq);
    const worker = this.ensureWorker();
    return new Promise<WorkerResponse | undefined>((resolve, reject) => {
      const req: WorkerRequest = { job, seq, key, text, file, opts };
      this.inflight.set(seq, { req, resolve, reject, onProgress, onFindings });
      worker.postMessage(req);
      // A running job keeps its own budget; otherwise the worker must start something in time.
      if (!this.watchdog) this.arm();
    });
  }

  private budget(job: Job): number {
    return job === 'fixAll' ? this.jobTimeoutMs * FIX_ALL_BUDGET_FACTOR : this.jobTimeoutMs;
  }

  private arm(): void {
    clearTimeout(this.watchdog);
    this.watchdog = undefined;
    if (this.jobTimeoutMs <= 0 || this.inflight.size === 0) return;
    this.watchdog = setTimeout(() => this.overrun(), this.running ? this.budget(this.running.job) : this.jobTimeoutMs);
  }

  private ensureWorker(): Worker {
    if (this.worker) return this.worker;
    const w = new Worker(this.workerPath, { name: 'qpoint-analysis' });
    this.received.clear();
    // A replaced worker may still have answers on their way: its jobs were handed to the new one.
    w.on('message', (m: unknown) => { if (this.worker === w) this.receive(m); });
    w.on('error', (e) => this.failAll(w, `analysis worker failed: ${e.message}`));
    w.on('exit', (code) => this.failAll(w, `analysis worker exited (${code})`));
    // The host process may exit while the worker idles.
    w.unref();
    this.worker = w;
    return w;
  }

  private receive(m: unknown): void {
    if (!isWorkerResponse(m)) {
      this.log(`ignored a malformed message from the analysis worker`);
      return;
    }
    switch (m.type) {
      case 'started':
        this.running = { seq: m.seq, job: this.inflight.get(m.seq)?.req.job ?? (m.key.startsWith('fix:') ? 'fixAll' : 'analyze') };
        this.arm();
        return;
      case 'progress':
        this.inflight.get(m.seq)?.onProgress?.(m.done, m.total);
        return;
      case 'findings': {
        // The report follows at once: the job still runs for the watchdog. Its parts are read
        // whether or not anyone waits for them: the next message of the key may refer to them.
        const received = performance.timeOrigin + performance.now();
        const last = m.base === undefined ? undefined : this.received.get(m.key);
        const parts = expandParts(m.parts, last?.seq === m.base ? last?.parts : undefined);
        if (!parts) {
          this.received.delete(m.key);
          this.log(`findings of ${m.key} referred to a message not received; the report brings them`);
          return;
        }
        this.received.set(m.key, m.seq, parts);
        this.inflight.get(m.seq)?.onFindings?.(parts.flat(), m.ms, { started: m.startedAt, sent: m.sentAt, received });
        return;
      }
      case 'superseded':
        this.settle(m.seq, undefined);
        return;
    }
    if (this.running?.seq === m.seq) this.running = undefined;
    if (m.type === 'failed') {
      const f = this.inflight.get(m.seq);
      if (f) { this.forget(m.seq, f); f.reject(new Error(m.message)); }
    } else {
      this.lastJobMs = m.ms;
      this.settle(m.seq, m);
    }
    this.arm();  // the next job has a budget to start in
  }

  private settle(seq: number, value: WorkerResponse | undefined): void {
    const f = this.inflight.get(seq);
    if (!f) return;
    this.forget(seq, f);
    f.resolve(value);
  }

  private forget(seq: number, f: Inflight): void {
    this.inflight.delete(seq);
    if (this.latest.get(f.req.key) === seq) this.latest.delete(f.req.key);
    if (this.inflight.size === 0) { clearTimeout(this.watchdog); this.watchdog = undefined; }
  }

  /** The watchdog fired: stop the job that ran over (or the silent worker) and go on without it. */
  private overrun(): void {
    this.watchdog = undefined;
    const w = this.worker;
    const running = this.running;
    if (!w) return;
    if (!running) {
      // Nothing started within a budget: the worker itself does not answer.
      this.log(`the analysis worker started no job within ${this.jobTimeoutMs} ms; restarting it`);
      this.failAll(w, `analysis took longer than ${this.jobTimeoutMs} ms`);
      void w.terminate();
      return;
    }
    const budget = this.budget(running.job);
    // The culprit may be a job superseded while it ran: then nobody waits for it.
    const f = this.inflight.get(running.seq);
    const others = [...this.inflight.entries()].filter(([s]) => s !== running.seq).sort((a, b) => a[0] - b[0]);
    this.log(`${running.job} ${f ? `of ${f.req.file} ` : ''}ran over its ${budget} ms budget; restarting the worker for ${others.length} other job(s)`);
    this.worker = undefined;
    this.running = undefined;
    void w.terminate();
    if (f) {
      this.forget(running.seq, f);
      if (f.req.job === 'analyze') {
        f.resolve({ type: 'report', seq: running.seq, key: f.req.key, report: timeoutReport(f.req.file, budget), ms: budget });
      } else {
        f.reject(new Error(`fix-all of ${f.req.file} took longer than ${budget} ms and was stopped`));
      }
    }
    if (others.length === 0 || this.disposed) return;
    const fresh = this.ensureWorker();
    for (const [, o] of others) fresh.postMessage(o.req);
    this.arm();
  }

  private failAll(w: Worker, message: string): void {
    if (this.worker !== w) return;
    this.worker = undefined;
    this.running = undefined;
    if (!this.disposed) this.log(message);
    for (const [seq, f] of [...this.inflight]) {
      this.forget(seq, f);
      f.reject(new Error(message));
    }
  }

  /** True while a job of `key` (any key when omitted) is waiting for its answer. */
  busy(key?: string): boolean {
    return [...this.inflight.values()].some((f) => key === undefined || f.req.key === key);
  }

  /** Stops the job of `key` at once by terminating the worker thread: a job inside the worker
   *  cannot be interrupted otherwise. Every job in that thread resolves `undefined`; the next
   *  request starts a fresh thread. Resolves, once the thread has exited, to whether a job was
   *  stopped. */
  async cancel(key: string): Promise<boolean> {
    const w = this.worker;
    if (!w || !this.busy(key)) return false;
    this.worker = undefined;
    this.running = undefined;
    for (const [seq, f] of [...this.inflight]) { this.forget(seq, f); f.resolve(undefined); }
    await w.terminate();
    return true;
  }

  dispose(): void {
    if (this.disposed) return;
    this.disposed = true;
    for (const [seq, f] of [...this.inflight]) { this.forget(seq, f); f.resolve(undefined); }
    clearTimeout(this.watchdog);
    this.watchdog = undefined;
    const w = this.worker;
    this.worker = undefined;
    void w?.terminate();
  }
}
