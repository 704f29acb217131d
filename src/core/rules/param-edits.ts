/**
 * A size written through a param (`w: wu`, `w: 2*wu`) is a design decision: the unit cell. A fix
 * that rewrites it as a number (`w: 12.09u`) loses that. Beside the local edit, qpoint offers the
 * edit of the param itself (`wu: 2u → 12.09u`), re-checked on the whole file because every mirror
 * that reads the param changes with it; its title names those mirrors.
 *
 * Offered when each token to rewrite that is an expression refers to exactly one param (each
 * param then takes the factor asked of its tokens), scales with it (the expression is proportional to the param: `wu`, `2*wu`, `wu/2`, not `wu + 0.1u`),
 * and the param is written as a plain number that no other param is computed from.
 */
import type { ResolvedSpec, TextEdit } from '../types';
import type { ParsedSpec } from '../spec/index';
import { evaluateExpression, referencedNames } from '../spec/expression';
import { isRecord } from '../spec/params';
import { replaceValueEdit } from '../spec/edit';
import { readQuantity } from '../units/si';
import { allDevices, sizeOf, type SizeKey } from '../sizing/devices';
import { quantizeSize } from '../sizing/quantize';
import { formatValue, planSizeEdits, type ChangeNote, type SizeChange, type SizePlan } from './size-edits';
import { sizeToken } from './sites';

export interface ParamPlan extends SizePlan {
  /** The params edited. */
  params: string[];
  /** Names of the other mirrors that read one of them (they change too). */
  sharedWith: string[];
}

/** The one param a size token's expression is proportional to, else undefined. */
function proportionalParam(spec: ResolvedSpec, text: string): string | undefined {
  const t = text.trim().replace(/^(["'])(.*)\1$/s, '$2');
  if (readQuantity(t, 'length').ok) return undefined;  // a plain number: no param
  const names = referencedNames(t)?.filter((n) => n in spec.params);
  if (!names || names.length !== 1) return undefined;
  const p = names[0]!;
  const scope = new Map(Object.entries(spec.params));
  const a = evaluateExpression(t, scope);
  scope.set(p, 2 * spec.params[p]!);
  const b = evaluateExpression(t, scope);
  if (!a.ok || !b.ok || !(Math.abs(a.value) > 0) || Math.abs(b.value / a.value - 2) > 1e-9) return undefined;
  return p;
}

/** Mirrors (by name) whose own text reads param `p`, and whether another param is computed from it. */
function readersOf(parsed: ParsedSpec, p: string): { mirrors: { index: number; name: string }[]; derived: boolean } {
  const data = isRecord(parsed.data) ? parsed.data : {};
  const reads = (v: unknown): boolean => {
    if (typeof v === 'string') return (referencedNames(v) ?? []).includes(p);
    if (Array.isArray(v)) return v.some(reads);
    if (isRecord(v)) return Object.values(v).some(reads);
    return false;
  };
  const params = isRecord(data.params) ? data.params : {};
  const derived = Object.entries(params).some(([k, v]) => k !== p && reads(v));
  const items = Array.isArray(data.mirrors) ? data.mirrors : [];
  const mirrors = items.flatMap((m: unknown, index: number) =>
    (reads(m) ? [{ index, name: isRecord(m) && typeof m.name === 'string' ? m.name : `#${index + 1}` }] : []));
  return { mirrors, derived };
}

/**
 * The params a set of size changes would edit, with the other mirrors reading them; undefined
 * when the changes rewrite no param-expression token (or one that cannot go through its param).
 */
export function paramsOf(parsed: ParsedSpec, spec: ResolvedSpec, changes: SizeChange[]): { params: string[]; sharedWith: string[] } | undefined {
  const plan = split(parsed, spec, changes);
  if (!plan) return undefined;
  const params = [...plan.params.keys()];
  return { params, sharedWith: sharers(parsed, params, changes[0]!.ref.mirror) };
}

function sharers(parsed: ParsedSpec, params: string[], mirror: number): string[] {
  const names = new Set<string>();
  for (const p of params) for (const m of readersOf(parsed, p).mirrors) if (m.index !== mirror) names.add(m.name);
  return [...names];
}

/** The changes that go through a param (by param: the largest factor asked of it), and the rest. */
function split(parsed: ParsedSpec, spec: ResolvedSpec, changes: SizeChange[]): { params: Map<string, { factor: number; key: SizeKey }>; rest: SizeChange[] } | undefined {
  const params = new Map<string, { factor: number; key: SizeKey }>();
  const rest: SizeChange[] = [];
  for (const c of changes) {
    const tok = sizeToken(parsed, spec, c.ref, c.key);
    const current = sizeOf(spec, c.ref)?.[c.key];
    const p = tok && c.key !== 'm' ? proportionalParam(spec, tok.text) : undefined;
    if (!tok || !p || current === undefined || !(current > 0)) { rest.push(c); continue; }
    // Every device reading this token must change by the same factor, or the param cannot carry it.
    const id = tok.path.join('/');
    const users = allDevices(spec, c.ref.mirror).filter((r) => sizeToken(parsed, spec, r, c.key)?.path.join('/') === id);
    const factor = c.value / current;
    const same = users.every((u) => changes.some((x) => x.key === c.key && x.ref.role === u.role && (x.ref.output ?? -1) === (u.output ?? -1) &&
      Math.abs(x.value / (sizeOf(spec, u)?.[c.key] ?? NaN) - factor) <= 1e-9 * factor));
    if (!same) return undefined;
    const had = params.get(p);
    params.set(p, { factor: Math.max(factor, had?.factor ?? 0), key: c.key });
  }
  return params.size > 0 ? { params, rest } : undefined;
}

/** Edits that carry the changes through the param they are written with (plus literal edits for the others). */
export function planParamEdits(parsed: ParsedSpec, spec: ResolvedSpec, changes: SizeChange[], json: boolean, file?: string): ParamPlan | undefined {
  const s = split(parsed, spec, changes);
  if (!s) return undefined;
  const edits: TextEdit[] = [];
  const notes: ChangeNote[] = [];
  for (const [param, { factor }] of s.params) {
    if (readersOf(parsed, param).derived) return undefined;
    const path = ['params', param];
    const range = parsed.source.value(path);
    if (!range) return undefined;
    const token = parsed.source.text(range);
    if (!readQuantity(token.trim().replace(/^(["'])(.*)\1$/s, '$2'), 'length').ok) return undefined;  // a param written as an expression
    const value = quantizeSize(spec.params[param]! * factor, spec.process.grid, 'up');
    const text = formatValue('w', value, token, json);
    const edit = replaceValueEdit(parsed, path, text);
    if (!edit) return undefined;
    edits.push(edit);
    notes.push({ key: param, from: token.trim(), to: text });
  }
  const local = s.rest.length > 0 ? planSizeEdits(parsed, spec, s.rest, json, file) : { edits: [] as TextEdit[], notes: [] as ChangeNote[] };
  if (!local) return undefined;
  const params = [...s.params.keys()];
  return { edits: [...edits, ...local.edits], notes: [...notes, ...local.notes], params, sharedWith: sharers(parsed, params, changes[0]!.ref.mirror) };
}
