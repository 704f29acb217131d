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

/** Read one spec for a single-file command; on failure say why on stderr (exit 2 follows). */
export function readOne(file: string): { name: string; text: string } | undefined {
  const read = readSpec(file);
  const name = displayName(file);
  if (!read.ok) {
    process.stderr.write(`qpoint: cannot read ${name}: ${read.reason}\n`);
    return undefined;
  }
  return { name, text: read.text };
}
