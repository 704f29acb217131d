/**
 * The analysis worker client with the real worker bundle (dist/worker.js, built by `npm test`):
 * supersession by key, answers for the newest text only, recovery from a hung worker, a time
 * budget per job so that one hostile file never starves the others.
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
import { splitParts } from '../../src/extension/diagnosticParts';
import { faultySpecText } from '../../scripts/spec-texts';
import type { Finding } from '../../src/core/types';

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
    expect(isWorkerResponse({ type: 'findings', seq: 1, key: 'k', parts: [null, []], base: 0, ms: 1, startedAt: 0, sentAt: 0 })).toBe(true);
    expect(isWorkerResponse({ type: 'findings', seq: 1, key: 'k', parts: [], base: '0', ms: 1, startedAt: 0, sentAt: 0 })).toBe(false);
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

  it('hands over the findings before the report, the unchanged parts read from the last message', async () => {
    const a = make();
    const text = faultySpecText(40);
    const early: Finding[][] = [];
    const onFindings = (f: Finding[]): void => { early.push(f); };
    const r1 = await a.analyze('doc', text, 'big.bias.yaml', {}, undefined, onFindings);
    // Mirror 35 (the second part of 32 mirrors) typed over.
    const at = text.indexOf('input: ', text.indexOf('_35\n'));
    const r2 = await a.analyze('doc', `${text.slice(0, at)}input: 27u${text.slice(text.indexOf('\n', at))}`, 'big.bias.yaml', {}, undefined, onFindings);
    expect(early.length).toBe(2);
    const bare = (fs: Finding[]) => splitParts(fs).flat().map(({ fixes: _fixes, ...f }) => f);
    expect(early[0]).toEqual(bare(r1!.findings));
    expect(early[1]).toEqual(bare(r2!.findings));
    // The first part came from the first message: the same objects.
    const first = splitParts(early[0]!)[0]!;
    expect(first.length).toBeGreaterThan(0);
    expect(splitParts(early[1]!)[0]!.every((f, k) => f === first[k])).toBe(true);
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

  it('keeps analysing a valid file while a hostile one is open (issue 14)', async () => {
    // The hostile job: Monte Carlo at the editor's largest sample count (package.json,
    // qpoint.monteCarlo.samples maximum 10^7) on a mirror with Pelgrom coefficients, which runs
    // for minutes. Budget 4 s; the valid file is the D mirror (docs/references.md §9).
    const a = make(WORKER, 4000);
    const hostile = D_SPEC('100u', ', avt: 4e-9, abeta: 1e-8');
    const slow = { mc: { samples: 10_000_000, seed: 1 } };
    const valid = D_SPEC('100u');
    // Round 1: the hostile file is asked first, so the valid one waits behind it in the worker's
    // queue; it must be handed to the fresh worker when the hostile job is stopped.
    const h1 = a.analyze('hostile', hostile, 'hostile.bias.yaml', slow);
    const v1 = a.analyze('valid', valid, 'valid.bias.yaml', {});
    const [hr, vr] = await Promise.all([h1, v1]);
    expect(vr!.mirrors[0].iout).toBeCloseTo(103.9103e-6, 9);  // docs/references.md §9, to 0.1 nA
    expect(hr!.mirrors).toEqual([]);
    expect(hr!.findings.map((f) => [f.code, f.severity, f.range.start])).toEqual([['analysis-timeout', 'error', { line: 0, character: 0 }]]);
    expect(hr!.findings[0].message).toMatch(/^qpoint stopped analysing this file after 4 s so that the other open specs are analysed meanwhile/);
    // Round 2: the designer edits both; the hostile file is re-analysed (and stopped again) while
    // the valid one is analysed twice more, each time with its own answer.
    const h2 = a.analyze('hostile', hostile + '# edited\n', 'hostile.bias.yaml', slow);
    const v2 = a.analyze('valid', D_SPEC('50u'), 'valid.bias.yaml', {});
    const v2r = await v2;
    expect(v2r!.mirrors[0].iin).toBeCloseTo(50e-6, 12);  // the ideal input source of the spec
    const v3 = await a.analyze('valid', D_SPEC('200u'), 'valid.bias.yaml', {});
    expect(v3!.mirrors[0].iin).toBeCloseTo(200e-6, 12);
    expect((await h2)!.findings.map((f) => f.code)).toEqual(['analysis-timeout']);
    // A job superseded while it runs (its first progress report says it runs) is still stopped,
    // and the newest text of that file is analysed.
    let progressed = (): void => undefined;
    const running = new Promise<void>((resolve) => { progressed = resolve; });
    const h3 = a.analyze('hostile', hostile, 'hostile.bias.yaml', slow, () => progressed());
    await running;
    const fixed = a.analyze('hostile', valid, 'hostile.bias.yaml', {});
    await expect(h3).resolves.toBeUndefined();
    expect((await fixed)!.mirrors[0].iout).toBeCloseTo(103.9103e-6, 9);
  }, 60_000);

  it('resolves pending requests undefined on dispose', async () => {
    const a = make();
    const p = a.analyze('k', D_SPEC('100u'), 'd.bias.yaml', {});
    a.dispose();
    await expect(p).resolves.toBeUndefined();
  });
});
