/**
 * The analysis worker client with the real worker bundle (dist/worker.js, built by `npm test`):
 * supersession by key, answers for the newest text only, recovery from a hung worker.
 * The analysed spec is the Razavi level-1 device D (docs/references.md; set from memory, numbers
 * computed there): a simple NMOS mirror, W/L = 10, IREF = 100 µA, VOUT = 1.5 V → IOUT =
 * 103.9103 µA (docs/references.md §9 "Constructed check on D").
 */
import { describe, expect, it } from 'vitest';
import { existsSync, mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { isWorkerRequest, isWorkerResponse } from '../../src/extension/workerProtocol';
import { D_SPEC, trackedAnalyzers, WORKER } from './worker-fixtures';

const make = trackedAnalyzers();

describe('worker protocol guards', () => {
  it('rejects malformed messages', () => {
    expect(isWorkerRequest({ job: 'analyze', seq: 1, key: 'k', text: '', file: 'f', opts: {} })).toBe(true);
    expect(isWorkerRequest({ job: 'run', seq: 1, key: 'k', text: '', file: 'f', opts: {} })).toBe(false);
    expect(isWorkerRequest({ job: 'analyze', seq: '1', key: 'k', text: '', file: 'f', opts: {} })).toBe(false);
    expect(isWorkerRequest(null)).toBe(false);
    expect(isWorkerResponse({ type: 'report', seq: 1, key: 'k', report: {}, ms: 1 })).toBe(true);
    expect(isWorkerResponse({ type: 'report', seq: 1, key: 'k', ms: 1 })).toBe(false);
    expect(isWorkerResponse({ type: 'superseded', seq: 1 })).toBe(false);
    expect(isWorkerResponse({ type: 'failed', seq: 1, key: 'k', message: 3 })).toBe(false);
  });
});

describe('WorkerAnalyzer with dist/worker.js', () => {
  it('is built', () => {
    expect(existsSync(WORKER), 'run `node esbuild.mjs` first (npm test does)').toBe(true);
  });

  it('analyses off the main thread: the D mirror copies 103.91 µA at 1.5 V', async () => {
    const report = await make().analyze('a', D_SPEC('100u'), 'd.bias.yaml', {});
    expect(report?.parsed).toBe(true);
    const m = report!.mirrors[0];
    expect(m.iout).toBeCloseTo(103.9103e-6, 9);  // docs/references.md §9, to 0.1 nA
  });

  it('answers only the newest request of a key; older ones resolve undefined', async () => {
    const a = make();
    const first = a.analyze('doc', D_SPEC('100u'), 'd.bias.yaml', {});
    const second = a.analyze('doc', D_SPEC('50u'), 'd.bias.yaml', {});
    const third = a.analyze('doc', D_SPEC('200u'), 'd.bias.yaml', {});
    const other = a.analyze('other', D_SPEC('100u'), 'd.bias.yaml', {});
    const [r1, r2, r3, r4] = await Promise.all([first, second, third, other]);
    expect(r1).toBeUndefined();
    expect(r2).toBeUndefined();
    // Same mirror at twice the current: the square law keeps IOUT/IREF (same VOUT) but VOV grows
    // by √2, so the check is the input branch: iin equals the ideal 200 µA source.
    expect(r3!.mirrors[0].iin).toBeCloseTo(200e-6, 12);
    expect(r4!.mirrors[0].iout).toBeCloseTo(103.9103e-6, 9);
  });

  it('replaces a hung worker and fails only the job that hung', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'qpoint-hang-'));
    const hang = join(dir, 'hang.js');
    writeFileSync(hang, "require('node:worker_threads').parentPort.on('message', () => { for (;;) {} });\n");
    const a = make(hang, 300);
    // The rejection names the 300 ms job limit: the hang was cut by it, not by the test timeout.
    await expect(a.analyze('k', 'x', 'f', {})).rejects.toThrow(/longer than 300 ms/);
    // A fresh worker is started for the next request (it hangs too, by construction).
    await expect(a.analyze('k', 'x', 'f', {})).rejects.toThrow(/longer than 300 ms/);
  });

  it('resolves pending requests undefined on dispose', async () => {
    const a = make();
    const p = a.analyze('k', D_SPEC('100u'), 'd.bias.yaml', {});
    a.dispose();
    await expect(p).resolves.toBeUndefined();
  });
});
