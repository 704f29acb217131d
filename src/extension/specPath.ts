/**
 * The spec path under a cursor position, e.g. ['mirrors', 0, 'devices', 'out', 'w'], so a hover
 * on a size value finds its device anchor by path prefix. Editor plumbing only: it reads the
 * YAML tree (JSON is YAML), never a value's meaning. Pure: no `vscode`.
 */
import { isAlias, isMap, isPair, isScalar, isSeq, parseDocument, type Node } from 'yaml';
import type { Position, SpecPath } from '../core/types';
import { LineIndex } from '../core/text/lines';

function within(node: { range?: [number, number, number] | null } | null | undefined, offset: number): boolean {
  const r = node?.range;
  return !!r && offset >= r[0] && offset <= r[1];
}

function keyName(key: unknown): string | number | undefined {
  if (isScalar(key)) {
    const v = key.value;
    return typeof v === 'string' || typeof v === 'number' ? v : String(v);
  }
  return undefined;
}

function walk(node: Node | null | undefined, offset: number, path: SpecPath): SpecPath {
  if (!node || isAlias(node)) return path;
  if (isMap(node)) {
    for (const pair of node.items) {
      if (!isPair(pair)) continue;
      const name = keyName(pair.key);
      if (name === undefined) continue;
      if (within(pair.key as Node, offset)) return [...path, name];
      if (within(pair.value as Node, offset)) return walk(pair.value as Node, offset, [...path, name]);
    }
    return path;
  }
  if (isSeq(node)) {
    for (let i = 0; i < node.items.length; i++) {
      const item = node.items[i] as Node;
      if (within(item, offset)) return walk(item, offset, [...path, i]);
    }
  }
  return path;
}

/** Path at `pos`, or undefined when the text does not parse as one YAML document. */
export function pathAt(text: string, pos: Position): SpecPath | undefined {
  const doc = parseDocument(text, { strict: false, uniqueKeys: false });
  if (doc.errors.length > 0 || !doc.contents) return undefined;
  return walk(doc.contents as Node, new LineIndex(text).offset(pos), []);
}
