/**
 * Table benchmarks (design §11): the example spec with every device from a characterisation
 * table of the same equations, against the spec on the square law (budget: ≤ 3× slower), and
 * the read of a 5 MB table (budget: < 200 ms).
 */
import { analyzeSpec } from '../src/core/analysis/index';
import { evalDevice } from '../src/core/models/evaluate';
import { readTable } from '../src/core/models/table/read';
import type { DeviceParams, DeviceTable, ResolvedSpec } from '../src/core/types';

export interface TableBench { squareLawMs: number; tablesMs: number; ratio: number; tableMB: number; readMs: number }

const span = (a: number, b: number, n: number): number[] => Array.from({ length: n }, (_, k) => a + ((b - a) * k) / (n - 1));
const GRID = { l: [1e-6, 4e-6, 20e-6], vgs: span(0, 1.8, 73), vds: span(0, 1.8, 37), vsb: span(0, 1, 11) };

function tabled(p: DeviceParams, spec: ResolvedSpec): DeviceParams {
  const { temperature, tnom } = spec.process;
  const per = GRID.vgs.length * GRID.vds.length * GRID.vsb.length;
  const id = new Float64Array(per * GRID.l.length);
  let k = 0;
  for (const l of GRID.l) for (const vsb of GRID.vsb) for (const vds of GRID.vds) for (const vgs of GRID.vgs) {
    id[k++] = vds === 0 ? 0 : Math.max(evalDevice(p, { w: 1, l, m: 1 }, vgs, vds, -vsb, temperature, 'square-law', tnom).id, 1e-21);
  }
  const table: DeviceTable = { file: 'bench.csv', ...GRID, id };
  return { ...p, kp: 1, vt0: 0, table };
}

/** CSV text of about `mb` megabytes (a dense grid of a square-law channel). */
function bigTable(mb: number): string {
  const rows = ['l,vgs,vds,vsb,id'];
  let size = 0;
  const vgs = span(0, 1.8, 181), vds = span(0, 1.8, 46);
  // Whole grids of 4 vsb × 46 vds × 181 vgs (about 1 MB) per length, until the text reaches mb.
  for (let li = 0; size < mb * 1e6; li++) {
    const l = (1 + li) * 1e-7;
    for (const vsb of [0, 0.3, 0.6, 0.9]) for (const d of vds) for (const g of vgs) {
      const v = Math.max(g - 0.45 - 0.2 * vsb, 0);
      const row = `${l.toPrecision(4)},${g.toFixed(3)},${d.toFixed(3)},${vsb},${d === 0 ? 0 : (1e-9 + 140 * v * v * (1 + 0.05 * d)).toPrecision(7)}`;
      rows.push(row);
      size += row.length + 1;
    }
  }
  return rows.join('\n') + '\n';
}

export function benchTables(example: ResolvedSpec, timeFn: (runs: number, warm: number, f: () => void) => { median: number }, runs: number): TableBench {
  const p = example.process;
  // Square law on both sides of the comparison: the table stands for exactly those equations.
  const square: ResolvedSpec = { ...example, process: { ...p, model: 'square-law', devices: undefined } };
  const tables: ResolvedSpec = { ...square, process: { ...square.process, nmos: tabled(p.nmos, example), pmos: tabled(p.pmos, example) } };
  const squareLawMs = timeFn(runs, 10, () => analyzeSpec(structuredClone(square), { repeats: false })).median;
  const tablesMs = timeFn(runs, 10, () => analyzeSpec({ ...tables, mirrors: structuredClone(tables.mirrors) }, { repeats: false })).median;
  const text = bigTable(5);
  const readMs = timeFn(5, 1, () => { readTable(text, 'big.csv'); }).median;
  return { squareLawMs, tablesMs, ratio: tablesMs / squareLawMs, tableMB: text.length / 1e6, readMs };
}
