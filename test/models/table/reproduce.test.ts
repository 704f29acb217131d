/**
 * A table made from a model reproduces that model (design §11, issue 17's check values): the
 * example spec's mirrors — every kind, NMOS and PMOS, a netlist — solved once on the square law
 * or EKV equations and once on tables of those same equations.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { resolveText } from '../../../src/core/resolve';
import { analyzeSpec } from '../../../src/core/analysis/index';
import type { DeviceParams, MirrorReport, ModelKind, ResolvedSpec } from '../../../src/core/types';
import { KINDS } from '../../../src/core/kinds/index';
import { mainCurrent } from '../../../src/core/device-types';
import { exampleTables } from '../../example-tables';
import { modelChannel, span, tableOf, type Grid } from './make-table';

const EXAMPLE = readFileSync(new URL('../../../examples/sensor-afe.bias.yaml', import.meta.url), 'utf8');

/** Cover the example's supplies (1.8 V) and its lengths (1, 2, 4, 12, 16, 20 µm) as grid points. */
const GRID: Grid = { l: [1e-6, 2e-6, 4e-6, 12e-6, 16e-6, 20e-6], vgs: span(0, 1.8, 181), vds: span(0, 1.8, 73), vsb: span(0, 1, 21) };

/** The channel of `params` under `model`, floored where a strong-inversion model has no current
 *  (ln id is interpolated; a table needs a positive current wherever vds > 0). */
function tabled(p: DeviceParams, model: ModelKind, tnom: number): DeviceParams {
  const ch = modelChannel(p, model, tnom);
  const t = tableOf((l, vgs, vds, vsb, tC) => Math.max(ch(l, vgs, vds, vsb, tC), 1e-21), GRID, `${model}.csv`);
  return { ...p, kp: 1, vt0: 0, table: t };
}

function solveBoth(model: ModelKind): { analytic: MirrorReport[]; table: MirrorReport[] } {
  const spec = resolveText(EXAMPLE.replace('model: square-law', `model: ${model}`), 'example.bias.yaml', { tables: exampleTables() }).parsed.spec!;
  const p = spec.process;
  const tableSpec: ResolvedSpec = { ...spec, process: { ...p, nmos: tabled(p.nmos, model, p.tnom), pmos: tabled(p.pmos, model, p.tnom) } };
  return { analytic: analyzeSpec(spec), table: analyzeSpec(tableSpec) };
}

const rel = (a: number, b: number): number => Math.abs(a / b - 1);

describe.each(['square-law', 'ekv'] as const)('a table of the %s equations reproduces them (issue 17 check values)', (model) => {
  const { analytic, table } = solveBoth(model);

  it('covers every kind of the example, NMOS and PMOS (and its NPN mirrors, which keep their own model)', () => {
    const kinds = new Set(analytic.map((r) => r.kind));
    for (const k of [...Object.keys(KINDS), 'netlist']) expect(kinds.has(k as never), k).toBe(true);
    expect(new Set(analytic.map((r) => r.type))).toEqual(new Set(['nmos', 'pmos', 'npn']));
  });

  it('operating points to 0.1 % in current, gm to 1 %, device by device', () => {
    expect(table.length).toBe(analytic.length);
    analytic.forEach((a, k) => {
      const t = table[k]!;
      expect(t.converged, a.name).toBe(true);
      expect(rel(t.iout, a.iout), `${a.name} iout`).toBeLessThan(1e-3);
      const gmMax = Math.max(...a.devices.map((d) => Math.abs(d.gm)));
      a.devices.forEach((d, j) => {
        const e = t.devices[j]!;
        expect(e.name).toBe(d.name);
        if (Math.abs(mainCurrent(d)) < 1e-6 * Math.abs(a.iout)) {
          // An off start-up device: the square law gives exactly 0 and a table of ln id carries a
          // floor, so a ratio means nothing; the same tolerances apply against the cell's current
          // and its largest gm instead.
          expect(Math.abs(mainCurrent(e) - mainCurrent(d)), `${a.name} ${d.name} id (off)`).toBeLessThan(1e-3 * Math.abs(a.iout));
          expect(Math.abs(e.gm - d.gm), `${a.name} ${d.name} gm (off)`).toBeLessThan(1e-2 * gmMax);
          return;
        }
        expect(rel(mainCurrent(e), mainCurrent(d)), `${a.name} ${d.name} id`).toBeLessThan(1e-3);
        expect(rel(e.gm, d.gm), `${a.name} ${d.name} gm`).toBeLessThan(1e-2);
      });
    });
  });
});
