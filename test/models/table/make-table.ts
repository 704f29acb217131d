/**
 * Test-only: a characterisation table (design §11 CSV) written from a channel function on a
 * grid, so a table device can be checked against the equations it was made from.
 */
import { evalDevice } from '../../../src/core/models/evaluate';
import type { DeviceParams, DeviceTable, ModelKind } from '../../../src/core/types';

export interface Grid { l: number[]; vgs: number[]; vds: number[]; vsb: number[]; temperature?: number[] }

/** Evenly spaced points from a to b, n of them. */
export function span(a: number, b: number, n: number): number[] {
  return Array.from({ length: n }, (_, k) => a + ((b - a) * k) / (n - 1));
}

/** id per metre of width at (l, vgs, vds, vsb, T in °C). */
export type Channel = (l: number, vgs: number, vds: number, vsb: number, tC: number) => number;

/** The project's own model as a channel: id of a device 1 m wide, m = 1. */
export function modelChannel(params: DeviceParams, model: ModelKind, tnomK = 300.15): Channel {
  return (l, vgs, vds, vsb, tC) => evalDevice(params, { w: 1, l, m: 1 }, vgs, vds, -vsb, tC + 273.15, model, tnomK).id;
}

/** The CSV text of `channel` on `grid` (vds = 0 rows carry id = 0). */
export function tableCsv(channel: Channel, grid: Grid, tC = 27): string {
  const temps = grid.temperature;
  const rows: string[] = [temps ? 'l,vgs,vds,vsb,temperature,id' : 'l,vgs,vds,vsb,id'];
  for (const t of temps ?? [tC]) {
    for (const l of grid.l) for (const vsb of grid.vsb) for (const vds of grid.vds) for (const vgs of grid.vgs) {
      const id = vds === 0 ? 0 : channel(l, vgs, vds, vsb, t);
      rows.push(temps ? `${l},${vgs},${vds},${vsb},${t},${id}` : `${l},${vgs},${vds},${vsb},${id}`);
    }
  }
  return rows.join('\n') + '\n';
}

/** The table of `channel` on `grid` as the reader would produce it (no CSV round trip). */
export function tableOf(channel: Channel, grid: Grid, file = 'test.csv', tC = 27): DeviceTable {
  const temps = grid.temperature ?? [tC];
  const id = new Float64Array(temps.length * grid.l.length * grid.vsb.length * grid.vds.length * grid.vgs.length);
  let k = 0;
  for (const t of temps) for (const l of grid.l) for (const vsb of grid.vsb) for (const vds of grid.vds) for (const vgs of grid.vgs) {
    id[k++] = vds === 0 ? 0 : channel(l, vgs, vds, vsb, t);
  }
  const table: DeviceTable = { file, l: grid.l, vgs: grid.vgs, vds: grid.vds, vsb: grid.vsb, id };
  if (grid.temperature) table.temperature = grid.temperature.map((c) => c + 273.15);
  return table;
}

/** references §2 "D" (Razavi's level-1 set, λ = 0) under EKV, tabulated at L = 1 µm on a grid that
 *  covers the generic model tests (VGS and VDS to 6 V, VSB to 3 V): the table model's stand-in
 *  wherever a test runs over every registered model. */
let razavi: DeviceTable | undefined;
export function razaviTable(): DeviceTable {
  razavi ??= tableOf(modelChannel({ kp: 134e-6, vt0: 0.7, lambda: 0, gamma: 0.45, phi: 0.9, n: 1.3, tcv: 0, bex: -1.5 }, 'ekv', 300),
    { l: [1e-6], vgs: span(0, 6, 121), vds: span(0, 6, 61), vsb: span(0, 3, 13) }, 'razavi-ekv.csv', 300 - 273.15);
  return razavi;
}

/** `params` with the Razavi table when `model` is the table model (the generic model tests). */
export function forModel(model: ModelKind, params: DeviceParams): DeviceParams {
  return model === 'table' ? { ...params, kp: 1, vt0: 0, table: razaviTable() } : params;
}
