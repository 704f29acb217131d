/**
 * Link checks (design §9.1, findings in docs/findings.md), run once every mirror is read: each
 * `input: { from: PATH }` must name an existing template output (`link-unknown`, with a
 * did-you-mean) of the other polarity (`link-polarity`), not its own mirror (`link-self`), not
 * an output another link already takes (`link-shared`), and no chain of links may close on
 * itself (`link-cycle`). A mirror fed by a mirror that has errors waits for them (`link-upstream`).
 * A linked output's written `output.v` is not used (`link-output-v`).
 */
import { isDeviceType, sinksCurrent } from '../device-types';
import type { LinkInput, ResolvedMirror, TemplateMirror } from '../types';
import { isRecord } from './params';
import type { FindingSink } from './findings';
import { linkPathOf, linkTargets, resolveLinkPath } from '../network/paths';
import { suggestion } from './suggest';

/** `mirrorIndex:outputIndex` of every output some mirror's `from` names (for `output.v` being
 *  optional there), from the plain data alone. */
export function fedOutputs(data: unknown): Set<string> {
  let targets: ReturnType<typeof linkTargets> | undefined;  // listed at the first link: most specs have none
  const fed = new Set<string>();
  const items = isRecord(data) && Array.isArray(data.mirrors) ? data.mirrors : [];
  for (let i = 0; i < items.length; i++) {
    const from = linkPathOf(data, i);
    if (from === undefined) continue;
    const r = resolveLinkPath(from, targets ??= linkTargets(data));
    if (r.ok && r.link.mirror !== i) fed.add(`${r.link.mirror}:${r.link.output}`);
  }
  return fed;
}

/** Item `a` names, types and links exactly as item `b` does, as the link checks read them (its
 *  name, whether it is a netlist, its type, its outputs' names, its `from`): in the same list,
 *  every link resolves alike with either. */
export function sameLinkShape(a: unknown, b: unknown): boolean {
  if (!isRecord(a) || !isRecord(b)) return false;
  if (typeof a.name !== 'string' || a.name !== b.name || a.type !== b.type || (a.kind === 'netlist') !== (b.kind === 'netlist')) return false;
  if (typeof a.type !== 'string' || typeof a.kind !== 'string' || typeof b.kind !== 'string') return false;
  const outs = (x: Record<string, unknown>) => (Array.isArray(x.outputs) ? x.outputs.map((o: unknown) => (isRecord(o) && typeof o.name === 'string' ? o.name : '')).join('\u0000') : undefined);
  if (outs(a) !== outs(b)) return false;
  const from = (x: Record<string, unknown>) => (isRecord(x.input) ? [typeof x.input.from === 'string', x.input.from] : [false, undefined]);
  const [fa, pa] = from(a), [fb, pb] = from(b);
  return fa === fb && pa === pb;
}

/**
 * The links of `mirrors` where only mirror `edited` was read again, from an item of the same link
 * shape (`sameLinkShape`) as the one `before` (that mirror as an error-free spec resolved it, the
 * other mirrors being that spec's own): checkLinks would resolve every link as it did there, so
 * the edited mirror takes `before`'s link and fed outputs, and the others stay as they are. Only
 * the edited mirror's own `link-output-v` warnings are given again. Undefined when the edited
 * mirror was not read (checkLinks then says why).
 */
export function relinkEdited(data: unknown, mirrors: ResolvedMirror[], edited: number, before: ResolvedMirror, sink: FindingSink): ResolvedMirror[] | undefined {
  const at = mirrors[edited]?.path[1] === edited ? edited : mirrors.findIndex((x) => x.path[1] === edited);
  const m = mirrors[at];
  if (!m || m.kind === 'netlist' || before.kind === 'netlist' || m.outputs.length !== before.outputs.length) return undefined;
  const link = linkOf(before);
  if ((m.input.kind === 'link') !== (link !== undefined)) return undefined;
  const items = isRecord(data) && Array.isArray(data.mirrors) ? data.mirrors : [];
  const outputs = m.outputs.map((o, j) => {
    const feeds = before.outputs[j]!.feeds;
    if (feeds === undefined) return o;
    const fed = mirrors[feeds]?.path[1] === feeds ? mirrors[feeds] : mirrors.find((x) => x.path[1] === feeds);
    if (writtenV(items[edited], o.path.length > m.path.length ? j : undefined)) {
      sink.warning('link-output-v', `\`output.v\` is not used: this output feeds \`${fed?.name ?? `mirror ${feeds + 1}`}\`, so its voltage is the solved input voltage of that mirror`, [...o.path, 'output', 'v'], 'key');
    }
    return { ...o, feeds };
  });
  const input = m.input.kind === 'link' && link ? { ...m.input, mirror: link.mirror, output: link.output } : m.input;
  const out = mirrors.slice();
  out[at] = { ...m, input, outputs };
  return out;
}

function linkOf(m: ResolvedMirror): LinkInput | undefined {
  return m.kind !== 'netlist' && m.input.kind === 'link' ? m.input : undefined;
}

/** Check and resolve every link of `mirrors` (read from `data`); findings to `sink`. Returns the
 *  mirrors with links resolved and fed outputs marked, as new objects where anything changes (a
 *  re-check after a fix reuses the mirror objects of the first reading). */
export function checkLinks(data: unknown, given: ResolvedMirror[], sink: FindingSink): ResolvedMirror[] {
  // No link and no fed output: nothing to check or mark (every fix's re-check of a plain spec).
  if (given.every((m) => m.kind === 'netlist' || (m.input.kind !== 'link' && m.outputs.every((o) => o.feeds === undefined)))) return given;
  // A mirror neither linked nor fed stays the object it was (a keystroke's next parse hands the
  // unedited mirrors on, and their solved reports are keyed by object: analysis/repeats.ts);
  // what changes here is a copy made here (`made`), an output marked fed a copy of its own.
  const made = new Set<ResolvedMirror>();
  const mirrors = given.map((m): ResolvedMirror => {
    if (m.kind === 'netlist') return m;
    const fed = m.outputs.some((o) => o.feeds !== undefined);
    if (m.input.kind !== 'link' && !fed) return m;
    const outputs = fed ? m.outputs.map((o) => { if (o.feeds === undefined) return o; const c = { ...o }; delete c.feeds; return c; }) : m.outputs.slice();
    const c = { ...m, input: m.input.kind === 'link' ? { ...m.input, mirror: -1, output: -1 } : m.input, outputs };
    made.add(c);
    return c;
  });
  const at = new Map<number, number>(mirrors.map((m, k) => [m.path[1] as number, k]));
  const targets = linkTargets(data);
  const byIndex = new Map<number, ResolvedMirror>(mirrors.map((m) => [m.path[1] as number, m]));
  const bad = new Set<number>();
  const taken = new Map<string, number>();
  const fromPath = (m: ResolvedMirror) => [...m.path, 'input', 'from'];
  for (const m of mirrors) {
    const link = linkOf(m);
    if (!link) continue;
    const i = m.path[1] as number;
    const r = resolveLinkPath(link.from, targets, (w, c) => (sink.suggesting('link-unknown') ? suggestion(w, c) : undefined));
    if (!r.ok) {
      sink.error('link-unknown', r.message + (r.word !== undefined ? `; did you mean \`${r.word}\`?` : ''), fromPath(m), undefined, undefined, r.word);
      bad.add(i);
      continue;
    }
    const { mirror: up, output } = r.link;
    if (up === i) {
      sink.error('link-self', `mirror \`${m.name}\` cannot feed its own input`, fromPath(m));
      bad.add(i);
      continue;
    }
    const upType = r.link.target.type;
    // An NPN output sinks like an NMOS one: polarity is the side of the supply, not the family.
    if (upType !== undefined && isDeviceType(upType) && sinksCurrent(upType) === sinksCurrent(m.type)) {
      const role = sinksCurrent(m.type) ? 'sinks' : 'sources';
      sink.error('link-polarity', `\`${link.from}\` is a ${upType} output: it ${role} current, as this ${m.type} mirror's input does; a link joins an output to an input of the other polarity`, fromPath(m));
      bad.add(i);
      continue;
    }
    const key = `${up}:${output}`;
    const first = taken.get(key);
    if (first !== undefined) {
      const other = byIndex.get(first)?.name ?? `mirror ${first + 1}`;
      sink.error('link-shared', `\`${link.from}\` already feeds \`${other}\`; one output feeds one input (give \`${r.link.target.name}\` another output)`, fromPath(m));
      bad.add(i);
      continue;
    }
    taken.set(key, i);
    link.mirror = up;
    link.output = output;
  }
  // Cycles: follow each chain upwards, marking what is done, so a file of long chains costs
  // linear time; a chain that meets itself is a loop (each member gets the finding at its `from`).
  const looped: number[] = [];
  const state = new Map<number, 1 | 2>();   // 1: on the chain being followed, 2: done
  for (const m of mirrors) {
    const chain: number[] = [];
    let at: number | undefined = m.path[1] as number;
    while (at !== undefined && !state.has(at)) {
      state.set(at, 1);
      chain.push(at);
      at = upstreamOf(byIndex, at);
    }
    if (at !== undefined && state.get(at) === 1) {
      const loop = chain.slice(chain.indexOf(at));
      for (let k = 0; k < loop.length; k++) {
        const here = byIndex.get(loop[k]!)!;
        // Upwards from here: the mirrors that feed it, back to itself.
        const names = [...loop.slice(k), ...loop.slice(0, k)].map((x) => byIndex.get(x)?.name ?? `mirror ${x + 1}`);
        sink.error('link-cycle', `links close a loop: ${[...names, here.name].join(' ← ')}; a bias network is a tree fed from one root`, fromPath(here));
        looped.push(loop[k]!);
      }
    }
    for (const x of chain) state.set(x, 2);
  }
  for (const i of looped) bad.add(i);
  // A mirror fed (directly or not) by one that has errors cannot be solved yet.
  const items = isRecord(data) && Array.isArray(data.mirrors) ? data.mirrors : [];
  for (let k = 0; k < items.length; k++) if (!byIndex.has(k)) bad.add(k);
  const fedFrom = new Map<number, ResolvedMirror[]>();
  for (const m of mirrors) {
    const link = linkOf(m);
    if (!link || link.mirror < 0) continue;
    const list = fedFrom.get(link.mirror) ?? [];
    list.push(m);
    fedFrom.set(link.mirror, list);
  }
  const queue = [...bad];
  while (queue.length > 0) {
    const up = queue.pop()!;
    for (const m of fedFrom.get(up) ?? []) {
      const i = m.path[1] as number;
      if (bad.has(i)) continue;
      const name = byIndex.get(up)?.name ?? targets.find((t) => t.index === up)?.name ?? `mirror ${up + 1}`;
      sink.error('link-upstream', `fed by \`${name}\`, which has errors: this mirror is solved once they are fixed`, fromPath(m));
      bad.add(i);
      queue.push(i);
    }
  }
  // Mark the fed outputs; a written voltage on one is not used.
  for (const m of mirrors) {
    const link = linkOf(m);
    if (!link || bad.has(m.path[1] as number)) continue;
    let up = byIndex.get(link.mirror) as TemplateMirror | undefined;
    const out = up?.outputs[link.output];
    if (!up || !out) continue;
    if (!made.has(up)) {
      up = { ...up, outputs: up.outputs.slice() };
      made.add(up);
      byIndex.set(link.mirror, up);
      mirrors[at.get(link.mirror)!] = up;
    }
    up.outputs[link.output] = { ...out, feeds: m.path[1] as number };
    if (writtenV(items[link.mirror], out.path.length > up.path.length ? link.output : undefined)) {
      sink.warning('link-output-v', `\`output.v\` is not used: this output feeds \`${m.name}\`, so its voltage is the solved input voltage of that mirror`, [...out.path, 'output', 'v'], 'key');
    }
  }
  return mirrors;
}

function upstreamOf(byIndex: Map<number, ResolvedMirror>, i: number): number | undefined {
  const m = byIndex.get(i);
  const l = m ? linkOf(m) : undefined;
  return l && l.mirror >= 0 ? l.mirror : undefined;
}

function writtenV(item: unknown, output: number | undefined): boolean {
  if (!isRecord(item)) return false;
  const holder: unknown = output === undefined ? item : Array.isArray(item.outputs) ? item.outputs[output] : undefined;
  return isRecord(holder) && isRecord(holder.output) && holder.output.v !== undefined;
}
