/**
 * Minimal text edits on a spec that keep comments, key order, quoting and flow style: a fix
 * replaces one value token or inserts one key. Texts are written as they should read in the
 * source (`12u`, `"12u"`); when the replaced token is quoted and the new text is not, it gets the
 * same quotes, and in JSON a value that is not valid JSON is double-quoted.
 */
import { isAlias, isMap, isScalar, parseDocument, Scalar } from 'yaml';
import type { Document, YAMLMap } from 'yaml';
import type { SpecPath, TextEdit } from '../types';
import type { ParsedSpec } from './index';
import { LineIndex } from '../text/lines';
import { YamlSourceMap } from './source-map';

/** The source map with its YAML tree: the parsed one, or a fresh parse of p.text. */
function mapOf(p: ParsedSpec): YamlSourceMap | undefined {
  if (p.source instanceof YamlSourceMap && p.source.doc && p.source.lines.text === p.text) return p.source;
  const doc = parseDocument(p.text, { uniqueKeys: false, merge: true, logLevel: 'error' });
  return doc.errors.length ? undefined : new YamlSourceMap(doc, LineIndex.of(p.text));
}

function isJsonText(p: ParsedSpec): boolean {
  return p.json ?? /^\s*\{/.test(p.text);
}

const JSON_LITERAL = /^(?:-?(?:0|[1-9]\d*)(?:\.\d+)?(?:[eE][+-]?\d+)?|true|false|null|".*"|\{.*\}|\[.*\])$/s;

function jsonValue(text: string): string {
  return JSON_LITERAL.test(text.trim()) ? text : JSON.stringify(text);
}

function isQuoted(text: string): boolean {
  const t = text.trim();
  return t.length >= 2 && (t[0] === '"' || t[0] === "'") && t[t.length - 1] === t[0];
}

function quoteLike(type: string | undefined, text: string): string {
  if (isQuoted(text)) return text;
  if (type === Scalar.QUOTE_DOUBLE) return JSON.stringify(text);
  if (type === Scalar.QUOTE_SINGLE) return `'${text.replace(/'/g, "''")}'`;
  return text;
}

export function replaceValueEdit(p: ParsedSpec, path: SpecPath, newText: string): TextEdit | undefined {
  const src = mapOf(p);
  const loc = src?.locate(path);
  if (!src || !loc?.valueSpan) return undefined;
  const [start, end] = loc.valueSpan;
  const node = loc.node;
  let text = newText;
  if (isScalar(node)) text = quoteLike(node.type, text);
  if (isJsonText(p) && !isAlias(node)) text = jsonValue(text);
  // An empty value (`w:`) gets the space YAML needs after the colon.
  if (start === end && p.text[start - 1] === ':') text = ` ${text}`;
  return { range: src.lines.range(start, end), newText: text };
}

/** Offset just past the last non-space character before `end`. */
function trimBack(text: string, end: number): number {
  let i = end;
  while (i > 0 && /\s/.test(text[i - 1])) i--;
  return i;
}

function eolOf(text: string): string {
  return text.includes('\r\n') ? '\r\n' : '\n';
}

/** Nested flow text `a: { b: { key: value } }` (JSON keys quoted). */
function flowEntry(keys: string[], value: string, json: boolean): string {
  const k = (s: string) => (json ? JSON.stringify(s) : s);
  let out = `${k(keys[keys.length - 1])}: ${value}`;
  for (let i = keys.length - 2; i >= 0; i--) out = `${k(keys[i])}: { ${out} }`;
  return out;
}

/** Nested block lines, each starting with eol + indent. */
function blockEntry(keys: string[], value: string, indent: number, step: number, eol: string): string {
  let out = '';
  keys.forEach((key, i) => {
    const pad = ' '.repeat(indent + i * step);
    out += i === keys.length - 1 ? `${eol}${pad}${key}: ${value}` : `${eol}${pad}${key}:`;
  });
  return out;
}

/** Indent step of the document: the smallest positive difference between nested key columns. */
function indentStep(src: YamlSourceMap, doc: Document): number {
  let step = 0;
  const visit = (n: unknown, col: number, depth: number) => {
    if (depth > 20 || !isMap(n) || n.flow) return;
    for (const pair of n.items) {
      const v = pair.value;
      if (isMap(v) && !v.flow && v.items[0]?.key && (v.items[0].key as Scalar).range) {
        const c = src.lines.position((v.items[0].key as Scalar).range![0]).character;
        if (c > col && (step === 0 || c - col < step)) step = c - col;
        visit(v, c, depth + 1);
      }
    }
  };
  visit(doc.contents, 0, 0);
  return step || 2;
}

/** How inserted lines are written: the document's indent step and line break. */
export interface InsertStyle { step: number; eol: string }

/** The insert style of a whole document (pass it when inserting into a part of it read alone). */
export function insertStyle(p: ParsedSpec): InsertStyle | undefined {
  const src = mapOf(p);
  return src?.doc ? { step: indentStep(src, src.doc), eol: eolOf(p.text) } : undefined;
}

/**
 * Insert `key: valueText` into the mapping at parentPath, creating missing parent mappings
 * (e.g. `devices:` then `out:`) as needed; works for block and flow mappings. An existing key
 * gets its value replaced. Empty when the place cannot be reached (a list item that does not
 * exist, a scalar in the way). `style` defaults to the one of `p`'s own text.
 */
export function insertKeyEdits(p: ParsedSpec, parentPath: SpecPath, key: string, valueText: string, style?: InsertStyle): TextEdit[] {
  const src = mapOf(p);
  if (!src?.doc) return [];
  const json = isJsonText(p);
  const value = json ? jsonValue(valueText) : valueText;
  const text = p.text;
  // Deepest existing ancestor that is a mapping (or an empty value that can become one).
  let depth = parentPath.length;
  let loc = src.locate(parentPath);
  while (depth > 0 && !loc) {
    depth--;
    loc = src.locate(parentPath.slice(0, depth));
  }
  if (!loc) return [];
  const rest = parentPath.slice(depth);
  if (rest.some((s) => typeof s !== 'string')) return [];
  const keys = [...(rest as string[]), key];
  if (rest.length === 0) {
    const existing = src.locate([...parentPath, key]);
    if (existing?.pair) {
      const e = replaceValueEdit(p, [...parentPath, key], valueText);
      return e ? [e] : [];
    }
  }
  let node: unknown = loc.node;
  if (isAlias(node)) node = node.resolve(src.doc);
  const empty = node === undefined || (isScalar(node) && (node.value === null || node.value === ''));
  if (empty) {
    // `devices:` with nothing (or `~`): write a flow mapping in its place.
    const flow = `{ ${flowEntry(keys, value, json)} }`;
    if (loc.valueSpan) {
      const [s, e] = loc.valueSpan;
      const lead = s === e && text[s - 1] === ':' ? ' ' : '';
      return [{ range: src.lines.range(s, e), newText: lead + flow }];
    }
    if (loc.keySpan) {
      const after = src.lines.lineEnd(loc.keySpan[1]);
      const colon = text.indexOf(':', loc.keySpan[1]);
      const at = colon >= 0 && colon < after ? colon + 1 : loc.keySpan[1];
      return [{ range: src.lines.range(at, at), newText: ` ${flow}` }];
    }
    return [];
  }
  if (!isMap(node)) return [];
  const map = node as YAMLMap;
  const items = map.items;
  const last = items[items.length - 1];
  const lastEnd = last ? Math.max(((last.value as Scalar | null)?.range?.[1] ?? 0), (last.key as Scalar | null)?.range?.[1] ?? 0) : 0;
  if (map.flow || json) {
    const entry = flowEntry(keys, value, json);
    const open = map.range ? map.range[0] : 0;
    if (!last) {
      const close = map.range ? text.lastIndexOf('}', map.range[1]) : -1;
      if (close < 0) return [];
      return [{ range: src.lines.range(open + 1, close), newText: ` ${entry} ` }];
    }
    const endAt = trimBack(text, lastEnd);
    let i = endAt;
    while (i < text.length && /[ \t]/.test(text[i])) i++;
    const trailingComma = text[i] === ',';
    const lastKeyStart = (last.key as Scalar).range?.[0] ?? endAt;
    const multiLine = src.lines.position(lastKeyStart).line !== src.lines.position(open).line;
    if (multiLine) {
      const col = src.lines.position(lastKeyStart).character;
      const at = trailingComma ? i + 1 : endAt;
      return [{ range: src.lines.range(at, at), newText: `${trailingComma ? '' : ','}${style?.eol ?? eolOf(text)}${' '.repeat(col)}${entry}${trailingComma ? ',' : ''}` }];
    }
    const at = trailingComma ? i + 1 : endAt;
    return [{ range: src.lines.range(at, at), newText: trailingComma ? ` ${entry},` : `, ${entry}` }];
  }
  // Block mapping: a new line after the last entry (and its trailing comment), at the keys' column.
  const firstKey = items[0]?.key as Scalar | undefined;
  if (!firstKey?.range) return [];
  const col = src.lines.position(firstKey.range[0]).character;
  const at = src.lines.lineEnd(Math.max(0, trimBack(text, lastEnd) - 1));
  return [{ range: src.lines.range(at, at), newText: blockEntry(keys, value, col, style?.step ?? indentStep(src, src.doc), style?.eol ?? eolOf(text)) }];
}

/** A word in the quotes of the token it replaces (`"wilson"` → `"wilson-balanced"`). */
export function quotedLike(token: string, word: string): string {
  const q = token.trim()[0];
  return q === '"' || q === "'" ? `${q}${word}${q}` : word;
}
