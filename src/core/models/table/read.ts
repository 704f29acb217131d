/**
 * Reading a characterisation table (design §11, §14): a CSV file of qpoint's own format, a
 * header row naming the columns `l` (m), `vgs`, `vds`, `vsb` (V; magnitudes for PMOS), `id`
 * (A per metre of width) and optionally `temperature` (°C), then one row per point of a full
 * grid, in any order. Lines starting with `#` are comments; other columns are ignored (a
 * simulator's export may carry gm or gds beside id). The format is numbers and commas only,
 * so it is read here in one pass rather than through a general CSV library: a 5 MB table must
 * load in well under 200 ms, and every error must name its line and column.
 */
import { ZERO_CELSIUS } from '../../defaults';
import type { DeviceTable } from '../../types';

/** A problem in a table, 1-based line and column (characters) for the message. */
export interface TableProblem { line: number; column: number; message: string }

export type TableRead = { ok: true; table: DeviceTable } | { ok: false; problems: TableProblem[] };

const REQUIRED = ['l', 'vgs', 'vds', 'vsb', 'id'] as const;
type Column = (typeof REQUIRED)[number] | 'temperature';
/** Problems listed per table before the rest are left unsaid (the first few say what is wrong). */
const MAX_PROBLEMS = 5;
/** Largest grid accepted (points): a 20 MB file holds about 500 000 rows. */
const MAX_POINTS = 2_000_000;

/** Parse and check a table's text; `file` is the name the spec gives it. */
export function readTable(text: string, file: string): TableRead {
  const problems: TableProblem[] = [];
  const lines = text.split('\n');
  let header = -1;
  for (let i = 0; i < lines.length; i++) {
    const s = lines[i]!.trim();
    if (s !== '' && !s.startsWith('#')) { header = i; break; }
  }
  if (header < 0) return { ok: false, problems: [{ line: 1, column: 1, message: 'the table has no header row (l, vgs, vds, vsb, id)' }] };
  const names = lines[header]!.replace(/^\uFEFF/, '').split(',').map((s) => s.trim().toLowerCase());
  const at: Partial<Record<Column, number>> = {};
  names.forEach((n, k) => {
    if ((REQUIRED as readonly string[]).includes(n) || n === 'temperature') {
      if (at[n as Column] !== undefined) problems.push({ line: header + 1, column: columnStart(lines[header]!, k), message: `column \`${n}\` is named twice` });
      else at[n as Column] = k;
    }
  });
  const absent = REQUIRED.filter((c) => at[c] === undefined);
  if (absent.length > 0) {
    problems.push({ line: header + 1, column: 1, message: `missing column${absent.length > 1 ? 's' : ''} ${absent.map((c) => `\`${c}\``).join(', ')} (the header names ${names.map((n) => `\`${n}\``).join(', ')})` });
  }
  if (problems.length > 0) return { ok: false, problems };
  const cols: Column[] = at.temperature === undefined ? [...REQUIRED] : [...REQUIRED, 'temperature'];
  const index = cols.map((c) => at[c]!);
  const width = names.length;

  // Rows: the values of the named columns, one Float64Array per column, and each row's line.
  // One scan over the text (no per-line arrays): a 5 MB table reads in tens of milliseconds.
  const cap = lines.length - header;
  const values = cols.map(() => new Float64Array(cap));
  const rowLine = new Int32Array(cap);
  const want = new Int32Array(width).fill(-1);
  index.forEach((k, c) => { want[k] = c; });
  let rows = 0;
  for (let i = header + 1; i < lines.length && problems.length < MAX_PROBLEMS; i++) {
    const raw = lines[i]!;
    const first = firstNonBlank(raw);
    if (first < 0 || raw.charCodeAt(first) === 35 /* # */) continue;
    let start = 0, cell = 0, bad = false;
    for (;;) {
      const comma = raw.indexOf(',', start);
      const end = comma < 0 ? raw.length : comma;
      if (cell < width) {
        const c = want[cell]!;
        if (c >= 0) {
          const text = raw.slice(start, end);
          const v = firstNonBlank(text) < 0 ? NaN : Number(text);
          if (!Number.isFinite(v)) {
            problems.push({ line: i + 1, column: start + 1, message: `\`${text.trim()}\` in column \`${cols[c]}\` is not a number` });
            bad = true;
            break;
          }
          values[c]![rows] = v;
        }
      }
      cell++;
      if (comma < 0) break;
      start = comma + 1;
    }
    if (bad) continue;
    if (cell !== width) {
      problems.push({ line: i + 1, column: 1, message: `${cell} values where the header names ${width} columns` });
      continue;
    }
    rowLine[rows] = i + 1;
    rows++;
  }
  if (problems.length > 0) return { ok: false, problems };
  if (rows === 0) return { ok: false, problems: [{ line: header + 1, column: 1, message: 'the table has a header but no rows' }] };
  return gridOf(file, cols, values, rowLine, rows);
}

/** Index of the first character that is not a space, tab or carriage return, or −1. */
function firstNonBlank(s: string): number {
  for (let k = 0; k < s.length; k++) {
    const c = s.charCodeAt(k);
    if (c !== 32 && c !== 9 && c !== 13) return k;
  }
  return -1;
}

/** 1-based column of cell `k` of a comma-separated line. */
function columnStart(line: string, k: number): number {
  let col = 0;
  for (let n = 0; n < k; n++) {
    const next = line.indexOf(',', col);
    if (next < 0) return col + 1;
    col = next + 1;
  }
  return col + 1;
}

/** Ascending distinct values of one column, and a map from value to its place. */
function axisOf(v: Float64Array, rows: number): { axis: number[]; place: Map<number, number> } {
  const set = new Set<number>();
  for (let r = 0; r < rows; r++) set.add(v[r]!);
  const axis = [...set].sort((a, b) => a - b);
  return { axis, place: new Map(axis.map((x, k) => [x, k])) };
}

function gridOf(file: string, cols: Column[], values: Float64Array[], rowLine: Int32Array, rows: number): TableRead {
  const col = (c: Column): Float64Array => values[cols.indexOf(c)]!;
  const problems: TableProblem[] = [];
  const lAx = axisOf(col('l'), rows), gAx = axisOf(col('vgs'), rows), dAx = axisOf(col('vds'), rows), sAx = axisOf(col('vsb'), rows);
  const tCol = cols.includes('temperature') ? col('temperature') : undefined;
  const tAx = tCol ? axisOf(tCol, rows) : undefined;
  const nG = gAx.axis.length, nD = dAx.axis.length, nS = sAx.axis.length, nL = lAx.axis.length, nT = tAx?.axis.length ?? 1;
  if (lAx.axis[0]! <= 0) problems.push({ line: rowLine[col('l').indexOf(lAx.axis[0]!)]!, column: 1, message: `\`l\` = ${lAx.axis[0]} m is not a positive length` });
  if (dAx.axis[0]! < 0) problems.push({ line: rowLine[col('vds').indexOf(dAx.axis[0]!)]!, column: 1, message: `\`vds\` = ${dAx.axis[0]} V is negative (the table is in the forward frame, VDS ≥ 0)` });
  if (nG < 2) problems.push({ line: rowLine[0]!, column: 1, message: 'the table needs at least two `vgs` values' });
  if (nD < 2) problems.push({ line: rowLine[0]!, column: 1, message: 'the table needs at least two `vds` values' });
  if (tAx && tAx.axis[0]! <= -ZERO_CELSIUS) problems.push({ line: 1, column: 1, message: `\`temperature\` ${tAx.axis[0]} °C is at or below absolute zero` });
  const points = nG * nD * nS * nL * nT;
  if (points > MAX_POINTS) problems.push({ line: 1, column: 1, message: `the grid has ${points} points, more than ${MAX_POINTS}` });
  if (problems.length > 0) return { ok: false, problems };

  const id = new Float64Array(points);
  const filled = new Uint8Array(points);
  const vl = col('l'), vg = col('vgs'), vd = col('vds'), vs = col('vsb'), vi = col('id');
  for (let r = 0; r < rows && problems.length < MAX_PROBLEMS; r++) {
    const t = tAx && tCol ? tAx.place.get(tCol[r]!)! : 0;
    const k = ((((t * nL + lAx.place.get(vl[r]!)!) * nS + sAx.place.get(vs[r]!)!) * nD + dAx.place.get(vd[r]!)!) * nG) + gAx.place.get(vg[r]!)!;
    if (filled[k]) {
      problems.push({ line: rowLine[r]!, column: 1, message: `duplicate point l = ${vl[r]}, vgs = ${vg[r]}, vds = ${vd[r]}, vsb = ${vs[r]}${tCol ? `, temperature = ${tCol[r]}` : ''}` });
      continue;
    }
    filled[k] = 1;
    const current = vi[r]!;
    if (vd[r]! > 0 && !(current > 0)) {
      problems.push({ line: rowLine[r]!, column: 1, message: `\`id\` = ${current} A/m where vds = ${vd[r]} V: a conducting point needs a positive current (ln(id) is interpolated)` });
      continue;
    }
    id[k] = vd[r]! > 0 ? current : 0;   // the vds = 0 row carries no current (design §14)
  }
  if (problems.length === 0) {
    const gap = filled.indexOf(0);
    if (gap >= 0) {
      let rest = gap;
      const ig = rest % nG; rest = (rest - ig) / nG;
      const id_ = rest % nD; rest = (rest - id_) / nD;
      const is = rest % nS; rest = (rest - is) / nS;
      const il = rest % nL; const it = (rest - il) / nL;
      problems.push({
        line: rowLine[rows - 1]!, column: 1,
        message: `ragged grid: ${rows} rows for ${points} grid points; no row for l = ${lAx.axis[il]}, vgs = ${gAx.axis[ig]}, vds = ${dAx.axis[id_]}, vsb = ${sAx.axis[is]}${tAx ? `, temperature = ${tAx.axis[it]}` : ''}`,
      });
    }
  }
  if (problems.length > 0) return { ok: false, problems };
  const table: DeviceTable = { file, l: lAx.axis, vgs: gAx.axis, vds: dAx.axis, vsb: sAx.axis, id };
  if (tAx) table.temperature = tAx.axis.map((c) => c + ZERO_CELSIUS);
  return { ok: true, table };
}
