/**
 * `table:` values (design §11): the characterisation tables a spec names, looked up in the
 * texts the front end read (the core reads no file) and checked. A problem in a table is a
 * finding on the `table:` value that names the table's line and column.
 *
 * `table: n.csv` names one file; `table: [n-27.csv, n-125.csv]` names one file per temperature
 * (each with a single-valued `temperature` column), interpolated between.
 */
import type { DeviceTable, SpecPath } from '../types';
import { readTable, type TableRead } from '../models/table/read';
import type { FindingSink } from './findings';
import { typeName } from './values';
import { isRecord } from './params';
import { digestOf, recordSource } from '../canonical';

/** Table texts by the name the spec writes (`table:` value), or why the front end could not
 *  read that file. */
export type TableTexts = Readonly<Record<string, string | { error: string }>>;

/** Parsed tables by their text: a fix's re-check reads the same texts again (a few entries). */
const parsedByText = new Map<string, TableRead>();
const CACHE_TEXTS = 8;

function parseCached(text: string, file: string): TableRead {
  const hit = parsedByText.get(text);
  if (hit && (!hit.ok || hit.table.file === file)) return hit;
  const read = readTable(text, file);
  // A result kept across analyses is keyed by the table's text, not by its grid (canonical.ts).
  if (read.ok) recordSource(read.table.id, () => text);
  if (parsedByText.size >= CACHE_TEXTS) parsedByText.delete(parsedByText.keys().next().value!);
  parsedByText.set(text, read);
  return read;
}

/** The table a `table:` value names, or undefined with findings on the value. */
export function readTableValue(sink: FindingSink, tables: TableTexts | undefined, raw: unknown, path: SpecPath): DeviceTable | undefined {
  const names = typeof raw === 'string' ? [raw] : Array.isArray(raw) && raw.length > 0 && raw.every((x) => typeof x === 'string') ? raw as string[] : undefined;
  if (!names || names.some((n) => n.trim() === '')) {
    sink.error('wrong-type', `\`table\` is a file name relative to the spec (or a list of them, one per temperature); got ${typeName(raw)}`, path, undefined, 'type');
    return undefined;
  }
  const read: DeviceTable[] = [];
  names.forEach((name, k) => {
    const at = typeof raw === 'string' ? path : [...path, k];
    const t = oneTable(sink, tables, name.trim(), at);
    if (t) read.push(t);
  });
  if (read.length !== names.length) return undefined;
  return read.length === 1 ? read[0] : mergeTemperatures(sink, read, path);
}

function oneTable(sink: FindingSink, tables: TableTexts | undefined, name: string, path: SpecPath): DeviceTable | undefined {
  const text = tables?.[name];
  if (text === undefined) {
    sink.error('table-unread', `table \`${name}\` was not read: the analysis was given no file by that name`, path);
    return undefined;
  }
  if (isRecord(text)) {
    sink.error('table-unread', `table \`${name}\` cannot be read: ${String(text.error)}`, path);
    return undefined;
  }
  const r = parseCached(text, name);
  if (r.ok) return r.table;
  for (const p of r.problems) sink.error('table-error', `table \`${name}\` line ${p.line}, column ${p.column}: ${p.message}`, path, undefined, `table:${p.line}:${p.column}`);
  return undefined;
}

const same = (a: readonly number[], b: readonly number[]): boolean => a.length === b.length && a.every((x, k) => x === b[k]);

/** One table per temperature → one table with a temperature axis. */
function mergeTemperatures(sink: FindingSink, list: DeviceTable[], path: SpecPath): DeviceTable | undefined {
  const first = list[0]!;
  for (const [k, t] of list.entries()) {
    if (t.temperature?.length !== 1) {
      sink.error('table-error', `table \`${t.file}\`: one table per temperature needs a \`temperature\` column with one value`, [...path, k]);
      return undefined;
    }
    if (!same(t.l, first.l) || !same(t.vgs, first.vgs) || !same(t.vds, first.vds) || !same(t.vsb, first.vsb)) {
      sink.error('table-error', `table \`${t.file}\` has another grid than \`${first.file}\` (l, vgs, vds, vsb must match to interpolate between temperatures)`, [...path, k]);
      return undefined;
    }
  }
  const sorted = [...list].sort((a, b) => a.temperature![0]! - b.temperature![0]!);
  for (let k = 1; k < sorted.length; k++) {
    if (sorted[k]!.temperature![0] === sorted[k - 1]!.temperature![0]) {
      sink.error('table-error', `tables \`${sorted[k - 1]!.file}\` and \`${sorted[k]!.file}\` hold the same temperature`, path);
      return undefined;
    }
  }
  const per = first.id.length;
  const id = new Float64Array(per * sorted.length);
  sorted.forEach((t, k) => id.set(t.id, k * per));
  recordSource(id, () => sorted.map((t) => digestOf(t.id)).join(' '));
  return { file: sorted.map((t) => t.file).join(', '), l: first.l, vgs: first.vgs, vds: first.vds, vsb: first.vsb, temperature: sorted.map((t) => t.temperature![0]!), id };
}

/** Every table file a spec's data names (process, device flavours, corners): what a front end
 *  reads before it analyses. */
export function tableNames(data: unknown): string[] {
  const out = new Set<string>();
  const take = (v: unknown): void => {
    if (typeof v === 'string' && v.trim() !== '') out.add(v.trim());
    else if (Array.isArray(v)) for (const x of v) take(x);
  };
  const fromDevices = (m: unknown): void => {
    if (!isRecord(m)) return;
    for (const d of Object.values(m)) if (isRecord(d)) take(d.table);
  };
  if (!isRecord(data)) return [];
  if (isRecord(data.process)) {
    take(isRecord(data.process.nmos) ? data.process.nmos.table : undefined);
    take(isRecord(data.process.pmos) ? data.process.pmos.table : undefined);
    fromDevices(data.process.devices);
  }
  if (isRecord(data.corners)) {
    for (const c of Object.values(data.corners)) {
      if (!isRecord(c)) continue;
      take(isRecord(c.nmos) ? c.nmos.table : undefined);
      take(isRecord(c.pmos) ? c.pmos.table : undefined);
      fromDevices(c.devices);
    }
  }
  return [...out];
}
