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
  // The header: the first line that is neither blank nor a comment.
  let pos = 0, line = 1, headerLine = '';
  for (;;) {
    if (pos >= text.length) return { ok: false, problems: [{ line: 1, column: 1, message: 'the table has no header row (l, vgs, vds, vsb, id)' }] };
    const eol = endOfLine(text, pos);
    const first = firstNonBlank(text, pos, eol);
    const here = pos;
    pos = eol + 1; line++;
    if (first >= 0 && text.charCodeAt(first) !== 35 /* # */) { headerLine = text.slice(here, eol); break; }
  }
  const header = line - 1;   // 1-based line of the header
  const names = headerLine.replace(/^\uFEFF/, '').split(',').map((c) => c.trim().toLowerCase());
  const at: Partial<Record<Column, number>> = {};
  names.forEach((n, k) => {
    if ((REQUIRED as readonly string[]).includes(n) || n === 'temperature') {
      if (at[n as Column] !== undefined) problems.push({ line: header, column: columnStart(headerLine, k), message: `column \`${n}\` is named twice` });
      else at[n as Column] = k;
    }
  });
  const absent = REQUIRED.filter((c) => at[c] === undefined);
  if (absent.length > 0) {
    problems.push({ line: header, column: 1, message: `missing column${absent.length > 1 ? 's' : ''} ${absent.map((c) => `\`${c}\``).join(', ')} (the header names ${names.map((n) => `\`${n}\``).join(', ')})` });
  }
  if (problems.length > 0) return { ok: false, problems };
  const cols: Column[] = at.temperature === undefined ? [...REQUIRED] : [...REQUIRED, 'temperature'];
  const index = cols.map((c) => at[c]!);
  const width = names.length;

  // Rows: the values of the named columns, one Float64Array per column, and each row's line.
  // One scan over the text, numbers read in place (no per-line or per-cell strings).
  let cap = 1;
  for (let k = text.indexOf('\n', pos); k >= 0; k = text.indexOf('\n', k + 1)) cap++;
  const values = cols.map(() => new Float64Array(cap));
  const rowLine = new Int32Array(cap);
  const want = new Int32Array(width).fill(-1);
  index.forEach((k, c) => { want[k] = c; });
  let rows = 0;
  for (; pos <= text.length && problems.length < MAX_PROBLEMS; pos = endOfLine(text, pos) + 1, line++) {
    const eol = endOfLine(text, pos);
    const first = firstNonBlank(text, pos, eol);
    if (first < 0 || text.charCodeAt(first) === 35 /* # */) continue;
    let start = pos, cell = 0, bad = false;
    for (;;) {
      let end = start;
      while (end < eol && text.charCodeAt(end) !== 44 /* , */) end++;
      if (cell < width) {
        const c = want[cell]!;
        if (c >= 0) {
          const v = numberAt(text, start, end);
          if (!Number.isFinite(v)) {
            problems.push({ line, column: start - pos + 1, message: `\`${text.slice(start, end).trim()}\` in column \`${cols[c]}\` is not a number` });
            bad = true;
            break;
          }
          values[c]![rows] = v;
        }
      }
      cell++;
      if (end >= eol) break;
      start = end + 1;
    }
    if (bad) continue;
    if (cell !== width) {
      problems.push({ line, column: 1, message: `${cell} values where the header names ${width} columns` });
      continue;
    }
    rowLine[rows] = line;
    rows++;
  }
  if (problems.length > 0) return { ok: false, problems };
  if (rows === 0) return { ok: false, problems: [{ line: header, column: 1, message: 'the table has a header but no rows' }] };
  return gridOf(file, cols, values, rowLine, rows);
}

/** Index of the line end (the `\n`, or the text's length) from `pos`. */
function endOfLine(text: string, pos: number): number {
  const k = text.indexOf('\n', pos);
  return k < 0 ? text.length : k;
}

const isBlank = (c: number): boolean => c === 32 || c === 9 || c === 13;

/** Index of the first character in [from, to) that is not a space, tab or carriage return, or −1. */
function firstNonBlank(s: string, from: number, to: number): number {
  for (let k = from; k < to; k++) if (!isBlank(s.charCodeAt(k))) return k;
  return -1;
}

/** Exact powers of ten (every one up to 1e22 is a double). */
const POW10 = Array.from({ length: 23 }, (_, k) => Number(`1e${k}`));

/**
 * The number written in text[from, to), blanks around it allowed; NaN when there is none.
 * Plain decimals of up to 15 significant digits and a power of ten within ±22 are read in
 * place: the digits make an exact integer and one multiplication or division by an exact power
 * of ten rounds once, so the result is the correctly rounded double (Clinger, "How to read
 * floating point numbers accurately", PLDI 1990, the fast path). Anything else goes to
 * `Number`, which reads it by the same rule JavaScript does.
 */
export function numberAt(text: string, from: number, to: number): number {
  let a = from, b = to;
  while (a < b && isBlank(text.charCodeAt(a))) a++;
  while (b > a && isBlank(text.charCodeAt(b - 1))) b--;
  if (a === b) return NaN;
  let i = a, c = text.charCodeAt(i);
  const neg = c === 45;
  if (c === 45 || c === 43) i++;
  let mant = 0, digits = 0, exp = 0, seen = false;
  for (; i < b; i++) {
    c = text.charCodeAt(i) - 48;
    if (c < 0 || c > 9) break;
    seen = true;
    if (mant !== 0 || c !== 0) { mant = mant * 10 + c; digits++; }
  }
  if (i < b && text.charCodeAt(i) === 46 /* . */) {
    for (i++; i < b; i++) {
      c = text.charCodeAt(i) - 48;
      if (c < 0 || c > 9) break;
      seen = true;
      if (mant !== 0 || c !== 0) { mant = mant * 10 + c; digits++; }
      exp--;
    }
  }
  if (seen && i < b && (text.charCodeAt(i) | 32) === 101 /* e */) {
    i++;
    let eneg = false;
    c = text.charCodeAt(i);
    if (c === 45 || c === 43) { eneg = c === 45; i++; }
    let e = 0, eseen = false;
    for (; i < b; i++) {
      c = text.charCodeAt(i) - 48;
      if (c < 0 || c > 9) break;
      eseen = true;
      if (e < 1000) e = e * 10 + c;
    }
    if (!eseen) return Number(text.slice(a, b));
    exp += eneg ? -e : e;
  }
  if (!seen || i !== b || digits > 15) return Number(text.slice(a, b));
  let v: number;
  if (mant === 0) v = 0;
  else if (exp >= 0 && exp <= 22) v = mant * POW10[exp]!;
  else if (exp < 0 && exp >= -22) v = mant / POW10[-exp]!;
  else return Number(text.slice(a, b));
  return neg ? -v : v;
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

/** A value's place on its axis, remembering the last one (a table's rows run along one axis
 *  while the others stay put, so most look-ups repeat). */
function placer(place: Map<number, number> | undefined): (v: number) => number {
  let last = NaN, at = 0;
  return (v) => {
    if (v !== last) { last = v; at = place?.get(v) ?? 0; }
    return at;
  };
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

  const tPlace = placer(tAx?.place), lPlace = placer(lAx.place), sPlace = placer(sAx.place), dPlace = placer(dAx.place), gPlace = placer(gAx.place);
  const id = new Float64Array(points);
  const filled = new Uint8Array(points);
  const vl = col('l'), vg = col('vgs'), vd = col('vds'), vs = col('vsb'), vi = col('id');
  for (let r = 0; r < rows && problems.length < MAX_PROBLEMS; r++) {
    const t = tAx && tCol ? tPlace(tCol[r]!) : 0;
    const k = ((((t * nL + lPlace(vl[r]!)) * nS + sPlace(vs[r]!)) * nD + dPlace(vd[r]!)) * nG) + gPlace(vg[r]!);
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
