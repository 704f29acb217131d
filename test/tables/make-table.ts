/**
 * Test-only: a characterisation table (design §11 CSV) written from a channel function on a
 * grid, so a table device can be checked against the equations it was made from.
 */
import { evalDevice } from '../../src/core/models/evaluate';
import type { DeviceParams, ModelKind } from '../../src/core/types';

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
