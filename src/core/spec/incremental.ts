/**
 * The parse of an edited text from the parse of the text before it (the editor's keystroke): when
 * the edit lies inside one mirror's item of `mirrors:` and changes nothing outside it, only that
 * item is read again (spec/fragment.ts reads one item's lines alone, exactly where the spec is
 * plain), the other mirrors' elaborations are reused (`elaborate`'s reuse, as a fix's re-check
 * does) and the YAML tree is spliced: the item's node replaced, every position after the edit
 * moved by its length. Anything else — an edit outside the mirrors or across items, a text or a
 * result with any finding, a spec that is not plain — is read whole by `parseSpec`.
 *
 * Exact by construction where it answers: the item alone reads as in the file (fragment.ts), the
 * root and the other items are the same data, and every spec-wide check (names, links, the
 * polarities the process must describe) runs again over the whole list. A read with a finding is
 * never spliced (the caps, order and did-you-means of findings are the whole parse's business).
 * test/core/incremental.test.ts compares with fresh analyses after random edits.
 */
import { isMap, isNode, isPair, isSeq, visit } from 'yaml';
import type { Node } from 'yaml';
import { elaborate } from './elaborate';
import { FindingSink } from './findings';
import { MirrorFragments, type OutsideRead } from './fragment';
import { fedOutputs } from './links';
import { isRecord } from './params';
import { fromRead, parseSpec, type ParsedSpec, type ParseOptions } from './index';
import type { SourceMap } from './source-map';
import { refusal, refusesAsBefore } from './document';
import { validateSchema } from './schema';
import { YamlSourceMap } from './source-map';
import { LineIndex } from '../text/lines';
import { SweptMap } from '../swept-map';

interface Base {
  parsed: ParsedSpec;
  file?: string;
  opts: ParseOptions;
}

/** The last read outside the items of one whole-file re-check (`fromOutside`). */
interface OutsideBase {
  head: string;
  read: OutsideRead;
  json: boolean;
  /** As `fromRead` gave it (elaborated, before the design targets and networks). */
  parsed: ParsedSpec;
  opts: ParseOptions;
}

/**
 * The last parse of each text a file's analyses read (the spec itself, and each whole-file fix
 * re-check by its edit: `slot`), so the next analysis reads only what the designer changed. One
 * parse is a base once: a spliced parse takes over its YAML tree.
 */
export class ParseCache {
  private readonly bases = new SweptMap<string, Base>();
  private readonly outsides = new SweptMap<string, OutsideBase>();
  /** Of the last analysis: texts read whole, and texts read from a base. */
  wholeNow = 0;
  splicedNow = 0;

  begin(): void {
    this.bases.begin();
    this.outsides.begin();
    this.wholeNow = 0;
    this.splicedNow = 0;
  }

  sweep(): void {
    this.bases.sweep();
    this.outsides.sweep();
  }

  get size(): number {
    return this.bases.size + this.outsides.size;
  }

  /**
   * `fromRead` of a text edited outside its items (rules/verify.ts: the EKV fix's `model:`), read
   * by `MirrorFragments.readOutside`. When the slot's last such read had the same lines before the
   * items and no finding, only the items that are not the very objects it read (the designer's
   * edit since: the spliced parse hands on the others) are validated and elaborated again, the
   * others' elaborations reused, as `spliced` does; any finding, or a link written or removed,
   * and the whole is elaborated by `fromRead`.
   */
  fromOutside(slot: string, text: string, outside: OutsideRead, findings: YamlSourceMap, json: boolean, opts: ParseOptions = {}): ParsedSpec {
    const b = this.outsides.get(slot);
    this.outsides.delete(slot);
    const maps = { source: outside.source, findings };
    let out = b && b.head === outside.head && b.json === json && sameParseOptions(b.opts, opts)
      ? elaboratedAgain(b.parsed, text, outside, maps, json, opts) : undefined;
    if (out) this.splicedNow++;
    else out = fromRead(text, outside.read, maps, json, opts);
    if (out.spec && out.findings.length === 0 && !out.withheld && !out.suggestions) this.outsides.set(slot, { head: outside.head, read: outside, json, parsed: out, opts });
    return out;
  }

  /** The slot's last read outside the items (`fromOutside`), for `MirrorFragments.readOutside`. */
  lastOutside(slot: string): OutsideRead | undefined {
    return this.outsides.peek(slot)?.read;
  }

  /** `parseSpec(text, file, opts)`, from the slot's last parse where an edit allows. */
  parse(slot: string, text: string, file: string | undefined, opts: ParseOptions = {}): ParsedSpec {
    const b = this.bases.get(slot);
    this.bases.delete(slot);
    let out = b && sameOptions(b, file, opts) ? spliced(b.parsed, text, opts) : undefined;
    if (out) this.splicedNow++;
    else {
      this.wholeNow++;
      out = parseSpec(text, file, opts);
    }
    // Only a parse without findings can be a base: keep no other.
    if (out.spec && out.findings.length === 0 && !out.withheld) this.bases.set(slot, { parsed: out, file, opts });
    return out;
  }
}

function sameOptions(b: Base, file: string | undefined, opts: ParseOptions): boolean {
  return b.file === file && sameParseOptions(b.opts, opts);
}

function sameParseOptions(a: ParseOptions, b: ParseOptions): boolean {
  if ((a.words ?? true) !== (b.words ?? true)) return false;
  const x = a.tables;
  const y = b.tables;
  if (x === y) return true;
  if (!x || !y) return false;
  const kx = Object.keys(x);
  return kx.length === Object.keys(y).length && kx.every((k) => Object.prototype.hasOwnProperty.call(y, k) && x[k] === y[k]);
}

/** The parse of `text` from `base`, or undefined when it must be read whole. Takes over base's tree. */
function spliced(base: ParsedSpec, text: string, opts: ParseOptions): ParsedSpec | undefined {
  if (text === base.text) return base;
  const data = base.data;
  const spec = base.spec;
  if (!base.parsed || !spec || base.findings.length > 0 || base.withheld || base.suggestions || !isRecord(data) || !Array.isArray(data.mirrors)) return undefined;
  if (spec.mirrors.length !== data.mirrors.length || text.charCodeAt(0) === 0xfeff || base.text.charCodeAt(0) === 0xfeff) return undefined;
  const frags = MirrorFragments.of(base);
  const src = base.source;
  if (!frags || !(src instanceof YamlSourceMap) || !src.doc) return undefined;
  // The edit: what lies between the common prefix and the common suffix of the two texts.
  const old = base.text;
  const n = Math.min(text.length, old.length);
  const a = commonPrefix(old, text, n);
  const s = commonSuffix(old, text, n - a);
  const index = frags.itemHolding(a, old.length - s);
  if (index === undefined) return undefined;
  const lines = LineIndex.of(text);
  if (!refusesAsBefore(old, text, a, s) && refusal(text, lines)) return undefined;
  const frag = frags.read(text, index);
  if (!frag) return undefined;
  const items = data.mirrors.slice();
  items[index] = frag.data;
  const edited = { ...data, mirrors: items };
  // A link written or removed changes which outputs the other mirrors see fed: read them again.
  if (!sameSet(fedOutputs(data), fedOutputs(edited))) return undefined;
  const sink = new FindingSink(src, undefined, opts.words ?? true);
  validateSchema({ ...data, mirrors: [frag.data] }, sink);
  if (sink.list.length > 0) return undefined;
  const read = elaborate(edited, sink, { items: data.mirrors, mirrors: spec.mirrors, except: index }, opts.tables);
  if (!read || sink.list.length > 0 || sink.suggestions.length > 0 || sink.errorCount > 0 || read.mirrors.length !== items.length) return undefined;

  // The tree of the edited text: the item's node from the fragment (its offsets are the full
  // text's minus the fragment's start), every position after the item moved by the edit's length.
  const doc = src.doc;
  const seq = (doc.contents as { items?: unknown[] } | null)?.items?.find((p) => isPair(p) && (p.key as { value?: unknown } | null)?.value === 'mirrors');
  const list = isPair(seq) ? (seq.value as { items?: unknown[] } | null)?.items : undefined;
  const oldItem = list?.[index];
  const newItem = frag.parsed.source instanceof YamlSourceMap ? frag.parsed.source.doc?.contents : undefined;
  if (!list || !isNode(oldItem) || !isNode(newItem)) return undefined;
  const delta = text.length - old.length;
  const oldEnd = frag.end - delta;
  const oldRange = oldItem.range;
  if (!oldRange || oldRange[1]! < oldEnd || oldRange[2]! < oldEnd) return undefined;
  const tail = [0, oldRange[1]! - oldEnd, oldRange[2]! - oldEnd];
  if (delta !== 0) {
    shiftAfter(doc.contents, oldItem, oldEnd, delta);
    shift(doc as unknown as { range?: number[] }, oldEnd, delta);
  }
  // The item alone ends with its text; in the file the nodes that end with it take the line
  // break after it too (a block collection's value end, every node's end), as the old item did.
  visit(newItem, {
    Node(_k, node) {
      shift(node, 0, frag.start);
      const r = node.range;
      if (!r) return;
      const block = (isMap(node) || isSeq(node)) && !node.flow;
      if (block && r[1] === frag.end) r[1] += tail[1]!;
      if (r[2] === frag.end) r[2] += tail[2]!;
    },
  });
  list[index] = newItem;

  const source = new YamlSourceMap(doc, lines);
  frags.carry(source, index, newItem, delta, lines.lineCount - src.lines.lineCount);
  const out: ParsedSpec = { text, parsed: true, findings: [], source, json: base.json, data: edited };
  if (opts.tables) out.tables = opts.tables;
  out.spec = read;
  return out;
}

/** Characters the compares of common ends take at a time: the engine compares two slices
 *  natively, far faster than a loop over characters (a 500-mirror text is 95 000 of them). */
const CHUNK = 1024;

/** The length of the common prefix of `x` and `y`, at most `n`. */
function commonPrefix(x: string, y: string, n: number): number {
  let a = 0;
  while (a + CHUNK <= n && x.slice(a, a + CHUNK) === y.slice(a, a + CHUNK)) a += CHUNK;
  while (a < n && x.charCodeAt(a) === y.charCodeAt(a)) a++;
  return a;
}

/** The length of the common suffix of `x` and `y`, at most `n`. */
function commonSuffix(x: string, y: string, n: number): number {
  let s = 0;
  while (s + CHUNK <= n && x.slice(x.length - s - CHUNK, x.length - s) === y.slice(y.length - s - CHUNK, y.length - s)) s += CHUNK;
  while (s < n && x.charCodeAt(x.length - 1 - s) === y.charCodeAt(y.length - 1 - s)) s++;
  return s;
}

/** `fromRead` of `outside` from `base`, a read of the same lines before the items; undefined when it must be elaborated whole. */
function elaboratedAgain(base: ParsedSpec, text: string, outside: OutsideRead, maps: { source: SourceMap; findings: YamlSourceMap }, json: boolean, opts: ParseOptions): ParsedSpec | undefined {
  const was = base.data;
  const data = outside.read.data;
  const spec = base.spec;
  if (!outside.read.parsed || !spec || base.findings.length > 0 || base.withheld || base.suggestions || !isRecord(was) || !Array.isArray(was.mirrors)) return undefined;
  if (!isRecord(data) || !Array.isArray(data.mirrors) || data.mirrors.length !== was.mirrors.length || spec.mirrors.length !== was.mirrors.length) return undefined;
  const items = data.mirrors;
  const before = was.mirrors;
  const changed = items.filter((item, i) => item !== before[i]);
  if (!sameSet(fedOutputs(was), fedOutputs(data))) return undefined;
  const sink = new FindingSink(maps.findings, undefined, opts.words ?? true);
  // The same lines read the same root, which validated cleanly: only the changed items are new.
  if (changed.length > 0) validateSchema({ ...data, mirrors: changed }, sink);
  if (sink.list.length > 0) return undefined;
  const read = elaborate(data, sink, { items: before, mirrors: spec.mirrors, except: -1 }, opts.tables);
  if (!read || sink.list.length > 0 || sink.suggestions.length > 0 || sink.errorCount > 0 || read.mirrors.length !== items.length) return undefined;
  const out: ParsedSpec = { text, parsed: true, findings: [], source: maps.source, json, data };
  if (opts.tables) out.tables = opts.tables;
  out.spec = read;
  return out;
}

/** Adds `delta` to every offset at or after `from` in the tree under `node` but `skip`'s; a
 *  node that ends before `from` holds none. */
function shiftAfter(node: unknown, skip: unknown, from: number, delta: number): void {
  if (!isNode(node) || node === skip) return;
  const r = node.range;
  if (r && r[2]! < from) return;
  shift(node, from, delta);
  if (isMap(node)) {
    for (const p of node.items) {
      shiftAfter(p.key, skip, from, delta);
      shiftAfter(p.value, skip, from, delta);
    }
  } else if (isSeq(node)) {
    for (const x of node.items) shiftAfter(x, skip, from, delta);
  }
}

/** Adds `delta` to every offset of the node at or after `from`. */
function shift(node: Node | { range?: number[] | null }, from: number, delta: number): void {
  const r = (node as { range?: number[] | null }).range;
  if (!r || delta === 0) return;
  for (let k = 0; k < r.length; k++) if (r[k]! >= from) r[k] = r[k]! + delta;
}

function sameSet(a: Set<string>, b: Set<string>): boolean {
  if (a.size !== b.size) return false;
  for (const x of a) if (!b.has(x)) return false;
  return true;
}
