/**
 * A noise plot leaves off the parts that carry under a millionth of the noise power (a density
 * under 1e-3 of the lowest total, everywhere): they would stretch a log axis over decades nobody
 * reads. The 1e-3 cut is the project's own drawing choice (common practice: plot what can be seen).
 */
import { describe, expect, it } from 'vitest';
import { visibleNoiseParts } from '../../src/core/report/noise-parts';
import { noisePlotData } from '../../webview/plot-data';
import type { MirrorReport } from '../../src/core/types';

const spectrum = {
  f: [1e3, 1e4, 1e5],
  total: [4e-12, 2e-12, 1e-12],
  parts: { out: [3e-12, 1.5e-12, 0.8e-12], ref: [2e-12, 1e-12, 0.5e-12], startup: [1e-19, 1e-19, 1e-19], edge: [2e-15, 5e-16, 1e-16] },
};

describe('noise parts a plot draws', () => {
  it('keeps a part that reaches 1e-3 of the lowest total anywhere, drops one that never does', () => {
    expect(visibleNoiseParts(spectrum).map(([n]) => n)).toEqual(['out', 'ref', 'edge']);
  });
  it('the panel draws the kept parts, each point under the cut left out', () => {
    const m = { noise: { f: 1e5, spectrum } } as unknown as MirrorReport;
    const d = noisePlotData(m)!;
    expect(d.parts.map((p) => p.name)).toEqual(['out', 'ref', 'edge']);
    const edge = d.parts.find((p) => p.name === 'edge')!;
    expect(edge.y[0]).not.toBeNull();
    expect(edge.y[1]).toBeNull();
    expect(edge.y[2]).toBeNull();
  });
});
