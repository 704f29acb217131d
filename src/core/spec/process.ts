/** `process:`, `supplies:` and `limits:` → resolved values with every default filled (DEFAULTS). */
import { DEFAULTS, ZERO_CELSIUS } from '../defaults';
import { MODEL_NAMES } from '../models/registry';
import type { BipolarParams, BipolarType, DeviceFlavour, DeviceParams, DeviceType, Limits, ModelKind, NumericParam, Polarity, SpecPath, Supplies } from '../types';
import type { Quantity } from '../units/si';
import { missing, readEnum, readMap } from './read';
import type { Data } from './read';
import { resolveNumber } from './values';
import { readTableValue } from './tables';
import type { ValueOptions, ValueScope } from './values';

interface ParamRule { q: Quantity; opts?: ValueOptions }

/** Quantity and sign rule of each device parameter. */
export const DEVICE_PARAM_RULES: Record<NumericParam, ParamRule> = {
  kp: { q: 'transconductanceParam', opts: { positive: true } },
  vt0: { q: 'voltage' },
  lambda: { q: 'inverseVoltage', opts: { nonNegative: true } },
  lref: { q: 'length', opts: { positive: true } },
  gamma: { q: 'sqrtVoltage', opts: { nonNegative: true } },
  phi: { q: 'voltage', opts: { positive: true } },
  n: { q: 'plain', opts: { positive: true } },
  tcv: { q: 'voltagePerKelvin' },
  bex: { q: 'plain' },
  avt: { q: 'voltageLength', opts: { nonNegative: true } },
  abeta: { q: 'lengthUnit', opts: { nonNegative: true } },
  lmin: { q: 'length', opts: { positive: true } },
  wmin: { q: 'length', opts: { positive: true } },
  gn: { q: 'plain', opts: { positive: true } },
  kf: { q: 'plain', opts: { nonNegative: true } },
  cox: { q: 'capacitancePerArea', opts: { positive: true } },
};

export const DEVICE_PARAM_KEYS = Object.keys(DEVICE_PARAM_RULES) as NumericParam[];

/** Quantity and sign rule of each bipolar parameter (design §10). */
const BIPOLAR_PARAM_RULES: Record<keyof BipolarParams, ParamRule> = {
  is: { q: 'current', opts: { positive: true } },
  bf: { q: 'plain', opts: { positive: true } },
  br: { q: 'plain', opts: { positive: true } },
  vaf: { q: 'voltage', opts: { positive: true } },
  eg: { q: 'plain', opts: { positive: true } },
  xti: { q: 'plain' },
  xtb: { q: 'plain' },
  vcesat: { q: 'voltage', opts: { nonNegative: true } },
  ais: { q: 'ratio', opts: { nonNegative: true } },
  abf: { q: 'ratio', opts: { nonNegative: true } },
};

const BIPOLAR_PARAM_KEYS = Object.keys(BIPOLAR_PARAM_RULES) as (keyof BipolarParams)[];

function readBipolar(scope: ValueScope, raw: unknown, path: SpecPath): BipolarParams | undefined {
  const d = readMap(scope.sink, raw, path);
  if (!d) return undefined;
  const before = scope.sink.errorCount;
  const got: Partial<Record<keyof BipolarParams, number>> = {};
  for (const key of BIPOLAR_PARAM_KEYS) {
    if (d[key] === undefined) continue;
    const rule = BIPOLAR_PARAM_RULES[key];
    const v = resolveNumber(scope, d[key], [...path, key], rule.q, rule.opts);
    if (v !== undefined) got[key] = v;
  }
  if (d.is === undefined) missing(scope.sink, path, 'is', ' (saturation current of a unit device, A)');
  if (d.bf === undefined) missing(scope.sink, path, 'bf', ' (forward current gain βF)');
  if (scope.sink.errorCount > before || got.is === undefined || got.bf === undefined) return undefined;
  const bd = DEFAULTS.bipolar;
  const out: BipolarParams = {
    is: got.is, bf: got.bf, br: got.br ?? bd.br, eg: got.eg ?? bd.eg, xti: got.xti ?? bd.xti,
    xtb: got.xtb ?? bd.xtb, vcesat: got.vcesat ?? bd.vcesat,
  };
  for (const k of ['vaf', 'ais', 'abf'] as const) if (got[k] !== undefined) out[k] = got[k];
  return out;
}

/** A temperature in kelvin; a bare number is °C, and one that looks like kelvin gets a warning. */
export function readTemperature(scope: ValueScope, raw: unknown, path: SpecPath): number | undefined {
  const t = resolveNumber(scope, raw, path, 'temperature');
  if (t === undefined) return undefined;
  if (typeof raw === 'number' && raw >= 200) {
    scope.sink.warning('ambiguous-temperature', `\`${String(path[path.length - 1])}: ${raw}\` is read as ${raw} °C; write \`${raw} K\` if kelvin was meant, or \`${raw} C\` to confirm`, path);
  }
  if (!(t > 0)) {
    scope.sink.error('bad-value', `\`${String(path[path.length - 1])}\` is ${(t - ZERO_CELSIUS).toFixed(2)} °C, at or below absolute zero`, path);
    return undefined;
  }
  return t;
}

function readDevice(scope: ValueScope, raw: unknown, path: SpecPath, type: Polarity): DeviceParams | undefined {
  const d = readMap(scope.sink, raw, path);
  if (!d) return undefined;
  const before = scope.sink.errorCount;
  if (d.table !== undefined) return readTableDevice(scope, d, path);
  const got: Partial<Record<NumericParam, number>> = {};
  for (const key of DEVICE_PARAM_KEYS) {
    if (d[key] === undefined) continue;
    const rule = DEVICE_PARAM_RULES[key];
    const v = resolveNumber(scope, d[key], [...path, key], rule.q, rule.opts);
    if (v !== undefined) got[key] = v;
  }
  if (d.kp === undefined) missing(scope.sink, path, 'kp', ' (µ·Cox, A/V²)');
  if (d.vt0 === undefined) missing(scope.sink, path, 'vt0', ' (threshold voltage, V)');
  if (got.n !== undefined && got.n < 1) {
    scope.sink.error('bad-value', `slope factor \`n\` is at least 1; got ${got.n}`, [...path, 'n']);
    delete got.n;
  }
  if (type === 'pmos' && got.vt0 !== undefined && got.vt0 < 0) {
    scope.sink.warning('negative-pmos-vt0', `pmos \`vt0\` is the threshold magnitude; ${got.vt0} is taken as ${-got.vt0}`, [...path, 'vt0']);
    got.vt0 = -got.vt0;
  }
  if (scope.sink.errorCount > before || got.kp === undefined || got.vt0 === undefined) return undefined;
  const dd = DEFAULTS.device;
  const out: DeviceParams = {
    kp: got.kp, vt0: got.vt0,
    lambda: got.lambda ?? dd.lambda, gamma: got.gamma ?? dd.gamma, phi: got.phi ?? dd.phi,
    n: got.n ?? dd.n, tcv: got.tcv ?? dd.tcv, bex: got.bex ?? dd.bex, gn: got.gn ?? dd.gn,
  };
  for (const k of ['lref', 'avt', 'abeta', 'lmin', 'wmin', 'kf', 'cox'] as const) if (got[k] !== undefined) out[k] = got[k];
  return out;
}

/** Keys a table device reads: the rest are in the table. */
// The noise parameters (gn, kf, cox) are no part of a DC table and are still read.
const TABLE_DEVICE_KEYS: readonly NumericParam[] = ['n', 'avt', 'abeta', 'lmin', 'wmin', 'gn', 'kf', 'cox'];

/** A device given by its characterisation table (design §11): its current comes from the
 *  table, so kp, vt0, λ, γ and the temperature laws are not read (a warning says so); kp = 1
 *  and vt0 = 0 are stored so a corner's `kp: -10%` scales the table's current and `vt0: +50m`
 *  shifts its gate. */
function readTableDevice(scope: ValueScope, d: Data, path: SpecPath): DeviceParams | undefined {
  const before = scope.sink.errorCount;
  const table = readTableValue(scope.sink, scope.tables, d.table, [...path, 'table']);
  const got: Partial<Record<NumericParam, number>> = {};
  for (const key of DEVICE_PARAM_KEYS) {
    if (d[key] === undefined) continue;
    if (!TABLE_DEVICE_KEYS.includes(key)) {
      scope.sink.warning('table-ignores', `\`${key}\` is not used: this device's current comes from its table`, [...path, key], 'key');
      continue;
    }
    const rule = DEVICE_PARAM_RULES[key];
    const v = resolveNumber(scope, d[key], [...path, key], rule.q, rule.opts);
    if (v !== undefined) got[key] = v;
  }
  if (scope.sink.errorCount > before || !table) return undefined;
  const dd = DEFAULTS.device;
  const out: DeviceParams = { kp: 1, vt0: 0, lambda: 0, gamma: 0, phi: dd.phi, n: got.n ?? dd.n, tcv: 0, bex: 0, gn: got.gn ?? dd.gn, table };
  for (const k of ['avt', 'abeta', 'lmin', 'wmin', 'kf', 'cox'] as const) if (got[k] !== undefined) out[k] = got[k];
  return out;
}

export interface ProcessRead {
  model: ModelKind;
  tnom: number;
  temperature: number;
  grid?: number;
  trange?: [number, number];
  nmos?: DeviceParams;
  pmos?: DeviceParams;
  npn?: BipolarParams;
  pnp?: BipolarParams;
  /** Device flavours (`process.devices`) read without errors. */
  devices?: Record<string, DeviceFlavour>;
  /** Flavour names written (possibly with errors), for the mirrors' `device:`. */
  flavourNames: Set<string>;
  /** Device types written in the spec (possibly with errors). */
  written: Set<DeviceType>;
  ok: boolean;
}

export function readProcess(scope: ValueScope, raw: unknown): ProcessRead | undefined {
  const path = ['process'];
  if (raw === undefined) {
    missing(scope.sink, [], 'process', ' (device parameters)');
    return undefined;
  }
  const p = readMap(scope.sink, raw, path);
  if (!p) return undefined;
  const before = scope.sink.errorCount;
  const model = p.model === undefined ? DEFAULTS.model : readEnum<ModelKind>(scope.sink, p.model, [...path, 'model'], MODEL_NAMES);
  const tnom = p.tnom === undefined ? DEFAULTS.tnom : readTemperature(scope, p.tnom, [...path, 'tnom']);
  const temperature = p.temperature === undefined ? tnom : readTemperature(scope, p.temperature, [...path, 'temperature']);
  const grid = p.grid === undefined ? undefined : resolveNumber(scope, p.grid, [...path, 'grid'], 'length', { positive: true });
  const written = new Set<DeviceType>();
  const out: ProcessRead = { model: model ?? DEFAULTS.model, tnom: tnom ?? DEFAULTS.tnom, temperature: temperature ?? tnom ?? DEFAULTS.tnom, written, flavourNames: new Set(), ok: true };
  if (grid !== undefined) out.grid = grid;
  if (p.trange !== undefined) {
    const tr = readTrange(scope, p.trange, [...path, 'trange']);
    if (tr) out.trange = tr;
  }
  for (const type of ['nmos', 'pmos'] as const) {
    if (p[type] === undefined) continue;
    written.add(type);
    const d = readDevice(scope, p[type], [...path, type], type);
    if (d) out[type] = d;
  }
  for (const type of ['npn', 'pnp'] as const satisfies readonly BipolarType[]) {
    if (p[type] === undefined) continue;
    written.add(type);
    const d = readBipolar(scope, p[type], [...path, type]);
    if (d) out[type] = d;
  }
  const flavours = readMap(scope.sink, p.devices, [...path, 'devices'], 'a mapping of device-flavour names to { type, table | kp, vt0, … }');
  for (const [name, raw] of Object.entries(flavours ?? {})) {
    out.flavourNames.add(name);
    const at = [...path, 'devices', name];
    const d = readMap(scope.sink, raw, at);
    if (!d) continue;
    if (d.type === undefined) missing(scope.sink, at, 'type', ' (nmos or pmos)');
    const type = d.type === undefined ? undefined : readEnum<Polarity>(scope.sink, d.type, [...at, 'type'], ['nmos', 'pmos']);
    const { type: _type, ...rest } = d;
    const params = type ? readDevice(scope, rest, at, type) : undefined;
    if (type && params) (out.devices ??= {})[name] = { type, params };
    if (out.model === 'table' && isTableless(d)) scope.sink.error('missing-key', `\`process.model: table\` takes every device from a table; device \`${name}\` is missing \`table\``, at, 'key', 'missing:table');
  }
  if (out.model === 'table') {
    // A bipolar device keeps its transport model (design §10): tables are MOSFET data.
    for (const type of written) {
      if ((type === 'nmos' || type === 'pmos') && isTableless(p[type])) scope.sink.error('missing-key', `\`process.model: table\` takes every device from a table; \`process.${type}\` is missing \`table\``, [...path, type], 'key', 'missing:table');
    }
  }
  out.ok = scope.sink.errorCount === before;
  return out;
}

/** `trange: [tmin, tmax]`, two temperatures, tmin below tmax. */
function readTrange(scope: ValueScope, raw: unknown, path: SpecPath): [number, number] | undefined {
  if (!Array.isArray(raw) || raw.length !== 2) {
    scope.sink.error('wrong-type', '`trange` is a list of two temperatures [tmin, tmax]', path, undefined, 'type');
    return undefined;
  }
  const lo = readTemperature(scope, raw[0], [...path, 0]);
  const hi = readTemperature(scope, raw[1], [...path, 1]);
  if (lo === undefined || hi === undefined) return undefined;
  if (!(hi > lo)) {
    scope.sink.error('bad-value', `\`trange\` must go from a lower to a higher temperature; got ${(lo - ZERO_CELSIUS).toFixed(2)} °C to ${(hi - ZERO_CELSIUS).toFixed(2)} °C`, path);
    return undefined;
  }
  return [lo, hi];
}

function isTableless(raw: unknown): boolean {
  return typeof raw === 'object' && raw !== null && (raw as Data).table === undefined;
}

export function readSupplies(scope: ValueScope, raw: unknown): Supplies | undefined {
  const path = ['supplies'];
  if (raw === undefined) {
    missing(scope.sink, [], 'supplies', ' (vdd, vss)');
    return undefined;
  }
  const s = readMap(scope.sink, raw, path);
  if (!s) return undefined;
  if (s.vdd === undefined) {
    missing(scope.sink, path, 'vdd', ' (positive supply, V)');
    return undefined;
  }
  const vdd = resolveNumber(scope, s.vdd, [...path, 'vdd'], 'voltage');
  const vss = s.vss === undefined ? DEFAULTS.vss : resolveNumber(scope, s.vss, [...path, 'vss'], 'voltage');
  if (vdd === undefined || vss === undefined) return undefined;
  if (!(vdd > vss)) {
    scope.sink.error('bad-value', `\`vdd\` (${vdd} V) must be above \`vss\` (${vss} V)`, [...path, 'vdd']);
    return undefined;
  }
  return { vdd, vss };
}

export function readLimits(scope: ValueScope, raw: unknown): Limits | undefined {
  const path = ['limits'];
  const l: Data = raw === undefined ? {} : readMap(scope.sink, raw, path) ?? {};
  const margin = l.margin === undefined ? DEFAULTS.margin : resolveNumber(scope, l.margin, [...path, 'margin'], 'voltage', { nonNegative: true });
  const error = l.error === undefined ? DEFAULTS.error : resolveNumber(scope, l.error, [...path, 'error'], 'ratio', { positive: true });
  const sourceHeadroom = l.sourceHeadroom === undefined ? DEFAULTS.sourceHeadroom
    : resolveNumber(scope, l.sourceHeadroom, [...path, 'sourceHeadroom'], 'voltage', { nonNegative: true });
  const tolerance = l.tolerance === undefined ? DEFAULTS.tolerance
    : resolveNumber(scope, l.tolerance, [...path, 'tolerance'], 'ratio', { positive: true });
  const supplyCurrent = l.supplyCurrent === undefined ? undefined
    : resolveNumber(scope, l.supplyCurrent, [...path, 'supplyCurrent'], 'current', { positive: true });
  if (margin === undefined || error === undefined || sourceHeadroom === undefined || tolerance === undefined) return undefined;
  if (l.supplyCurrent !== undefined && supplyCurrent === undefined) return undefined;
  const out: Limits = { margin, error, sourceHeadroom, tolerance };
  if (supplyCurrent !== undefined) out.supplyCurrent = supplyCurrent;
  return out;
}
