/**
 * Where links are written (design §9.1), for the editor's go to definition, find references and
 * rename: the range of every mirror's and bank output's `name`, and of every `from` value with
 * the part of it that names the mirror and the part that names the output. Paths resolve through
 * network/paths.ts, the one reader of link paths; this module only adds the source ranges.
 *
 * Read from the text alone (YAML read, no elaboration), so it answers in a file that has errors
 * and costs a parse, not an analysis.
 */
import { isScalar } from 'yaml';
import type { Range } from '../types';
import { LineIndex } from '../text/lines';
import { readDocument } from '../spec/document';
import { YamlSourceMap } from '../spec/source-map';
import { isRecord } from '../spec/params';
import { linkPathOf, linkTargets, resolveLinkPath } from './paths';

/** A mirror's `name` (no `output`) or a bank output's `name`, as written. */
export interface NameSite {
  /** File index of the mirror; the output's index for a bank output's name. */
  mirror: number;
  output?: number;
  name: string;
  /** The value token (quotes included). */
  range: Range;
  /** The name's characters inside the token; absent when the token is not the name spelled
   *  plainly (an escape, an alias, a block scalar): such a name is not renamed in place. */
  inner?: Range;
}

/** One `input: { from: PATH }`. */
export interface LinkSite {
  /** File index of the mirror whose input it is. */
  mirror: number;
  from: string;
  /** The value token (quotes included). */
  range: Range;
  /** What the path names, when it resolves. */
  target?: { mirror: number; output: number; outputName?: string };
  /** The characters naming the mirror and (for `mirror.output`) the output, when the token spells
   *  the path plainly. */
  mirrorPart?: Range;
  outputPart?: Range;
}

export interface LinkSites { names: NameSite[]; links: LinkSite[] }

const EMPTY: LinkSites = { names: [], links: [] };

/** [start, end) of `value` inside the token at [s, e): the token itself, or inside one pair of
 *  quotes; undefined when the token spells it otherwise. */
function innerSpan(text: string, s: number, e: number, value: string): [number, number] | undefined {
  if (text.slice(s, e) === value) return [s, e];
  const q = text[s];
  if ((q === '"' || q === "'") && text[e - 1] === q && e - s >= 2 && text.slice(s + 1, e - 1) === value) return [s + 1, e - 1];
  return undefined;
}

export function linkSites(text: string): LinkSites {
  const lines = new LineIndex(text);
  const read = readDocument(text, lines);
  if (!read.parsed || !read.doc || !isRecord(read.data) || !Array.isArray(read.data.mirrors)) return EMPTY;
  const data = read.data;
  const items: unknown[] = read.data.mirrors;
  const source = new YamlSourceMap(read.doc, lines);
  const names: NameSite[] = [];
  const links: LinkSite[] = [];
  /** A string scalar at path, with its token span (aliases are not followed: no range to edit). */
  const scalarAt = (path: (string | number)[]): { value: string; s: number; e: number } | undefined => {
    const l = source.locate(path);
    if (!l?.node || !isScalar(l.node) || typeof l.node.value !== 'string' || !l.valueSpan) return undefined;
    return { value: l.node.value, s: l.valueSpan[0], e: l.valueSpan[1] };
  };
  const site = (path: (string | number)[], mirror: number, output?: number): void => {
    const t = scalarAt(path);
    if (!t) return;
    const n: NameSite = { mirror, name: t.value, range: lines.range(t.s, t.e) };
    if (output !== undefined) n.output = output;
    const inner = innerSpan(text, t.s, t.e, t.value);
    if (inner) n.inner = lines.range(inner[0], inner[1]);
    names.push(n);
  };
  items.forEach((item, i) => {
    if (!isRecord(item)) return;
    site(['mirrors', i, 'name'], i);
    if (Array.isArray(item.outputs)) item.outputs.forEach((_o: unknown, j: number) => site(['mirrors', i, 'outputs', j, 'name'], i, j));
  });
  const targets = linkTargets(data);
  items.forEach((_item, i) => {
    const from = linkPathOf(data, i);
    if (from === undefined) return;
    const t = scalarAt(['mirrors', i, 'input', 'from']);
    if (!t) return;
    const link: LinkSite = { mirror: i, from, range: lines.range(t.s, t.e) };
    const r = resolveLinkPath(from, targets);
    if (r.ok) {
      link.target = r.link.outputName === undefined
        ? { mirror: r.link.mirror, output: r.link.output }
        : { mirror: r.link.mirror, output: r.link.output, outputName: r.link.outputName };
      const inner = innerSpan(text, t.s, t.e, t.value);
      if (inner) {
        // `mirror` names the mirror whole; `mirror.output` splits where the mirror's name ends.
        const mirrorLength = r.link.target.name.length;
        const whole = mirrorLength === from.length;
        link.mirrorPart = lines.range(inner[0], inner[0] + mirrorLength);
        if (!whole) link.outputPart = lines.range(inner[0] + mirrorLength + 1, inner[1]);
      }
    }
    links.push(link);
  });
  return { names, links };
}
