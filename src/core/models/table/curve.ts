/**
 * A table device's gm/ID view: the table's gm/ID and ID/W versus VGS at the device's length
 * (its slice), VDS and VSB, sampled at the table's own vgs points (exact there along vgs, the
 * other axes interpolated as the solve does), for the panel and the report to draw with the
 * operating point marked.
 */
import type { ModelDevice } from '../device';
import type { TableCurve } from '../../types';
import { evalSlice, type SlicePoint } from './slice';

const pt: SlicePoint = { id: 0, gm: 0, gds: 0, dvsb: 0 };

/** The curve of `dev` (a table device) at device-frame VDS and VSB (V), ID/W per metre of its
 *  total width `width` (m·W, m); undefined for a device without a table or with no current. */
export function tableCurve(dev: ModelDevice, vds: number, vsb: number, width: number): TableCurve | undefined {
  const s = dev.table;
  if (!s || !(width > 0)) return undefined;
  const curve: TableCurve = { table: s.table.file, l: s.l, vds, vsb, vgs: [], gmId: [], idW: [] };
  for (const v of s.vgs) {
    evalSlice(s, v, vds, vsb, pt);
    if (!(pt.id > 0)) continue;
    curve.vgs.push(v + dev.vt0);
    curve.gmId.push(pt.gm / pt.id);
    curve.idW.push((dev.beta * pt.id) / width);
  }
  return curve.vgs.length >= 2 ? curve : undefined;
}
