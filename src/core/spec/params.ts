/**
 * `params:` — named values for expressions. A param may use others in any order; a cycle or an
 * unknown name is a finding at that value. A param written with a unit (`ib: 10uA`) remembers
 * its quantity, so `w: ib` is caught as a unit mismatch.
 */
import type { Quantity } from '../units/si';
import { readQuantity } from '../units/si';
import { EXPRESSION_CONSTANTS, EXPRESSION_FUNCTIONS, referencedNames } from './expression';
import type { FindingSink } from './findings';
import { literalQuantity, resolveNumber, typeName } from './values';
import type { ValueScope } from './values';

const NAME = /^[A-Za-z_][A-Za-z0-9_]*$/;
const RESERVED = new Set([...EXPRESSION_FUNCTIONS, ...EXPRESSION_CONSTANTS, 'auto']);

export function isRecord(v: unknown): v is Record<string, unknown> {
  return typeof v === 'object' && v !== null && !Array.isArray(v) && !(v instanceof Uint8Array);
}

export function resolveParams(raw: unknown, sink: FindingSink): ValueScope {
  const values = new Map<string, number>();
  const quantities = new Map<string, Quantity>();
  const scope: ValueScope = { sink, params: values, paramQuantities: quantities };
  if (raw === undefined || raw === null) return scope;
  if (!isRecord(raw)) {
    sink.error('wrong-type', `\`params\` must be a mapping of names to values; got ${typeName(raw)}`, ['params'], undefined, 'type');
    return scope;
  }
  const names = Object.keys(raw);
  const usable = new Set<string>();
  for (const name of names) {
    if (!NAME.test(name)) {
      sink.error('bad-name', `param name \`${name}\` must start with a letter or _ and hold only letters, digits and _`, ['params', name], sink.src.keyOf(['params', name]));
    } else if (RESERVED.has(name)) {
      sink.error('bad-name', `\`${name}\` is a built-in name of expressions; choose another param name`, ['params', name], sink.src.keyOf(['params', name]));
    } else {
      usable.add(name);
    }
  }
  // Dependency order by depth-first search; grey = on the current path (a cycle when met again).
  const deps = new Map<string, string[]>();
  for (const name of usable) {
    const v = raw[name];
    deps.set(name, typeof v === 'string' ? (referencedNames(v) ?? []).filter((n) => usable.has(n)) : []);
  }
  const order: string[] = [];
  const state = new Map<string, 'grey' | 'black'>();
  const inCycle = new Set<string>();
  const visit = (name: string, trail: string[]): void => {
    const s = state.get(name);
    if (s === 'black') return;
    if (s === 'grey') {
      const loop = [...trail.slice(trail.indexOf(name)), name];
      const ring = loop.slice(0, -1);
      ring.forEach((n, k) => {
        if (inCycle.has(n)) return;
        inCycle.add(n);
        const seen = [...ring.slice(k), ...ring.slice(0, k), n];
        sink.error('param-cycle', `param \`${n}\` depends on itself: ${seen.join(' → ')}`, ['params', n]);
      });
      return;
    }
    state.set(name, 'grey');
    for (const d of deps.get(name) ?? []) visit(d, [...trail, name]);
    state.set(name, 'black');
    order.push(name);
  };
  for (const name of usable) visit(name, []);

  const failed = new Set<string>(inCycle);
  for (const name of order) {
    if (failed.has(name)) continue;
    if ((deps.get(name) ?? []).some((d) => failed.has(d))) {
      failed.add(name);  // the cause is reported at the param it depends on
      continue;
    }
    const v = raw[name];
    const path = ['params', name];
    const q = typeof v === 'string' ? literalQuantity(v) : undefined;
    let value: number | undefined;
    if (q) {
      const r = readQuantity(v as string, q);
      value = r.ok ? r.value : undefined;
      if (value !== undefined) quantities.set(name, q);
    }
    if (value === undefined) value = resolveNumber(scope, v, path, 'plain');
    if (value === undefined) failed.add(name);
    else values.set(name, value);
  }
  return scope;
}
