/**
 * One mirror's text read as a document of its own. A fix edits the tokens of one mirror; to learn
 * what the edited text means, qpoint re-reads only that mirror's lines (a few hundred characters)
 * instead of the whole file, and splices the result into the data it already has.
 *
 * This is exact only where YAML's meaning of those lines cannot depend on the rest of the file, so
 * a spec qualifies only when it is plain: no anchor, alias or tag anywhere (an anchor in one mirror
 * can be read by another), no `%YAML` directive but 1.2, no duplicate key or YAML warning,
 * `mirrors` a block sequence whose items are mappings. An item qualifies when every line after its
 * first is blank or indented at least to its first key: then those lines are the item in the file
 * and the same mapping standing alone (the `- ` before the first key is blanked to spaces, so
 * columns and offsets stay). Anything else answers undefined and the caller re-reads the whole text.
 */
import { isMap, isSeq, parseDocument, visit } from 'yaml';
import type { Document } from 'yaml';
import type { Finding, Range, SpecPath, TextEdit } from '../types';
import { SPEC_LIMITS } from '../defaults';
import type { ParsedSpec } from './index';
import { duplicateKeys, readDocument, refusal, refusesAsBefore, YAML_OPTIONS, type ReadDocument } from './document';
import { documentData } from './data';
import { LineIndex, linesDown } from '../text/lines';
import type { SourceMap } from './source-map';
import { YamlSourceMap } from './source-map';
import { digest } from '../canonical';

/** Where one mirror item sits in the original text (offsets). */
interface ItemSpan {
  /** Start of the line holding the item's first key. */
  lineStart: number;
  /** The item's first character. */
  content: number;
  /** End of the item's last line, before its line break. */
  end: number;
  /** 0-based line of `lineStart`. */
  line: number;
  /** The digest of the item's text from `lineStart` to `end`, and the per-mirror cache keys made
   *  of it (`itemKey`): made on first use, carried with the span while the item's text stays. */
  digest?: string;
  keys?: { rest: string; key: string }[];
}

/** One mirror item of an edited text, read alone. */
export interface Fragment {
  /** The item's lines (first-line prefix blanked); its offsets are the full text's minus `start`. */
  parsed: ParsedSpec;
  data: unknown;
  /** Offset and 0-based line in the full text where the fragment starts. */
  start: number;
  line: number;
  /** Offset in the full text where it ends. */
  end: number;
}

/** True when nothing in the document is shared or retyped: no anchor, alias or explicit tag. */
function plain(doc: Document): boolean {
  let ok = true;
  visit(doc, {
    Alias() { ok = false; return visit.BREAK; },
    Node(_key, node) {
      if ((node as { anchor?: string }).anchor || (node as { tag?: string }).tag) { ok = false; return visit.BREAK; }
      return undefined;
    },
  });
  return ok;
}

/** True when the spec's YAML reuses a node through an alias (`*name`, also under a `<<` merge key). */
export function sharesValues(parsed: ParsedSpec): boolean {
  const doc = parsed.source instanceof YamlSourceMap ? parsed.source.doc : undefined;
  if (!doc) return false;
  // Item spans were found: the tree is plain, with no alias.
  if (parsed.source instanceof YamlSourceMap && spansOf.get(parsed.source)) return false;
  let found = false;
  visit(doc, { Alias() { found = true; return visit.BREAK; } });
  return found;
}

const FIRST_LINE_PREFIX = /^ *(?:- +)?$/;

/** Item spans by source map (a tree and its text, which nothing changes while its map is in use),
 *  found once however many analyses' steps ask; null: the spec is not plain. */
const spansOf = new WeakMap<YamlSourceMap, (ItemSpan | undefined)[] | null>();
/** Where the `mirrors` key and its items start, found with the spans (an edit inside an item moves neither). */
const outsideOf = new WeakMap<YamlSourceMap, Outside | undefined>();
interface Outside { key: number; keyLineStart: number; itemsStart: number }

/** Where an item of `mirrors` sits in the text, or undefined when its lines do not read alone. */
function spanOf(item: unknown, text: string, lines: LineIndex): ItemSpan | undefined {
  if (!isMap(item) || !item.range) return undefined;
  const content = item.range[0];
  const lineStart = lines.lineStart(content);
  if (!FIRST_LINE_PREFIX.test(text.slice(lineStart, content))) return undefined;
  const end = lines.lineEnd(Math.max(content, item.range[1] - 1));
  return { lineStart, content, end, line: lines.position(lineStart).line };
}

/** An edited text read outside its mirror items (`MirrorFragments.readOutside`). */
export interface OutsideRead {
  /** The edited lines before the first item, read alone, with the original items put back. */
  read: ReadDocument;
  source: SourceMap;
  /** Those lines (the same lines read the same data). */
  head: string;
  /** Their read alone (`mirrors:` null) and its source map, for the next read of the same lines. */
  alone: { read: ReadDocument; map: YamlSourceMap };
}

export class MirrorFragments {
  /** Item spans, found on first use (a clean file never needs them); null: the spec is not plain. */
  private found: (ItemSpan | undefined)[] | null | undefined;
  /** Where the `mirrors` key and its first item's line start, when `mirrors` is the root's last key (found with the spans). */
  private outside?: Outside;

  private constructor(private readonly parsed: ParsedSpec, private readonly src: YamlSourceMap) {}

  /** The fragments of a parsed spec, or undefined when it has no YAML tree of its own text. */
  static of(parsed: ParsedSpec): MirrorFragments | undefined {
    const src = parsed.source;
    if (!(src instanceof YamlSourceMap) || !src.doc || src.lines.text !== parsed.text) return undefined;
    return new MirrorFragments(parsed, src);
  }

  private get original(): string {
    return this.parsed.text;
  }

  private get lines(): LineIndex {
    return this.src.lines;
  }

  private get spans(): (ItemSpan | undefined)[] {
    if (this.found === undefined) {
      const known = spansOf.get(this.src);
      if (known !== undefined) this.outside = outsideOf.get(this.src);
      this.found = known !== undefined ? known : this.find();
      spansOf.set(this.src, this.found);
    }
    return this.found ?? [];
  }

  /**
   * The spans of `to`, the tree of an edit inside item `index` of this spec spliced from this one
   * (spec/incremental.ts): that item found again, the items after it moved by the edit's
   * characters and lines. Nothing else changed, so the spec is as plain as this one.
   */
  carry(to: YamlSourceMap, index: number, item: unknown, delta: number, lineDelta: number): void {
    const spans = this.spans;
    if (this.found === null) return;
    const out = spans.slice();
    out[index] = spanOf(item, to.lines.text, to.lines);
    for (let j = index + 1; j < out.length; j++) {
      const s = out[j];
      if (s) out[j] = { lineStart: s.lineStart + delta, content: s.content + delta, end: s.end + delta, line: s.line + lineDelta, digest: s.digest, keys: s.keys };
    }
    spansOf.set(to, out);
    outsideOf.set(to, this.outside);
  }

  private find(): (ItemSpan | undefined)[] | null {
    const doc = this.src.doc!;
    if (doc.errors.length > 0 || doc.warnings.length > 0) return null;
    if (this.parsed.findings.some((f) => f.code === 'duplicate-key' || f.code === 'yaml-warning')) return null;
    // A `%YAML 1.1` directive retypes plain scalars (`yes`, `017`); the lines alone read as 1.2.
    if (!isMap(doc.contents) || !plain(doc) || doc.directives?.yaml.version !== '1.2') return null;
    const mirrors = doc.contents.items.filter((p) => keyName(p.key) === 'mirrors');
    if (mirrors.length !== 1 || doc.contents.items.some((p) => keyName(p.key) === '<<')) return null;
    const seq = mirrors[0].value;
    if (!isSeq(seq) || seq.flow) return null;
    const text = this.original;
    const lines = this.lines;
    const key = (mirrors[0].key as { range?: [number, number, number] } | null)?.range;
    if (doc.contents.items[doc.contents.items.length - 1] === mirrors[0] && key && seq.range) {
      const keyLineStart = lines.lineStart(key[0]);
      const itemsStart = lines.lineStart(seq.range[0]);
      if (itemsStart > keyLineStart) this.outside = { key: key[0], keyLineStart, itemsStart };
    }
    outsideOf.set(this.src, this.outside);
    return seq.items.map((item) => spanOf(item, text, lines));
  }

  /** The mirror whose item (from its first key to its last line's end) holds offsets [start, end] of the original text. */
  itemHolding(start: number, end: number): number | undefined {
    const spans = this.spans;
    let lo = 0;
    let hi = spans.length - 1;
    while (lo <= hi) {
      const mid = (lo + hi) >> 1;
      const sp = spans[mid];
      if (!sp) return undefined;
      if (sp.end < start) lo = mid + 1;
      else if (sp.content > start) hi = mid - 1;
      else return end <= sp.end ? mid : undefined;
    }
    return undefined;
  }

  /** True when every edit lies inside mirror `index`'s item (from its first key to its last line's end). */
  holds(index: number, edits: readonly TextEdit[]): boolean {
    const sp = this.spans[index];
    if (!sp) return false;
    return edits.every((e) => this.lines.offset(e.range.start) >= sp.content && this.lines.offset(e.range.end) <= sp.end &&
      // LineIndex clamps: a position past its line is not inside.
      positionExists(this.lines, e.range.start) && positionExists(this.lines, e.range.end));
  }

  /**
   * Mirror `index` of `text`, an edit of the original that changed nothing outside that item
   * (checked). Undefined when the item does not read cleanly alone.
   */
  read(text: string, index: number): Fragment | undefined {
    const sp = this.spans[index];
    if (!sp) return undefined;
    const end = sp.end + (text.length - this.original.length);
    if (end < sp.content || text.slice(0, sp.content) !== this.original.slice(0, sp.content) || text.slice(end) !== this.original.slice(sp.end)) {
      return undefined;
    }
    return this.readItem(sp, text.slice(sp.content, end), end);
  }

  /**
   * Mirror `index` of the original with `edits` applied, each inside that item (`holds`, checked):
   * what `read` reads of the edited text, made from the item alone (a big file's text outside it
   * is neither built nor compared). Undefined as `read`.
   */
  readEdits(index: number, edits: readonly TextEdit[]): Fragment | undefined {
    const sp = this.spans[index];
    if (!sp || !this.holds(index, edits)) return undefined;
    const item = this.itemTexts(index, edits);
    return item && this.readItem(sp, item.edited, sp.content + item.edited.length);
  }

  /** Item `sp` read alone from its edited text `item` (from its first key), which ends at `end` of the edited text. */
  private readItem(sp: ItemSpan, item: string, end: number): Fragment | undefined {
    const indent = sp.content - sp.lineStart;
    const body = ' '.repeat(indent) + item;
    for (let at = body.indexOf('\n'); at >= 0; at = body.indexOf('\n', at + 1)) {
      let i = at + 1;
      while (i < body.length && body.charCodeAt(i) === 32) i++;
      const c = body.charCodeAt(i);
      const blank = i >= body.length || c === 10 || (c === 13 && body.charCodeAt(i + 1) === 10);
      if (!blank && i - at - 1 < indent) return undefined;
    }
    const doc = parseDocument(body, YAML_OPTIONS);
    if (doc.errors.length > 0 || doc.warnings.length > 0 || !isMap(doc.contents) || !plain(doc)) return undefined;
    const lines = new LineIndex(body);
    const dup: Finding[] = [];
    duplicateKeys(doc, lines, dup);
    if (dup.length > 0) return undefined;
    let data: unknown;
    try {
      data = documentData(doc, SPEC_LIMITS.maxAliasCount);
    } catch {
      return undefined;
    }
    return {
      parsed: { text: body, parsed: true, findings: [], source: new YamlSourceMap(doc, lines), json: this.parsed.json, data },
      data, start: sp.lineStart, line: sp.line, end,
    };
  }

  /**
   * Mirror `index`'s item as written in the original text (from the start of its first line), and
   * its text from its first key with `edits` applied (they must lie inside it: `holds`): what
   * `read` reads of the edited text, without building that text. Undefined when the spec is not
   * plain or an edit reaches outside the item.
   */
  itemTexts(index: number, edits: readonly TextEdit[]): { original: string; edited: string } | undefined {
    const sp = this.spans[index];
    if (!sp) return undefined;
    const item = this.original.slice(sp.content, sp.end);
    const spans = edits.map((e) => ({ s: this.lines.offset(e.range.start) - sp.content, e: this.lines.offset(e.range.end) - sp.content, t: e.newText }));
    spans.sort((a, b) => a.s - b.s);
    let edited = '';
    let pos = 0;
    for (const x of spans) {
      if (x.s < pos || x.e < x.s || x.e > item.length) return undefined;
      edited += item.slice(pos, x.s) + x.t;
      pos = x.e;
    }
    return { original: this.original.slice(sp.lineStart, sp.end), edited: edited + item.slice(pos) };
  }

  /**
   * The edited text outside the mirror items, read alone: `text` is an edit of the original that
   * changed nothing from the `mirrors` key's line on (a process edit: the EKV fix), and `mirrors`
   * is the root's last key. The lines before its first item read as a document of their own
   * (where `mirrors:` reads null), and the original items go back into that data: what the whole
   * edited text reads as, without reading every mirror again. Undefined when that is not exact
   * (then the caller reads the whole text): the edited lines must read cleanly and plainly alone.
   */
  readOutside(text: string, edits: readonly TextEdit[], prior?: OutsideRead): OutsideRead | undefined {
    if (this.spans.length === 0 || !this.outside || !Array.isArray((this.parsed.data as { mirrors?: unknown } | undefined)?.mirrors)) return undefined;
    const { key, keyLineStart, itemsStart } = this.outside;
    if (!edits.every((e) => this.lines.offset(e.range.end) < keyLineStart && positionExists(this.lines, e.range.start) && positionExists(this.lines, e.range.end))) return undefined;
    const delta = text.length - this.original.length;
    if (keyLineStart + delta < 0 || text.slice(keyLineStart + delta) !== this.original.slice(keyLineStart)) return undefined;
    // The whole text is refused (too large, a control byte, runaway flow nesting) as a whole read
    // would; the original was read without refusal, so an edit of plain characters (the EKV fix's
    // model name) is not scanned again.
    if (!this.quietEdit(text, edits) && refusal(text, LineIndex.of(text))) return undefined;
    const cut = text.slice(0, itemsStart + delta);
    // The same lines read the same document: an earlier read of them is taken as it is.
    const again = prior?.head === cut ? prior.alone : undefined;
    const lines = again ? again.map.lines : new LineIndex(cut);
    const read = again ? again.read : readDocument(cut, lines);
    const doc = read.doc;
    if (!read.parsed || read.findings.length > 0 || !doc || doc.errors.length > 0 || doc.warnings.length > 0) return undefined;
    if (!isMap(doc.contents) || !plain(doc) || doc.directives?.yaml.version !== '1.2') return undefined;
    const items = doc.contents.items;
    const last = items[items.length - 1];
    const lastKey = (last?.key as { range?: [number, number, number] } | null)?.range;
    if (!last || keyName(last.key) !== 'mirrors' || !lastKey || lastKey[0] !== key + delta || items.some((p) => keyName(p.key) === '<<')) return undefined;
    const data = read.data as Record<string, unknown> | null;
    if (!data || typeof data !== 'object' || data.mirrors !== null) return undefined;
    const original = this.parsed.data as { mirrors: unknown[] };
    const lineDelta = lines.lineOf(cut.length) - this.lines.lineOf(itemsStart);
    const map = again ? again.map : new YamlSourceMap(doc, lines);
    return {
      read: { doc, parsed: true, findings: [], data: { ...data, mirrors: original.mirrors } },
      source: new OutsideSourceMap(map, this.parsed.source, lineDelta, text),
      head: cut,
      alone: { read, map },
    };
  }

  /**
   * A per-mirror cache key: mirror `index`, its item as written (`itemTexts(index, []).original`,
   * by digest) and `rest`. The same string object while the item and `rest` stay the same (a
   * spliced parse carries the unedited items' keys): a map hashes a string once, so a keystroke
   * neither writes nor hashes the 500 unedited mirrors' keys again.
   */
  itemKey(index: number, rest: string): string | undefined {
    const sp = this.spans[index];
    if (!sp) return undefined;
    sp.digest ??= digest(this.original.slice(sp.lineStart, sp.end));
    const keys = sp.keys ??= [];
    for (const k of keys) if (k.rest === rest) return k.key;
    const key = `${index}\u0000${sp.digest}\u0000${rest}`;
    // A few caches key each mirror (its findings, its anchors, the EKV fix's re-check of it).
    if (keys.length >= 4) keys.shift();
    keys.push({ rest, key });
    return key;
  }

  /** `text` is the original with `edits` applied, and refused as the original is (not at all:
   *  it has a tree) by `refusesAsBefore`. */
  private quietEdit(text: string, edits: readonly TextEdit[]): boolean {
    if (edits.length === 0) return false;
    let a = Infinity;
    let b = 0;
    for (const e of edits) {
      a = Math.min(a, this.lines.offset(e.range.start));
      b = Math.max(b, this.lines.offset(e.range.end));
    }
    const s = this.original.length - b;
    return a <= b && a <= text.length - s && text.slice(0, a) === this.original.slice(0, a) &&
      text.slice(text.length - s) === this.original.slice(b) && refusesAsBefore(this.original, text, a, s);
  }

  /** The line of the original text where mirror `index`'s fragment starts, and where it ends. */
  lineSpan(index: number): { first: number; last: number } | undefined {
    const sp = this.spans[index];
    return sp ? { first: sp.line, last: this.lines.position(sp.end).line } : undefined;
  }
}

function keyName(k: unknown): string | undefined {
  const v = (k as { value?: unknown } | null)?.value;
  return typeof v === 'string' ? v : undefined;
}

function positionExists(lines: LineIndex, p: { line: number; character: number }): boolean {
  const o = lines.offset(p);
  const back = lines.position(o);
  return back.line === p.line && back.character === p.character;
}

/**
 * The source map of the edited text: mirror `index` from its fragment, everything else from the
 * original map, moved down by the lines the edit added.
 */
export class SplicedSourceMap implements SourceMap {
  constructor(
    private readonly base: SourceMap,
    private readonly index: number,
    private readonly fragment: Fragment,
    /** Last line of the item in the original text, and the lines the edit added. */
    private readonly originalLast: number,
    private readonly lineDelta: number,
    /** The edited text this map describes. */
    private readonly edited: string,
  ) {}

  private editedLines?: LineIndex;

  /** A range's text without indexing the whole edited text (a fix's re-check asks for size tokens):
   *  inside the item from the fragment's lines, before or after it from the original's. */
  text(range: Range): string {
    const f = this.fragment;
    const own = f.parsed.source instanceof YamlSourceMap ? f.parsed.source.lines : undefined;
    const last = own ? f.line + own.lineCount - 1 : -1;
    if (own && range.start.line >= f.line && range.end.line <= last) {
      // The fragment's lines are the edited text's, offsets shifted by its start (a blanked prefix keeps its length).
      const at = (p: Range['start']): number => own.offset({ line: p.line - f.line, character: p.character });
      const a = at(range.start), body = f.parsed.text;
      // Past that prefix they are its very characters: sliced there, the big edited text is not flattened.
      let prefix = 0;
      while (range.start.line === f.line && body.charCodeAt(prefix) === 32) prefix++;
      return a >= prefix ? body.slice(a, at(range.end)) : this.edited.slice(a + f.start, at(range.end) + f.start);
    }
    if (own && range.end.line < f.line) return this.base.text(range);
    if (own && range.start.line > last) return this.base.text(linesDown(range, -this.lineDelta));
    this.editedLines ??= LineIndex.of(this.edited);
    return this.editedLines.slice(range);
  }

  private inItem(path: SpecPath): boolean {
    return path.length > 2 && path[0] === 'mirrors' && path[1] === this.index;
  }

  private fromFragment(r: Range | undefined): Range | undefined {
    return r && linesDown(r, this.fragment.line);
  }

  private fromBase(r: Range | undefined): Range | undefined {
    return !r || r.start.line <= this.originalLast ? r : linesDown(r, this.lineDelta);
  }

  value(path: SpecPath): Range | undefined {
    return this.inItem(path) ? this.fromFragment(this.fragment.parsed.source.value(path.slice(2))) : this.fromBase(this.base.value(path));
  }

  key(path: SpecPath): Range | undefined {
    return this.inItem(path) ? this.fromFragment(this.fragment.parsed.source.key(path.slice(2))) : this.fromBase(this.base.key(path));
  }

  rangeFor(path: SpecPath): Range {
    if (this.inItem(path)) return this.fromFragment(this.fragment.parsed.source.rangeFor(path.slice(2)))!;
    return this.fromBase(this.base.rangeFor(path))!;
  }
}

/**
 * The source map of a text edited outside its mirror items (`MirrorFragments.readOutside`): the
 * mirrors from the original map, moved down by the lines the edit added; everything else from the
 * edited lines before them, read alone (the same offsets as in the edited text).
 */
class OutsideSourceMap implements SourceMap {
  constructor(
    private readonly head: YamlSourceMap,
    private readonly base: SourceMap,
    private readonly lineDelta: number,
    /** The edited text this map describes. */
    private readonly edited: string,
  ) {}

  private editedLines?: LineIndex;

  text(range: Range): string {
    this.editedLines ??= LineIndex.of(this.edited);
    return this.editedLines.slice(range);
  }

  private moved(r: Range | undefined): Range | undefined {
    return r && linesDown(r, this.lineDelta);
  }

  value(path: SpecPath): Range | undefined {
    return path[0] === 'mirrors' ? this.moved(this.base.value(path)) : this.head.value(path);
  }

  key(path: SpecPath): Range | undefined {
    return path[0] === 'mirrors' ? this.moved(this.base.key(path)) : this.head.key(path);
  }

  rangeFor(path: SpecPath): Range {
    return path[0] === 'mirrors' ? this.moved(this.base.rangeFor(path))! : this.head.rangeFor(path);
  }
}
