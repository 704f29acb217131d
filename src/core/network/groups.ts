/**
 * The connected groups of linked mirrors (design §9.1): a root (its input is a current or a
 * resistor) and every mirror its outputs feed, directly or not. Read from the resolved spec after
 * the link checks (spec/links.ts), so every link here resolves and no group has a loop.
 */
import type { ResolvedSpec, TemplateMirror } from '../types';
import { idealRatio } from '../circuit/templates';
import { indexOf } from '../mirror-at';

export interface NetworkGroup {
  root: TemplateMirror;
  /** Root first, each mirror after the one feeding it. */
  members: TemplateMirror[];
  /** File index of the mirror each member's input comes from, and that mirror's output. */
  parent: Map<number, { mirror: number; output: number }>;
}

/** Groups in file order of their roots; a mirror neither linked nor feeding belongs to none. */
export function networkGroups(spec: ResolvedSpec): NetworkGroup[] {
  // A spec without links has no group: read on every analysis (the editor's keystroke too), so
  // it costs one pass and no allocation there.
  if (!spec.mirrors.some((m) => m.kind !== 'netlist' && m.input.kind === 'link')) return [];
  // Keys in first-insertion order, read by index (a Map's entries would make an array each).
  const templates = new Map<number, TemplateMirror>();
  const keys: number[] = [];
  for (const m of spec.mirrors) {
    if (m.kind === 'netlist') continue;
    const i = indexOf(m);
    if (!templates.has(i)) keys.push(i);
    templates.set(i, m);
  }
  const children = new Map<number, number[]>();
  for (const i of keys) {
    const m = templates.get(i)!;
    if (m.input.kind !== 'link' || !templates.has(m.input.mirror)) continue;
    const list = children.get(m.input.mirror) ?? [];
    list.push(i);
    children.set(m.input.mirror, list);
  }
  const groups: NetworkGroup[] = [];
  for (const i of keys) {
    const root = templates.get(i)!;
    if (root.input.kind === 'link' || !children.has(i)) continue;
    const members: TemplateMirror[] = [root];
    const parent = new Map<number, { mirror: number; output: number }>();
    for (let k = 0; k < members.length; k++) {
      const at = indexOf(members[k]!);
      for (const c of children.get(at) ?? []) {
        const m = templates.get(c)!;
        if (m.input.kind !== 'link') continue;
        parent.set(c, { mirror: at, output: m.input.output });
        members.push(m);
      }
    }
    groups.push({ root, members, parent });
  }
  return groups;
}

/** A: each member's intended input current, the root current times the ideal ratios along the
 *  path (design §9.3), by file index. */
export function intendedInputs(g: NetworkGroup, rootCurrent: number, byIndex: (i: number) => TemplateMirror | undefined): Map<number, number> {
  const out = new Map<number, number>([[indexOf(g.root), rootCurrent]]);
  for (const m of g.members.slice(1)) {
    const i = indexOf(m);
    const p = g.parent.get(i)!;
    const up = byIndex(p.mirror);
    const ratio = up ? idealRatio(up, p.output) ?? 1 : 1;
    out.set(i, (out.get(p.mirror) ?? NaN) * ratio);
  }
  return out;
}

/** A of member `i` alone: the value intendedInputs gives it (the same product, in the same order),
 *  its links walked up to the root; undefined when `i` is not linked or its links do not reach a
 *  template root (`byIndex` gives templates only) within `count` steps. */
export function intendedInputOf(i: number, rootCurrent: (root: TemplateMirror) => number, byIndex: (i: number) => TemplateMirror | undefined, count: number): number | undefined {
  const path: TemplateMirror[] = [];
  let m = byIndex(i);
  while (m && m.input.kind === 'link') {
    if (path.length > count) return undefined;
    path.push(m);
    m = byIndex(m.input.mirror);
  }
  if (!m || path.length === 0) return undefined;
  let cur = rootCurrent(m);
  for (let k = path.length - 1; k >= 0; k--) {
    const link = path[k]!.input;
    if (link.kind !== 'link') return undefined;
    cur *= idealRatio(k === path.length - 1 ? m : path[k + 1]!, link.output) ?? 1;
  }
  return cur;
}
