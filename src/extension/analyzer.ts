/**
 * Client side of the analysis worker (dist/worker.js). A request for a key supersedes the
 * pending one of that key, whose promise resolves `undefined` at once; answers to superseded
 * sequence numbers are dropped. A crashed or stuck worker is replaced on the next request.
 * No `vscode` here, so it is tested with the real worker bundle.
 */
import { Worker } from 'node:worker_threads';
import type { AnalyzeOptions } from '../core/analyze';
import type { FileReport } from '../core/types';
import type { FixAllResult } from '../core/rules/fix-all';
import { isWorkerResponse, type Job, type WorkerRequest, type WorkerResponse } from './workerProtocol';

export interface Analyzer {
  /** Resolves undefined when a newer request for `key` superseded this one. `onProgress` hears a
   *  Monte Carlo job's samples done of total while it runs. */
  analyze(key: string, text: string, file: string, opts: AnalyzeOptions, onProgress?: Progress): Promise<FileReport | undefined>;
  /** The core's verified multi-round fix-all, off the main thread. */
  fixAll(key: string, text: string, file: string, opts: AnalyzeOptions): Promise<FixAllResult | undefined>;
  dispose(): void;
}

export type Progress = (done: number, total: number) => void;

interface Inflight {
  key: string;
  job: Job;
  onProgress?: Progress;
  resolve(r: WorkerResponse | undefined): void;
  reject(e: Error): void;
  timer: NodeJS.Timeout | undefined;
}

export interface WorkerAnalyzerOptions {
  /** A job running longer than this is treated as a hung worker (ms); 0: no limit (a job the
   *  user started and can cancel, such as Monte Carlo). */
  jobTimeoutMs?: number;
  log?: (message: string) => void;
}

export class WorkerAnalyzer implements Analyzer {
  private worker: Worker | undefined;
  private seq = 0;
  private readonly inflight = new Map<number, Inflight>();
  private readonly latest = new Map<string, number>();
  private disposed = false;
  private readonly jobTimeoutMs: number;
  private readonly log: (m: string) => void;
  /** Analysis time of the last finished job inside the worker (ms). */
  lastJobMs = 0;

  constructor(private readonly workerPath: string, opts: WorkerAnalyzerOptions = {}) {
    this.jobTimeoutMs = opts.jobTimeoutMs ?? 20_000;
    this.log = opts.log ?? (() => undefined);
  }

  async analyze(key: string, text: string, file: string, opts: AnalyzeOptions, onProgress?: Progress): Promise<FileReport | undefined> {
    const r = await this.request('analyze', key, text, file, opts, onProgress);
    return r?.type === 'report' ? r.report : undefined;
  }

  async fixAll(key: string, text: string, file: string, opts: AnalyzeOptions): Promise<FixAllResult | undefined> {
    const r = await this.request('fixAll', `fix:${key}`, text, file, opts);
    return r?.type === 'fixed' ? r.result : undefined;
  }

  private request(job: Job, key: string, text: string, file: string, opts: AnalyzeOptions, onProgress?: Progress): Promise<WorkerResponse | undefined> {
    if (this.disposed) return Promise.resolve(undefined);
    const seq = ++this.seq;
    const older = this.latest.get(key);
    if (older !== undefined) this.settle(older, undefined);
    this.latest.set(key, seq);
    const worker = this.ensureWorker();
    return new Promise<WorkerResponse | undefined>((resolve, reject) => {
      const timer = this.jobTimeoutMs > 0 ? setTimeout(() => this.hung(seq), this.jobTimeoutMs) : undefined;
      this.inflight.set(seq, { key, job, resolve, reject, timer, onProgress });
      const req: WorkerRequest = { job, seq, key, text, file, opts };
      worker.postMessage(req);
    });
  }

  private ensureWorker(): Worker {
    if (this.worker) return this.worker;
    const w = new Worker(this.workerPath, { name: 'qpoint-analysis' });
    w.on('message', (m: unknown) => this.receive(m));
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
    if (m.type === 'progress') {
      this.inflight.get(m.seq)?.onProgress?.(m.done, m.total);
      return;
    }
    if (m.type === 'report' || m.type === 'fixed') this.lastJobMs = m.ms;
    if (m.type === 'failed') {
      const f = this.inflight.get(m.seq);
      if (f) { this.forget(m.seq, f); f.reject(new Error(m.message)); }
      return;
    }
    this.settle(m.seq, m.type === 'superseded' ? undefined : m);
  }

  private settle(seq: number, value: WorkerResponse | undefined): void {
    const f = this.inflight.get(seq);
    if (!f) return;
    this.forget(seq, f);
    f.resolve(value);
  }

  private forget(seq: number, f: Inflight): void {
    clearTimeout(f.timer);
    this.inflight.delete(seq);
    if (this.latest.get(f.key) === seq) this.latest.delete(f.key);
  }

  private hung(seq: number): void {
    const f = this.inflight.get(seq);
    if (!f || !this.worker) return;
    this.log(`analysis job ${seq} (${f.job}) ran over ${this.jobTimeoutMs} ms; restarting the worker`);
    const w = this.worker;
    this.failAll(w, `analysis took longer than ${this.jobTimeoutMs} ms`);
    void w.terminate();
  }

  private failAll(w: Worker, message: string): void {
    if (this.worker !== w) return;
    this.worker = undefined;
    if (!this.disposed) this.log(message);
    for (const [seq, f] of [...this.inflight]) {
      this.forget(seq, f);
      f.reject(new Error(message));
    }
  }

  /** True while a job of `key` (any key when omitted) is waiting for its answer. */
  busy(key?: string): boolean {
    return [...this.inflight.values()].some((f) => key === undefined || f.key === key);
  }

  /** Stops the job of `key` at once by terminating the worker thread: a job inside the worker
   *  cannot be interrupted otherwise. Every job in that thread resolves `undefined`; the next
   *  request starts a fresh thread. Resolves, once the thread has exited, to whether a job was
   *  stopped. */
  async cancel(key: string): Promise<boolean> {
    const w = this.worker;
    if (!w || !this.busy(key)) return false;
    this.worker = undefined;
    for (const [seq, f] of [...this.inflight]) { this.forget(seq, f); f.resolve(undefined); }
    await w.terminate();
    return true;
  }

  dispose(): void {
    if (this.disposed) return;
    this.disposed = true;
    for (const [seq, f] of [...this.inflight]) { this.forget(seq, f); f.resolve(undefined); }
    const w = this.worker;
    this.worker = undefined;
    void w?.terminate();
  }
}
