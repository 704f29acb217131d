/** Small defensive readers over the plain data. Every failure is a finding, never an exception. */
import type { SpecPath } from '../types';
import type { FindingSink } from './findings';
import { formatPath } from './findings';
import { isRecord } from './params';
import { askIf, suggestion } from './suggest';
import { typeName } from './values';

export type Data = Record<string, unknown>;

/** A mapping, or undefined with a wrong-type finding (nothing when the value is absent). */
export function readMap(sink: FindingSink, raw: unknown, path: SpecPath, what = 'a mapping'): Data | undefined {
  if (raw === undefined) return undefined;
  if (isRecord(raw)) return raw;
  sink.error('wrong-type', `\`${formatPath(path)}\` must be ${what}; got ${typeName(raw)}`, path, undefined, 'type');
  return undefined;
}

export function readString(sink: FindingSink, raw: unknown, path: SpecPath): string | undefined {
  if (raw === undefined) return undefined;
  if (typeof raw === 'string' && raw.trim() !== '') return raw.trim();
  sink.error('wrong-type', `\`${formatPath(path)}\` must be a non-empty string; got ${typeName(raw)}`, path, undefined, 'type');
  return undefined;
}

export function readEnum<T extends string>(sink: FindingSink, raw: unknown, path: SpecPath, allowed: readonly T[]): T | undefined {
  if (raw === undefined) return undefined;
  if (typeof raw === 'string' && (allowed as readonly string[]).includes(raw)) return raw as T;
  const word = typeof raw === 'string' ? suggestion(raw, allowed) : undefined;
  sink.error('bad-value', `\`${formatPath(path)}\` must be one of ${allowed.join(', ')}; got ${typeName(raw)}${askIf(word)}`, path, undefined, 'enum', word);
  return undefined;
}

/** A missing-key finding at the parent's key. */
export function missing(sink: FindingSink, parent: SpecPath, key: string, why = ''): void {
  const where = parent.length ? `\`${formatPath(parent)}\`` : 'the spec';
  sink.error('missing-key', `${where} is missing \`${key}\`${why}`, parent, 'key', `missing:${key}`);
}

/** A key that the schema allows somewhere but not in this context (e.g. `vbias` on a simple mirror). */
export function misplaced(sink: FindingSink, path: SpecPath, message: string): void {
  sink.error('unknown-key', message, path, 'key', 'unknown');
}
