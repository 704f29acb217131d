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
  const failedParams = new Set<string>();
  const scope: ValueScope = { sink, params: values, paramQuantities: quantities, failedParams };
  if (raw === undefined || raw === null) return scope;
  if (!isRecord(raw)) {
    sink.error('wrong-type', `\`params\` must be a mapping of names to values; got ${typeName(raw)}`, ['params'], undefined, 'type');
    return scope;
  }
  const names = Object.keys(raw);
  const usable = new Set<string>();
  for (const name of names) {
    if (!NAME.test(name)) {
      sink.error('bad-name', `param name \`${name}\` must start with a letter or _ and hold only letters, digits and _`, ['params', name], 'key');
    } else if (RESERVED.has(name)) {
      sink.error('bad-name', `\`${name}\` is a built-in name of expressions; choose another param name`, ['params', name], 'key');
    } else {
      usable.add(name);
    }
  }
  const deps = new Map<string, string[]>();
  for (const name of usable) {
    const v = raw[name];
    deps.set(name, typeof v === 'string' ? (referencedNames(v) ?? []).filter((n) => usable.has(n)) : []);
  }
  const { order, inCycle } = dependencyOrder(usable, deps, (n, loop) =>
    sink.error('param-cycle', `param \`${n}\` depends on itself: ${loop}`, ['params', n]));

  const failed = failedParams;
  for (const n of inCycle) failed.add(n);
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

/**
 * Params in dependency order (each after the params it uses), by an iterative depth-first search:
 * a chain of 6 000 params must not overflow the stack. `cycle` hears each param on a loop once,
 * with the loop as text (shortened when long). Linear in params and references: the params
 * already reported are skipped over along the path (path-compressed pointers), so many
 * references back into one long loop cost no more than the loop.
 */
function dependencyOrder(names: Iterable<string>, deps: ReadonlyMap<string, readonly string[]>,
  cycle: (name: string, loop: string) => void): { order: string[]; inCycle: Set<string> } {
  const order: string[] = [];
  const done = new Set<string>();
  const inCycle = new Set<string>();
  /** The current path of the search, and each name's place on it. */
  const trail: string[] = [];
  const place = new Map<string, number>();
  /** For a reported name on the path: a name at or below it from where reported ones run up to it. */
  const skip = new Map<string, string>();
  const next: number[] = [];
  const report = (from: number) => {
    // trail[from..top] is a loop (the top uses trail[from]); report each name once.
    const top = trail.length - 1;
    const seen: string[] = [];
    const fresh: number[] = [];
    let j = top;
    while (j >= from) {
      const n = trail[j];
      seen.push(n);
      if (inCycle.has(n)) { j = place.get(skip.get(n) ?? n)! - 1; continue; }
      inCycle.add(n);
      fresh.push(j);
      j--;
    }
    const low = trail[Math.max(0, Math.min(from, j + 1))];
    for (const n of seen) skip.set(n, low);
    // In path order, which is file order for params that use the next one.
    for (let k = fresh.length - 1; k >= 0; k--) cycle(trail[fresh[k]], loopText(trail, from, top, fresh[k]));
  };
  for (const root of names) {
    if (done.has(root)) continue;
    trail.push(root); place.set(root, 0); next.push(0);
    while (trail.length > 0) {
      const top = trail.length - 1;
      const name = trail[top];
      const list = deps.get(name) ?? [];
      const k = next[top]++;
      if (k < list.length) {
        const d = list[k];
        if (done.has(d)) continue;
        const at = place.get(d);
        if (at !== undefined) { report(at); continue; }
        place.set(d, trail.length); trail.push(d); next.push(0);
        continue;
      }
      trail.pop(); next.pop(); place.delete(name);
      done.add(name);
      order.push(name);
    }
  }
  return { order, inCycle };
}

/** The loop trail[from..top] read from trail[at] round to itself: `b → a → b`; a long one keeps
 *  its first three and last steps, so each message stays short however long the loop. */
function loopText(trail: readonly string[], from: number, top: number, at: number): string {
  const size = top - from + 1;
  const step = (i: number) => trail[from + ((at - from + i) % size)];
  const names = size <= 6
    ? Array.from({ length: size }, (_, i) => step(i))
    : [step(0), step(1), step(2), `… (${size - 4} more)`, step(size - 1)];
  return [...names, trail[at]].join(' → ');
}
