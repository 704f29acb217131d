/**
 * The gm/ID view of a table device (issue 17): the table's gm/ID and ID/W versus VGS at the
 * device's length, VDS and VSB, carried by the report with its curves; the operating point lies
 * on it. The example's `res_bias` runs on its low-threshold table.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { analyzeText } from '../../../src/core/analyze';
import type { MosDeviceReport } from '../../../src/core/types';
import { EXAMPLE_PATH, exampleTables } from '../../example-tables';

const report = analyzeText(readFileSync(EXAMPLE_PATH, 'utf8'), 'sensor-afe.bias.yaml', { curve: true, tables: exampleTables() });
const resBias = report.mirrors.find((m) => m.name === 'res_bias')!;
/** The table mirror's devices (MOSFETs: the table model is a MOSFET model). */
const resDevices = resBias.devices as MosDeviceReport[];

/** ln(ID/W) and its slope at v by cubic Hermite between the curve's points, with the curve's own
 *  gm/ID as the slope d ln(ID)/dVGS at each point (the definition of gm/ID). */
function onCurve(c: { vgs: number[]; gmId: number[]; idW: number[] }, v: number): { idW: number; gmId: number } {
  const k = c.vgs.findIndex((x) => x > v) - 1;
  const h = c.vgs[k + 1]! - c.vgs[k]!, t = (v - c.vgs[k]!) / h;
  const y0 = Math.log(c.idW[k]!), y1 = Math.log(c.idW[k + 1]!), s0 = c.gmId[k]!, s1 = c.gmId[k + 1]!;
  const y = (2 * t ** 3 - 3 * t ** 2 + 1) * y0 + (t ** 3 - 2 * t ** 2 + t) * h * s0 + (-2 * t ** 3 + 3 * t ** 2) * y1 + (t ** 3 - t ** 2) * h * s1;
  const dy = ((6 * t ** 2 - 6 * t) * y0 + (-6 * t ** 2 + 6 * t) * y1) / h + (3 * t ** 2 - 4 * t + 1) * s0 + (3 * t ** 2 - 2 * t) * s1;
  return { idW: Math.exp(y), gmId: dy };
}

describe('gm/ID view of a table device', () => {
  it('every device of the table mirror has its curve, at its own L, VDS and VSB; analytic devices have none', () => {
    expect(resBias.devices.length).toBeGreaterThan(0);
    for (const d of resDevices) {
      const c = d.tableCurve!;
      expect(c.table).toBe('halden180-nlvt.devtable.csv');
      expect(c.l).toBe(d.l);
      expect(c.vds).toBeCloseTo(Math.abs(d.vds), 12);
      expect(c.vsb).toBeCloseTo(Math.max(0, -d.vbs), 12);
      expect(c.vgs.length).toBeGreaterThan(10);
    }
    const analytic = report.mirrors.filter((m) => m.devices.every((d) => d.table === undefined));
    expect(analytic.length).toBeGreaterThan(0);
    for (const m of analytic) for (const d of m.devices) expect('tableCurve' in d).toBe(false);
  });
  it('the operating point lies on the curve: ID/W within 0.2 %, gm/ID within 1 % (Hermite between its points)', () => {
    for (const d of resDevices) {
      const p = onCurve(d.tableCurve!, d.vgs);
      expect(Math.abs(p.idW / (d.id / (d.m * d.w)) - 1), d.name).toBeLessThan(2e-3);
      expect(Math.abs(p.gmId / d.gmId - 1), d.name).toBeLessThan(0.01);
    }
  });
  it('gm/ID falls and ID/W rises with VGS (moderate to strong inversion on the invented table)', () => {
    const c = resDevices[0]!.tableCurve!;
    const hi = c.vgs.length - 1;
    expect(c.gmId[hi]!).toBeLessThan(c.gmId[Math.floor(hi / 2)]!);
    expect(c.idW[hi]!).toBeGreaterThan(c.idW[Math.floor(hi / 2)]!);
  });
  it('without curves (check, the editor\'s diagnostics) no device carries one', () => {
    const plain = analyzeText(readFileSync(EXAMPLE_PATH, 'utf8'), 'sensor-afe.bias.yaml', { tables: exampleTables() });
    for (const m of plain.mirrors) for (const d of m.devices) expect('tableCurve' in d).toBe(false);
  });
});
