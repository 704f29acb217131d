/**
 * The CLI's file handling: bounded reads (files, standard input, FIFOs, devices) and a
 * replace-only-if-unchanged write for `fix --apply`. Nothing here throws: failures are data, each
 * with a reason that names what went wrong in words.
 */
import { createHash } from 'node:crypto';
import {
  closeSync, fchmodSync, fchownSync, fstatSync, fsyncSync, openSync, readSync, realpathSync, renameSync,
  rmSync, statSync, writeFileSync,
} from 'node:fs';
import { basename, dirname, join } from 'node:path';
import { SPEC_LIMITS } from '../core/defaults';
import { tooLargeMessage } from '../core/spec/document';
import type { Finding } from '../core/types';
import { findingLine } from '../core/report/text';

/**
 * Bytes read before a spec is refused: UTF-8 spends at most 3 bytes per UTF-16 unit, so any spec
 * within SPEC_LIMITS.maxChars fits, and a reader that gets one byte more knows the spec is too
 * large without reading on (`head -c 1G /dev/zero | qpoint check -` stops at 1.5 MB).
 */
export const READ_LIMIT_BYTES = SPEC_LIMITS.maxChars * 3;

export type Read =
  | { ok: true; text: string; /** sha-256 of the bytes read, to tell later whether the file changed */ digest: string }
  | { ok: false; reason: string }
  | { ok: false; reason: string; tooLarge: Finding };

/** Read a spec file, or standard input for `-`, stopping at READ_LIMIT_BYTES. Never throws. */
export function readSpec(file: string): Read {
  let fd: number | undefined;
  try {
    fd = file === '-' ? 0 : openSync(file, 'r');
    const st = fstatSync(fd);
    if (st.isDirectory()) return { ok: false, reason: 'is a directory' };
    // A regular file says its size: refuse without reading a byte.
    if (st.isFile() && st.size > READ_LIMIT_BYTES) return tooLarge(st.size, false);
    const bytes = readBounded(fd, READ_LIMIT_BYTES + 1);
    if (bytes.length > READ_LIMIT_BYTES) return tooLarge(SPEC_LIMITS.maxChars, true);
    return { ok: true, text: bytes.toString('utf8'), digest: digestOf(bytes) };
  } catch (err) {
    return { ok: false, reason: reasonOf(err) };
  } finally {
    if (fd !== undefined && fd !== 0) closeSync(fd);
  }
}

function tooLarge(size: number, over: boolean): Read {
  const zero = { line: 0, character: 0 };
  const finding: Finding = { severity: 'error', code: 'too-large', message: tooLargeMessage(size, over), path: [], range: { start: zero, end: zero } };
  return { ok: false, reason: finding.message, tooLarge: finding };
}

/** Up to `limit` bytes of `fd`, whatever it is (file, pipe, FIFO, terminal, device). */
function readBounded(fd: number, limit: number): Buffer {
  const chunks: Buffer[] = [];
  let total = 0;
  let chunk = Buffer.allocUnsafe(64 * 1024);
  while (total < limit) {
    let n: number;
    try {
      n = readSync(fd, chunk, 0, Math.min(chunk.length, limit - total), null);
    } catch (err) {
      const code = (err as NodeJS.ErrnoException).code;
      if (code === 'EAGAIN') { waitForInput(); continue; }   // a non-blocking stdin with nothing yet
      if (code === 'EOF') break;                             // Windows' end of a pipe
      throw err;
    }
    if (n === 0) break;
    chunks.push(chunk.subarray(0, n));
    total += n;
    chunk = Buffer.allocUnsafe(Math.min(chunk.length * 2, 1 << 20));
  }
  return Buffer.concat(chunks, total);
}

/** Block the thread briefly: the reads above are synchronous, and a busy loop would burn a core. */
function waitForInput(): void {
  Atomics.wait(new Int32Array(new SharedArrayBuffer(4)), 0, 0, 10);
}

function digestOf(bytes: Buffer): string {
  return createHash('sha256').update(bytes).digest('hex');
}

/** An error of the file system as words ("permission denied"), not as a code. */
export function reasonOf(err: unknown): string {
  const e = err as NodeJS.ErrnoException;
  switch (e.code) {
    case 'ENOENT': return 'no such file';
    case 'EISDIR': return 'is a directory';
    case 'EACCES': case 'EPERM': return 'permission denied';
    case 'EROFS': return 'read-only file system';
    case 'ENOSPC': return 'no space left on the device';
    case 'EDQUOT': return 'disk quota exceeded';
    case 'EFBIG': return 'file too large for this system or its limits (ulimit -f)';
    case 'ENOTDIR': return 'a part of the path is not a folder';
    default: return e.code ? `${e.code}: ${e.message}` : String(e.message ?? e);
  }
}

export function displayName(file: string): string {
  return file === '-' ? '<stdin>' : file;
}

/** Read one spec for a single-file command; on failure say why on stderr (exit 2 follows). */
export function readOne(file: string): { name: string; text: string; digest: string } | undefined {
  const read = readSpec(file);
  const name = displayName(file);
  if (!read.ok) {
    process.stderr.write('tooLarge' in read ? findingLine(name, read.tooLarge) + '\n' : `qpoint: cannot read ${name}: ${read.reason}\n`);
    return undefined;
  }
  return { name, text: read.text, digest: read.digest };
}

export type Replaced = { ok: true } | { ok: false; changed: boolean; reason: string };

/**
 * Replace `file` by `text` if it still holds the bytes whose digest was taken when it was read.
 * The text goes to a temporary file beside it (same folder, so the rename is atomic), with the
 * original's mode (and owner, where allowed), flushed to disk, then renamed over the original: a
 * full disk or a file-size limit leaves the original untouched, and an edit saved meanwhile
 * (another digest) is never overwritten. A symbolic link is followed: its target is replaced.
 */
export function replaceIfUnchanged(file: string, digest: string, text: string): Replaced {
  let target: string;
  let mode: number;
  let owner: { uid: number; gid: number };
  try {
    target = realpathSync(file);
    const st = statSync(target);
    if (!st.isFile()) return { ok: false, changed: false, reason: 'not a regular file' };
    mode = st.mode & 0o7777;
    owner = { uid: st.uid, gid: st.gid };
    // A read-only spec stays as it is (a rename would replace it regardless of its mode).
    if ((mode & 0o222) === 0) return { ok: false, changed: false, reason: 'the file is read-only' };
    if (!unchanged(target, digest)) return changedSinceRead();
  } catch (err) {
    return { ok: false, changed: false, reason: reasonOf(err) };
  }
  const temp = join(dirname(target), `.${basename(target)}.qpoint-${process.pid}.tmp`);
  try {
    const fd = openSync(temp, 'wx', 0o600);
    try {
      writeFileSync(fd, text, 'utf8');
      fchmodSync(fd, mode);
      try { fchownSync(fd, owner.uid, owner.gid); } catch { /* only a privileged user can give a file away */ }
      fsyncSync(fd);
    } finally {
      closeSync(fd);
    }
    // The last look before the rename: the window for a lost edit is this one call.
    if (!unchanged(target, digest)) {
      rmSync(temp, { force: true });
      return changedSinceRead();
    }
    renameSync(temp, target);
    return { ok: true };
  } catch (err) {
    rmSync(temp, { force: true });
    return { ok: false, changed: false, reason: reasonOf(err) };
  }
}

function unchanged(file: string, digest: string): boolean {
  const fd = openSync(file, 'r');
  try {
    return digestOf(readBounded(fd, READ_LIMIT_BYTES + 1)) === digest;
  } finally {
    closeSync(fd);
  }
}

function changedSinceRead(): Replaced {
  return { ok: false, changed: true, reason: 'it changed while qpoint was fixing it' };
}

/** Whether writing `output` would overwrite the input `file` (the same file by path, link or inode). */
export function isSameFile(file: string, output: string): boolean {
  if (file === '-') return false;
  try {
    if (realpathSync(file) === realpathSync(output)) return true;
    const a = statSync(file);
    const b = statSync(output);
    return a.dev === b.dev && a.ino === b.ino;
  } catch {
    return false;   // the output does not exist yet (or the input cannot be read): nothing to overwrite
  }
}
