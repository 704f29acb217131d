/**
 * Path → source range over the YAML node tree. Paths follow the plain data (after aliases and
 * `<<` merges), so a finding found in the data lands where the designer wrote the value.
 */
import { isAlias, isMap, isScalar, isSeq, Scalar } from 'yaml';
import type { Document, Node, Pair, YAMLMap } from 'yaml';
import type { Range, SpecPath } from '../types';
import { LineIndex, ZERO_RANGE } from '../text/lines';

export interface SourceMap {
  /** Range of the value node at path, or undefined. */
  value(path: SpecPath): Range | undefined;
  /** Range of the key of the pair at path (for array items: the item), or undefined. */
  key(path: SpecPath): Range | undefined;
  /** value(path) ?? key(path) ?? nearest ancestor's range; always defined (falls back to 0:0). */
  rangeFor(path: SpecPath): Range;
  /** The source text of a range (of the text this map describes). */
  text(range: Range): string;
}

/** What a path points at. */
export interface Located {
  /** The value node (aliases not resolved), when present. */
  node?: Node;
  /** The pair holding it, for a mapping entry. */
  pair?: Pair;
  /** The collection holding it. */
  parent?: Node;
  /** [start, end) offsets of the value token (the alias token for an alias). */
  valueSpan?: [number, number];
  /** [start, end) of the key (for array items: the item). */
  keySpan?: [number, number];
}

type Span = [number, number];

interface KeyIndex {
  pairs: Map<string, Pair>;
  /** `<<` pairs, in file order. */
  merges: Pair[];
}

function span(n: unknown): Span | undefined {
  const r = (n as { range?: [number, number, number] } | null)?.range;
  return r ? [r[0], r[1]] : undefined;
}

function keyText(k: unknown): string | undefined {
  if (!isScalar(k)) return undefined;
  // A `<<` merge key is a symbol in the tree.
  return typeof k.value === 'symbol' ? k.value.description : String(k.value);
}

export class YamlSourceMap implements SourceMap {
  constructor(readonly doc: Document | undefined, readonly lines: LineIndex) {}

  text(range: Range): string {
    return this.lines.slice(range);
  }

  private deref(n: unknown, depth = 0): unknown {
    if (!this.doc || depth > 50) return n;
    return isAlias(n) ? this.deref(n.resolve(this.doc), depth + 1) : n;
  }

  /** Pairs by key text per mapping, built on a mapping's first lookup: a spec with 40 000 keys
   *  gets 40 000 findings, and a scan of the mapping per finding would be quadratic. */
  private readonly keyed = new WeakMap<YAMLMap, KeyIndex>();

  private indexOf(map: YAMLMap): KeyIndex {
    let ix = this.keyed.get(map);
    if (ix) return ix;
    ix = { pairs: new Map(), merges: [] };
    for (const p of map.items) {
      const k = keyText(p.key);
      if (k === undefined) continue;
      ix.pairs.set(k, p);  // the last pair of a key wins, as in the data
      if (k === '<<') ix.merges.push(p);
    }
    this.keyed.set(map, ix);
    return ix;
  }

  /** The last pair for key in map, following `<<` merge sources (own keys win). */
  private findPair(map: YAMLMap, key: string, depth = 0): Pair | undefined {
    const ix = this.indexOf(map);
    const found = ix.pairs.get(key);
    if (found || depth > 20) return found;
    for (const p of ix.merges) {
      const v = this.deref(p.value);
      const sources = isSeq(v) ? v.items.map((x) => this.deref(x)) : [v];
      for (const s of sources) {
        if (!isMap(s)) continue;
        const q = this.findPair(s, key, depth + 1);
        if (q) return q;
      }
    }
    return undefined;
  }

  locate(path: SpecPath): Located | undefined {
    if (!this.doc) return undefined;
    let cur: unknown = this.doc.contents;
    let here: Located = { node: (cur ?? undefined) as Node | undefined, valueSpan: span(cur) };
    for (const seg of path) {
      const c = this.deref(cur);
      if (typeof seg === 'number' && isSeq(c)) {
        const item = c.items[seg];
        if (item === undefined) return undefined;
        here = { node: item as Node, parent: c, valueSpan: span(item), keySpan: span(item) };
        cur = item;
      } else if (isMap(c)) {
        const pair = this.findPair(c, String(seg));
        if (!pair) return undefined;
        const v = pair.value as Node | null;
        here = { node: v ?? undefined, pair, parent: c, valueSpan: span(v), keySpan: span(pair.key) };
        cur = v;
      } else {
        return undefined;
      }
    }
    return here;
  }

  value(path: SpecPath): Range | undefined {
    const s = this.locate(path)?.valueSpan;
    return s ? this.lines.range(s[0], s[1]) : undefined;
  }

  key(path: SpecPath): Range | undefined {
    const s = this.locate(path)?.keySpan;
    return s ? this.lines.range(s[0], s[1]) : undefined;
  }

  rangeFor(path: SpecPath): Range {
    return this.value(path) ?? this.key(path) ?? this.ancestor(path);
  }

  private ancestor(path: SpecPath): Range {
    for (let n = path.length - 1; n >= 0; n--) {
      const p = path.slice(0, n);
      const l = this.locate(p);
      if (l) return this.spanOfCollectionOrKey(l) ?? this.firstLine(l) ?? ZERO_RANGE;
    }
    return ZERO_RANGE;
  }

  private spanOfCollectionOrKey(l: Located): Range | undefined {
    if (l.pair && l.keySpan) return this.lines.range(l.keySpan[0], l.keySpan[1]);
    return undefined;
  }

  /** First line of a collection (array items and the root have no key). */
  private firstLine(l: Located): Range | undefined {
    const n = this.deref(l.node);
    if (isMap(n)) {
      const name = n.items.find((p) => keyText(p.key) === 'name');
      const s = span(name?.value) ?? span(n.items[0]?.key);
      if (s) return this.lines.range(s[0], s[1]);
    }
    const s = l.valueSpan;
    if (!s) return undefined;
    return this.lines.range(s[0], Math.min(s[1], this.lines.lineEnd(s[0])));
  }

  /**
   * The narrowest range for a finding about path: a scalar's token, else the key, else (array
   * items, the root) the item's `name` or first key, else the nearest ancestor's key.
   */
  narrow(path: SpecPath): Range {
    const l = this.locate(path);
    if (!l) return this.ancestor(path);
    const n = l.node;
    const scalarLike = n !== undefined && (isAlias(n) || isScalar(n));
    if (scalarLike && l.valueSpan && l.valueSpan[1] > l.valueSpan[0]) return this.lines.range(l.valueSpan[0], l.valueSpan[1]);
    // A one-line flow collection (`[0.5, 1.6]`, `{ m: 4 }`) is itself the token to change.
    const flow = (n as { flow?: boolean } | undefined)?.flow === true;
    if (flow && l.pair && l.valueSpan && this.lines.position(l.valueSpan[0]).line === this.lines.position(l.valueSpan[1]).line) {
      return this.lines.range(l.valueSpan[0], l.valueSpan[1]);
    }
    return this.spanOfCollectionOrKey(l) ?? this.firstLine(l) ?? this.ancestor(path);
  }

  /** The key (or, for array items, the item's first line): where a "missing key" finding goes. */
  keyOf(path: SpecPath): Range {
    const l = this.locate(path);
    if (!l) return this.ancestor(path);
    return this.spanOfCollectionOrKey(l) ?? this.firstLine(l) ?? this.ancestor(path);
  }

  /** Range of [start, end) characters of the scalar's value text, when the source spells it
   *  verbatim (plain or simply quoted); else the whole value. */
  within(path: SpecPath, start: number, end: number): Range {
    const l = this.locate(path);
    const n = l?.node;
    if (l?.valueSpan && n instanceof Scalar && typeof n.value === 'string') {
      const [a, b] = l.valueSpan;
      const quoted = n.type === Scalar.QUOTE_DOUBLE || n.type === Scalar.QUOTE_SINGLE;
      const from = quoted ? a + 1 : a;
      const src = this.lines.text.slice(from, quoted ? b - 1 : b);
      if (src === n.value) return this.lines.range(from + start, from + end);
    }
    return this.narrow(path);
  }
}
