/**
 * A parsed YAML document as plain data: what the yaml package's `Document.toJS` gives, read
 * straight off the node tree where the tree holds only plain maps, sequences and scalars — the
 * shape of nearly every bias spec. `toJS` is general (anchors, aliases, merge keys, tags, a
 * context per node) and was about a fifth of a cold `qpoint check` past the parse itself; any
 * node this walk does not know (an alias, a merge key, a tagged collection, a complex key) hands
 * the whole document to `toJS`, so the result is always the package's. test/spec/data.test.ts
 * holds the two equal on random documents.
 */
import { isScalar, YAMLMap, YAMLSeq, type Document } from 'yaml';

/** The walk met a node only `toJS` reads right. */
const GENERAL = Symbol('toJS');

/** `doc.toJS({ maxAliasCount })`, the same value (and the same throw on an alias bomb). */
export function documentData(doc: Document, maxAliasCount: number): unknown {
  const fast = plainValue(doc.contents);
  return fast === GENERAL ? doc.toJS({ maxAliasCount }) : fast;
}

function plainValue(node: unknown): unknown {
  if (node === null) return null;
  if (isScalar(node)) {
    const v = node.value;
    if (typeof v === 'bigint') return Number(v);
    return (v !== null && typeof v === 'object') || typeof v === 'symbol' ? GENERAL : v;
  }
  // Exact classes: a tagged collection (!!set, !!omap) subclasses these and converts otherwise.
  if (node instanceof YAMLMap && node.constructor === YAMLMap) return plainMap(node);
  if (node instanceof YAMLSeq && node.constructor === YAMLSeq) {
    const out: unknown[] = [];
    for (const item of node.items) {
      const v = plainValue(item);
      if (v === GENERAL) return GENERAL;
      out.push(v);
    }
    return out;
  }
  return GENERAL;
}

function plainMap(node: YAMLMap): unknown {
  const out: Record<string, unknown> = {};
  for (const { key, value } of node.items) {
    // A merge key (`<<`, or a node that merges itself) and a key that is not a scalar: toJS.
    if (!isScalar(key) || 'addToJSMap' in key) return GENERAL;
    let k = key.value;
    if (k === '<<') return GENERAL;
    if (typeof k === 'bigint') k = Number(k);
    if ((k !== null && typeof k === 'object') || typeof k === 'symbol') return GENERAL;
    const name = k === null ? '' : String(k);
    const v = plainValue(value);
    if (v === GENERAL) return GENERAL;
    // As toJS writes a key the object already has (a repeated key, `__proto__`): an own property.
    if (name in out) Object.defineProperty(out, name, { value: v, writable: true, enumerable: true, configurable: true });
    else out[name] = v;
  }
  return out;
}
