/**
 * Node-side file access shared by the front ends (CLI and the extension's worker thread).
 *
 * The characterisation tables a spec names (design §11), read for the core: relative to the
 * spec's folder, never outside its folder tree (no absolute path, no `..` or link out of it),
 * at most TABLE_LIMIT_BYTES each. A file that cannot be given is handed over as the reason, so
 * the core places a `table-unread` finding on the `table:` value.
 */
import { closeSync, fstatSync, openSync, readSync, realpathSync, statSync } from 'node:fs';
import { dirname, isAbsolute, relative, resolve, sep } from 'node:path';
import { tableFiles, type TableTexts } from '../core/spec/index';
import { reasonOf } from '../cli/io';

/** Bytes of one table (design §14: up to 20 MB are accepted). */
const TABLE_LIMIT_BYTES = 20 * 1024 * 1024;

/** Every table `text` names, read relative to `specFile` (`-`: the working folder). With a
 *  `cache`, a file whose size and modification time are unchanged is not read again (the editor
 *  analyses on every keystroke), and its text stays the same string, which the core's parse
 *  cache recognises at once. */
export function readTables(specFile: string, text: string, cache?: TableCache): TableTexts {
  const names = tableFiles(text);
  if (names.length === 0) return {};
  const root = specFile === '-' ? process.cwd() : dirname(resolve(specFile));
  const out: Record<string, string | { error: string }> = {};
  for (const name of names) out[name] = cache ? cached(cache, root, name) : readTable(root, name);
  return out;
}

/** Table texts by absolute path, with the size and modification time they were read at. */
export type TableCache = Map<string, { size: number; mtimeMs: number; text: string }>;

function cached(cache: TableCache, root: string, name: string): string | { error: string } {
  const path = resolve(root, name);
  try {
    const st = statSync(path);
    const hit = cache.get(path);
    if (hit && hit.size === st.size && hit.mtimeMs === st.mtimeMs) return hit.text;
    const read = readTable(root, name);
    if (typeof read === 'string') {
      if (cache.size >= 16) cache.clear();
      cache.set(path, { size: st.size, mtimeMs: st.mtimeMs, text: read });
    }
    return read;
  } catch {
    return readTable(root, name);   // says why (no such file, outside the folder, …)
  }
}

/** The text of table `name` under `root`, or why not. Never throws. */
export function readTable(root: string, name: string): string | { error: string } {
  if (isAbsolute(name) || /^[a-zA-Z]:[\\/]/.test(name)) return { error: 'an absolute path; name the table relative to the spec, inside its folder' };
  let realRoot: string;
  let target: string;
  try {
    realRoot = realpathSync(root);
    target = realpathSync(resolve(root, name));
  } catch (err) {
    return { error: reasonOf(err) };
  }
  const rel = relative(realRoot, target);
  if (rel === '' || rel === '..' || rel.startsWith(`..${sep}`) || isAbsolute(rel)) return { error: 'it is outside the spec\'s folder tree' };
  let fd: number | undefined;
  try {
    fd = openSync(target, 'r');
    const st = fstatSync(fd);
    if (!st.isFile()) return { error: 'not a regular file' };
    if (st.size > TABLE_LIMIT_BYTES) return { error: `${(st.size / 1048576).toFixed(1)} MB, more than the 20 MB a table may have` };
    const buf = Buffer.allocUnsafe(st.size + 1);
    let got = 0;
    for (;;) {
      const n = readSync(fd, buf, got, buf.length - got, null);
      if (n === 0) break;
      got += n;
      if (got > TABLE_LIMIT_BYTES) return { error: 'more than the 20 MB a table may have' };
      if (got === buf.length) return { error: 'it grew while being read' };
    }
    return buf.toString('utf8', 0, got);
  } catch (err) {
    return { error: reasonOf(err) };
  } finally {
    if (fd !== undefined) closeSync(fd);
  }
}
