/**
 * Shared by the tests that drive the real analysis worker bundle (dist/worker.js, built by
 * `npm test`): the Razavi level-1 device D as a simple NMOS mirror (docs/references.md; set from
 * memory), W/L = 10, VOUT = 1.5 V, and analyzers that are disposed after each test.
 */
import { afterEach } from 'vitest';
import { resolve } from 'node:path';
import { WorkerAnalyzer } from '../../src/extension/analyzer';

export const WORKER = resolve(__dirname, '../../dist/worker.js');

/** The D mirror with input current `iin`; `nmosExtra` adds NMOS parameters (e.g. Pelgrom's). */
export const D_SPEC = (iin: string, nmosExtra = '') => `format: 1
process:
  tnom: 300 K
  nmos: { kp: 134u, vt0: 0.7, lambda: 0.1, gamma: 0.45, phi: 0.9${nmosExtra} }
  pmos: { kp: 38u, vt0: 0.8, lambda: 0.2, gamma: 0.4, phi: 0.8 }
supplies: { vdd: 3 }
mirrors:
  - name: copy
    kind: simple
    type: nmos
    input: ${iin}
    size: { w: 10u, l: 1u }
    output: { v: 1.5 }
`;

/** A factory of analyzers over `path`, each disposed after the test that made it. */
export function trackedAnalyzers(defaultTimeoutMs?: number): (path?: string, jobTimeoutMs?: number) => WorkerAnalyzer {
  let made: WorkerAnalyzer[] = [];
  afterEach(() => {
    for (const a of made) a.dispose();
    made = [];
  });
  return (path = WORKER, jobTimeoutMs = defaultTimeoutMs) => {
    const a = new WorkerAnalyzer(path, { jobTimeoutMs });
    made.push(a);
    return a;
  };
}
