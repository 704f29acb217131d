/** table-range (warning): a table device operates outside its characterisation table's grid,
 *  where its figures come from the interpolant's end tangents, not from the designer's data. */
import type { DeviceTable, MosDeviceReport } from '../../types';
import { isBipolarReport } from '../../device-types';
import type { Draft, RuleContext } from '../model';
import { draftKey } from '../model';
import { deviceRange, refOf, sizeToken, type Site } from '../sites';
import { code, formatSI } from '../../text/format';
import { ZERO_CELSIUS } from '../../defaults';
import { paramsOfDevice, siteDevices } from './common';

/** A hair of rounding at the grid's edge is not outside it. */
const EDGE = 1e-9;

/** The first axis of `t` that `d` (at temperature `tK`) lies outside, in words. A report's
 *  voltages are device-frame magnitudes (its `vbs` holds VSB). */
function outsideTable(t: DeviceTable, d: MosDeviceReport, tK: number): { axis: string; why: string } | undefined {
  const checks: [string, number, readonly number[], string][] = [
    ['vgs', d.vgs, t.vgs, 'V'], ['vds', Math.abs(d.vds), t.vds, 'V'], ['vsb', d.vbs, t.vsb, 'V'], ['l', d.l, t.l, 'm'],
  ];
  for (const [axis, v, grid, unit] of checks) {
    const lo = grid[0]!, hi = grid[grid.length - 1]!;
    const tol = EDGE * Math.max(1, Math.abs(hi - lo));
    if (v < lo - tol || v > hi + tol) return { axis, why: `${axis} = ${formatSI(v, unit)} is outside the table's ${formatSI(lo, unit)} … ${formatSI(hi, unit)}` };
  }
  const temps = t.temperature;
  if (temps && (tK < temps[0]! - EDGE || tK > temps[temps.length - 1]! + EDGE)) {
    const c = (k: number): string => `${(k - ZERO_CELSIUS).toFixed(1)} °C`;
    return { axis: 'temperature', why: `temperature ${c(tK)} is outside the table's ${c(temps[0]!)} … ${c(temps[temps.length - 1]!)}` };
  }
  return undefined;
}

export function checkTableRange(rc: RuleContext, site: Site): Draft[] {
  const drafts: Draft[] = [];
  for (const d of siteDevices(site)) {
    if (isBipolarReport(d)) continue;   // a bipolar device has no table
    const table = paramsOfDevice(rc.spec, site, d).table;
    if (!table) continue;
    const out = outsideTable(table, d, rc.spec.process.temperature);
    if (!out) continue;
    const why = out.why;
    // A length off the grid points at the written length; any other axis at the device.
    const tok = out.axis === 'l' ? sizeToken(rc.parsed, rc.spec, refOf(site, d), 'l') : undefined;
    const at = tok ? { path: tok.path, range: tok.range } : deviceRange(rc.parsed, rc.spec, refOf(site, d), ['l', 'w']);
    drafts.push({
      key: draftKey('table-range', site.path, d.name),
      mirrorIndex: site.mirrorIndex,
      finding: {
        severity: 'warning', code: 'table-range', path: at.path, range: at.range,
        message: `${code(d.name)} (table \`${table.file}\`): ${why}; the point is clamped to the grid's edge (continued along its end tangent), not taken from your data`,
      },
    });
  }
  return drafts;
}
