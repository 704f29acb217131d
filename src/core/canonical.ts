/**
 * Keys for results kept across analyses (analysis-cache.ts): a value serialised whole, so a key
 * covers every field of what a result was computed from — fields added later included — with no
 * list of fields to keep up to date.
 *
 * `canonicalJson` is JSON with each object's keys sorted (two equal values give one text, however
 * they were built) and the numbers JSON cannot tell apart written apart (NaN, ±Infinity, −0). A
 * typed array (a characterisation table's grid) is written as its digest: the digest of the text
 * it was read from when its reader recorded that (`recordSource`), else of its bytes.
 *
 * `digest` is a 106-bit hash (two 53-bit lanes of cyrb53, public domain, by bryc) for keys that
 * would otherwise repeat a long text in every entry: a table's text, a bias network's members.
 * Two different inputs share a digest with a chance near 2⁻¹⁰⁶ per pair.
 */

const SEEDS = [0x9e3779b9, 0x85ebca6b] as const;

/** The digest of a text: 28 hexadecimal digits. */
export function digest(text: string): string {
  let a1 = 0xdeadbeef ^ SEEDS[0], a2 = 0x41c6ce57 ^ SEEDS[0], b1 = 0xdeadbeef ^ SEEDS[1], b2 = 0x41c6ce57 ^ SEEDS[1];
  for (let i = 0; i < text.length; i++) {
    const c = text.charCodeAt(i);
    a1 = Math.imul(a1 ^ c, 2654435761); a2 = Math.imul(a2 ^ c, 1597334677);
    b1 = Math.imul(b1 ^ c, 2654435761); b2 = Math.imul(b2 ^ c, 1597334677);
  }
  return finish(a1, a2) + finish(b1, b2);
}

/** The digest of a typed array's bytes. */
function bytesDigest(view: ArrayBufferView): string {
  const bytes = new Uint8Array(view.buffer, view.byteOffset, view.byteLength);
  let a1 = 0xdeadbeef ^ SEEDS[0], a2 = 0x41c6ce57 ^ SEEDS[0], b1 = 0xdeadbeef ^ SEEDS[1], b2 = 0x41c6ce57 ^ SEEDS[1];
  for (let i = 0; i < bytes.length; i++) {
    const c = bytes[i]!;
    a1 = Math.imul(a1 ^ c, 2654435761); a2 = Math.imul(a2 ^ c, 1597334677);
    b1 = Math.imul(b1 ^ c, 2654435761); b2 = Math.imul(b2 ^ c, 1597334677);
  }
  return finish(a1, a2) + finish(b1, b2);
}

/** cyrb53's final mix of one lane: 14 hexadecimal digits. */
function finish(h1: number, h2: number): string {
  h1 = Math.imul(h1 ^ (h1 >>> 16), 2246822507) ^ Math.imul(h2 ^ (h2 >>> 13), 3266489909);
  h2 = Math.imul(h2 ^ (h2 >>> 16), 2246822507) ^ Math.imul(h1 ^ (h1 >>> 13), 3266489909);
  return (4294967296 * (2097151 & h2) + (h1 >>> 0)).toString(16).padStart(14, '0');
}

/** Digests of typed arrays, computed on first use (the CLI keeps nothing across analyses and asks for none). */
const digests = new WeakMap<ArrayBufferView, string>();
/** What a typed array was read from, recorded by its reader. */
const sources = new WeakMap<ArrayBufferView, () => string>();

/** Records that `view` was read from the text `source` gives (its digest is then that text's). */
export function recordSource(view: ArrayBufferView, source: () => string): void {
  sources.set(view, source);
}

/** The digest a typed array is keyed by: of the text it was read from, else of its bytes. */
export function digestOf(view: ArrayBufferView): string {
  let d = digests.get(view);
  if (d === undefined) {
    const source = sources.get(view);
    digests.set(view, d = source ? digest(source()) : bytesDigest(view));
  }
  return d;
}

/** `value` as canonical JSON (see above); undefined members are left out as JSON leaves them. */
export function canonicalJson(value: unknown): string {
  return write(value) ?? 'null';
}

function write(v: unknown): string | undefined {
  switch (typeof v) {
    case 'string': return JSON.stringify(v);
    case 'number': return Number.isFinite(v) ? (Object.is(v, -0) ? '-0' : String(v)) : `"${String(v)}"`;
    case 'boolean': return v ? 'true' : 'false';
    case 'bigint': return `"${v}n"`;
    case 'object': {
      if (v === null) return 'null';
      if (ArrayBuffer.isView(v)) return `{"#":"${digestOf(v)}"}`;
      if (Array.isArray(v)) {
        let s = '[';
        for (let i = 0; i < v.length; i++) s += (i > 0 ? ',' : '') + (write(v[i]) ?? 'null');
        return `${s}]`;
      }
      if (v instanceof Map) return write({ Map: [...v.entries()] });
      if (v instanceof Set) return write({ Set: [...v.values()] });
      const o = v as Record<string, unknown>;
      let s = '{';
      let first = true;
      for (const k of Object.keys(o).sort()) {
        const w = write(o[k]);
        if (w === undefined) continue;
        s += `${first ? '' : ','}${JSON.stringify(k)}:${w}`;
        first = false;
      }
      return `${s}}`;
    }
    default: return undefined;  // undefined, functions, symbols: as JSON leaves them out
  }
}
