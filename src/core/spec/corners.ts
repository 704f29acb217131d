/**
 * `corners:` — named variations of the nominal process. In `nmos:`/`pmos:`, a signed value is
 * added to the parameter (`vt0: +50m` → {add: 0.05}; for pmos vt0 the magnitude moves), a
 * percentage scales it (`kp: -10%` → {scale: -0.10}, i.e. kp·0.9). `temperature`, `vdd`, `vss`
 * replace the nominal values.
 */
import type { CornerSpec, NumericParam, ParamDelta, Polarity, ProcessSpec, SpecPath, Supplies } from '../types';
import { readQuantity } from '../units/si';
import { DEVICE_PARAM_KEYS, DEVICE_PARAM_RULES, readTemperature } from './process';
import { readMap } from './read';
import { readTableValue } from './tables';
import { resolveNumber } from './values';
import type { ValueScope } from './values';

const PERCENT = /^\s*([+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?)\s*%\s*$/;

function readDelta(scope: ValueScope, raw: unknown, path: SpecPath, key: NumericParam): ParamDelta | undefined {
  if (typeof raw === 'string') {
    const pm = PERCENT.exec(raw);
    if (pm) {
      const r = readQuantity(`${pm[1]}%`, 'ratio');
      return r.ok ? { scale: r.value } : undefined;
    }
  }
  const add = resolveNumber(scope, raw, path, DEVICE_PARAM_RULES[key].q);
  return add === undefined ? undefined : { add };
}

function apply(base: number, d: ParamDelta): number {
  return 'add' in d ? base + d.add : base * (1 + d.scale);
}

export function readCorners(scope: ValueScope, raw: unknown, process: ProcessSpec | undefined, supplies: Supplies | undefined): CornerSpec[] {
  const out: CornerSpec[] = [];
  const cs = readMap(scope.sink, raw, ['corners'], 'a mapping of corner names to { nmos, pmos, temperature, vdd, vss }');
  if (!cs) return out;
  for (const name of Object.keys(cs)) {
    const path: SpecPath = ['corners', name];
    const c = readMap(scope.sink, cs[name], path, 'a mapping { nmos, pmos, temperature, vdd, vss }');
    if (!c) continue;
    const before = scope.sink.errorCount;
    const corner: CornerSpec = { name, nmos: {}, pmos: {}, path };
    for (const type of ['nmos', 'pmos'] as Polarity[]) {
      const dm = readMap(scope.sink, c[type], [...path, type]);
      if (!dm) continue;
      if (dm.table !== undefined) {
        const t = readTableValue(scope.sink, scope.tables, dm.table, [...path, type, 'table']);
        if (t) (corner.tables ??= {})[type] = t;
        if (t && process && !process[type].table) {
          scope.sink.error('bad-value', `corner \`${name}\` names a ${type} table, but \`process.${type}\` has none to replace`, [...path, type, 'table']);
        }
      }
      for (const key of DEVICE_PARAM_KEYS) {
        if (dm[key] === undefined) continue;
        const at = [...path, type, key];
        const delta = readDelta(scope, dm[key], at, key);
        if (!delta) continue;
        const base = process?.[type][key];
        if (process && base === undefined) {
          scope.sink.error('bad-value', `corner \`${name}\` changes ${type} \`${key}\`, which \`process.${type}\` does not set`, at);
          continue;
        }
        const rule = DEVICE_PARAM_RULES[key].opts;
        if (base !== undefined && ((rule?.positive && !(apply(base, delta) > 0)) || (rule?.nonNegative && apply(base, delta) < 0))) {
          scope.sink.error('non-positive', `corner \`${name}\` makes ${type} \`${key}\` ${apply(base, delta)}; it must stay ${rule?.positive ? 'above 0' : 'at or above 0'}`, at);
          continue;
        }
        corner[type][key] = delta;
      }
    }
    if (c.temperature !== undefined) {
      const t = readTemperature(scope, c.temperature, [...path, 'temperature']);
      if (t !== undefined) corner.temperature = t;
    }
    if (c.resistors !== undefined) {
      const at = [...path, 'resistors'];
      const raw = c.resistors;
      const pm = typeof raw === 'string' ? PERCENT.exec(raw) : null;
      if (raw === 'min' || raw === 'max') corner.resistors = { edge: raw };
      else if (pm) {
        const r = readQuantity(`${pm[1]}%`, 'ratio');
        if (r.ok && r.value > -1) corner.resistors = { scale: r.value };
        else scope.sink.error('bad-value', `corner \`${name}\` scales resistors by ${String(raw)}; a resistor must stay positive`, at);
      } else {
        scope.sink.error('bad-value', `corner \`${name}\`: \`resistors\` is a percentage (\`+10%\`), \`min\` or \`max\` (each resistor at the edge of its tolerance); got ${JSON.stringify(raw)}`, at);
      }
    }
    for (const k of ['vdd', 'vss'] as const) {
      if (c[k] === undefined) continue;
      const v = resolveNumber(scope, c[k], [...path, k], 'voltage');
      if (v !== undefined) corner[k] = v;
    }
    const vdd = corner.vdd ?? supplies?.vdd;
    const vss = corner.vss ?? supplies?.vss;
    if (vdd !== undefined && vss !== undefined && !(vdd > vss)) {
      scope.sink.error('bad-value', `corner \`${name}\` puts vdd (${vdd} V) at or below vss (${vss} V)`, [...path, corner.vdd !== undefined ? 'vdd' : 'vss']);
    }
    if (scope.sink.errorCount === before) out.push(corner);
  }
  return out;
}
