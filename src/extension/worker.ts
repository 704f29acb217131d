/**
 * The analysis worker thread (bundled to dist/worker.js): runs the core off the extension host's
 * main thread so typing never stutters. Requests that arrive while an analysis runs are queued by
 * key; only the newest per key is analysed, the older ones are answered `superseded`.
 *
 * Each key (a document) keeps what its analyses solved (core/analysis-cache.ts): a keystroke in
 * one mirror solves and re-checks that mirror again and reads the others' results back.
 */
import { parentPort } from 'node:worker_threads';
import { analyzeText, type AnalyzeOptions } from '../core/analyze';
import { fixAll } from '../core/rules/fix-all';
import { AnalysisCache } from '../core/analysis-cache';
import { isWorkerRequest, type WorkerRequest, type WorkerResponse } from './workerProtocol';
import { readTables, type TableCache } from '../node/tables';
import { compactParts, SentParts } from './diagnosticParts';

const port = parentPort;
if (!port) throw new Error('qpoint worker: must run in a worker thread');

const pending = new Map<string, WorkerRequest>();

/** The caches of the documents analysed last (a Map keeps insertion order: the first is the oldest). */
const caches = new Map<string, AnalysisCache>();
const MAX_CACHES = 8;

function cacheOf(key: string): AnalysisCache {
  let c = caches.get(key);
  if (c) caches.delete(key);
  else c = new AnalysisCache();
  caches.set(key, c);
  if (caches.size > MAX_CACHES) caches.delete(caches.keys().next().value!);
  return c;
}
let scheduled = false;

/** What each key's last findings message carried (the host keeps the same). */
const sent = new SentParts();

function send(m: WorkerResponse): void {
  port!.postMessage(m);
}

/** Table texts by path, kept while their files are unchanged. */
const tableCache: TableCache = new Map();

/** The core's options of a request: the tables read beside the spec, the spec's path dropped. */
function coreOptions(req: WorkerRequest): AnalyzeOptions {
  const { specPath, ...opts } = req.opts;
  return specPath ? { ...opts, tables: readTables(specPath, req.text, tableCache) } : opts;
}

function run(req: WorkerRequest): WorkerResponse {
  const t0 = performance.now();
  try {
    req = { ...req, opts: coreOptions(req) };
    if (req.job === 'fixAll') {
      const result = fixAll(req.text, req.file, (text) => analyzeText(text, req.file, req.opts));
      return { type: 'fixed', seq: req.seq, key: req.key, result, ms: performance.now() - t0 };
    }
    const cache = cacheOf(req.key);
    const report = analyzeText(req.text, req.file, req.opts, req.opts.mc ? { mcProgress: progressOf(req), cache } : { cache });
    return { type: 'report', seq: req.seq, key: req.key, report, ms: performance.now() - t0 };
  } catch (err) {
    return { type: 'failed', seq: req.seq, key: req.key, message: err instanceof Error ? err.message : String(err) };
  }
}

/** Progress messages of a Monte Carlo job, at most one per PROGRESS_MS, and the last one. They
 *  reach the host while the job runs: posting does not wait for this thread to be idle. */
const PROGRESS_MS = 150;
function progressOf(req: WorkerRequest): (done: number, total: number) => void {
  let last = 0;
  return (done, total) => {
    const now = performance.now();
    if (done < total && now - last < PROGRESS_MS) return;
    last = now;
    send({ type: 'progress', seq: req.seq, key: req.key, done, total });
  };
}

/** One job per turn of the event loop, so messages that arrived meanwhile are seen first. */
function drain(): void {
  scheduled = false;
  const next = pending.entries().next();
  if (next.done) return;
  const [key, req] = next.value;
  pending.delete(key);
  send({ type: 'started', seq: req.seq, key: req.key });
  const startedAt = performance.timeOrigin + performance.now();
  const answer = run(req);
  // The findings first: the editor's diagnostics do not wait for the whole report to be copied.
  // By part, the parts the host has from this key's last findings message as null.
  // The fixes stay behind (they come with the report), copied off the parts sent only.
  if (answer.type === 'report') {
    const last = sent.get(answer.key);
    const { parts, message } = compactParts(answer.report.findings, last?.parts);
    sent.set(answer.key, answer.seq, parts);
    const bare = message.map((p) => p && p.map(({ fixes: _fixes, ...f }) => f));
    send({ type: 'findings', seq: answer.seq, key: answer.key, parts: bare, ...(last ? { base: last.seq } : {}), ms: answer.ms, startedAt, sentAt: performance.timeOrigin + performance.now() });
  }
  send(answer);
  schedule();
}

function schedule(): void {
  if (!scheduled && pending.size > 0) {
    scheduled = true;
    setImmediate(drain);
  }
}

port.on('message', (m: unknown) => {
  if (!isWorkerRequest(m)) return;
  const older = pending.get(m.key);
  if (older) send({ type: 'superseded', seq: older.seq, key: older.key });
  pending.set(m.key, m);
  schedule();
});
