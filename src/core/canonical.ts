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
  const out: Out = { s: '' };
  return write(value, out) ? out.s : 'null';
}

/** The text written so far: one string appended in place, not one string per nested value (a
 *  500-mirror spec keys every mirror; the keys' garbage was most of their cost). */
interface Out { s: string }

/** A key or string JSON writes as it is between quotes. */
const PLAIN = /^[\w$.:@/+ -]*$/;

function quote(s: string): string {
  return PLAIN.test(s) ? `"${s}"` : JSON.stringify(s);
}

/** Writes `v` to `out`; false (nothing written) for what JSON leaves out: undefined, functions, symbols. */
function write(v: unknown, out: Out): boolean {
  switch (typeof v) {
    case 'string': out.s += quote(v); return true;
    case 'number': out.s += Number.isFinite(v) ? (Object.is(v, -0) ? '-0' : String(v)) : `"${String(v)}"`; return true;
    case 'boolean': out.s += v ? 'true' : 'false'; return true;
    case 'bigint': out.s += `"${v}n"`; return true;
    case 'object': {
      if (v === null) { out.s += 'null'; return true; }
      if (ArrayBuffer.isView(v)) { out.s += `{"#":"${digestOf(v)}"}`; return true; }
      if (Array.isArray(v)) {
        out.s += '[';
        for (let i = 0; i < v.length; i++) {
          if (i > 0) out.s += ',';
          if (!write(v[i], out)) out.s += 'null';
        }
        out.s += ']';
        return true;
      }
      if (v instanceof Map) return write({ Map: [...v.entries()] }, out);
      if (v instanceof Set) return write({ Set: [...v.values()] }, out);
      const o = v as Record<string, unknown>;
      out.s += '{';
      let first = true;
      for (const k of Object.keys(o).sort()) {
        const x = o[k];
        if (x === undefined || typeof x === 'function' || typeof x === 'symbol') continue;
        out.s += first ? `${quote(k)}:` : `,${quote(k)}:`;
        first = false;
        write(x, out);
      }
      out.s += '}';
      return true;
    }
    default: return false;  // undefined, functions, symbols: as JSON leaves them out
  }
}
