import { readFileSync } from 'node:fs';

export type Read = { ok: true; text: string } | { ok: false; reason: string };

/** Read a spec file, or standard input for `-`. Never throws. */
export function readSpec(file: string): Read {
  try {
    const buf = readFileSync(file === '-' ? 0 : file);
    return { ok: true, text: buf.toString('utf8') };
  } catch (err) {
    const code = (err as NodeJS.ErrnoException).code;
    const reason = code === 'ENOENT' ? 'no such file' : code === 'EISDIR' ? 'is a directory' : (err as Error).message;
    return { ok: false, reason };
  }
}

export function displayName(file: string): string {
  return file === '-' ? '<stdin>' : file;
}
