/**
 * The CLI never loses what the designer wrote and never reads without bound: size-capped reads of
 * files, standard input, FIFOs and devices; `fix --apply` through a temporary file renamed over
 * the spec only while the spec still holds what was read; no page written over its own spec;
 * `--mc` bounded as the editor's setting is.
 */
import { spawnSync } from 'node:child_process';
import {
  chmodSync, copyFileSync, existsSync, lstatSync, mkdtempSync, readdirSync, readFileSync, rmSync, statSync, symlinkSync, writeFileSync,
} from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { build } from 'esbuild';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { parseCommandLine } from '../../src/cli/args';
import { READ_LIMIT_BYTES, readSpec, replaceIfUnchanged } from '../../src/cli/io';
import { MC_SAMPLES, SPEC_LIMITS } from '../../src/core/defaults';

const ROOT = join(__dirname, '..', '..');
const OUT = mkdtempSync(join(tmpdir(), 'qpoint-files-'));
const CLI = join(OUT, 'cli.js');
const FAULTY = join(ROOT, 'test/rules/fixtures/faulty.bias.yaml');

/** A shell script in which `$QPOINT` runs the CLI bundle. */
function sh(script: string): { code: number; stdout: string; stderr: string } {
  const r = spawnSync('sh', ['-c', script.replaceAll('$QPOINT', '"$NODE" "$CLI"')],
    { cwd: OUT, encoding: 'utf8', timeout: 60_000, env: { ...process.env, NODE: process.execPath, CLI } });
  return { code: r.status ?? -1, stdout: r.stdout, stderr: r.stderr };
}

function qpoint(args: string[]): { code: number; stdout: string; stderr: string } {
  const r = spawnSync(process.execPath, [CLI, ...args], { cwd: OUT, encoding: 'utf8', timeout: 60_000 });
  return { code: r.status ?? -1, stdout: r.stdout, stderr: r.stderr };
}

/** A private copy of the faulty fixture (its fixes change the text; it is 1.9 KB). */
function faultyCopy(name: string): string {
  const file = join(OUT, name);
  copyFileSync(FAULTY, file);
  return file;
}

const leftovers = () => readdirSync(OUT).filter((f) => f.includes('.qpoint-'));

beforeAll(async () => {
  await build({ entryPoints: { cli: join(ROOT, 'src/cli/main.ts'), webview: join(ROOT, 'webview/main.ts') },
    bundle: true, outdir: OUT, logLevel: 'error', loader: { '.css': 'text' }, platform: 'node', format: 'cjs', target: 'node20' });
}, 120_000);
afterAll(() => rmSync(OUT, { recursive: true, force: true }));

describe('reads are refused past the size limit while reading', () => {
  it('the byte limit holds any spec within the character limit (3 UTF-8 bytes per UTF-16 unit at most)', () => {
    expect(READ_LIMIT_BYTES).toBe(SPEC_LIMITS.maxChars * 3);
  });

  it.each([
    ['standard input', 'head -c 1073741824 /dev/zero | $QPOINT check -', '<stdin>'],
    ['a device', '$QPOINT check /dev/zero', '/dev/zero'],
    ['a FIFO', 'mkfifo big.fifo && (head -c 1073741824 /dev/zero > big.fifo 2>/dev/null &) && $QPOINT check big.fifo', 'big.fifo'],
  ])('%s of 1 GB gets too-large at 1:1 and exit 2', (_what, script, name) => {
    const r = sh(script);
    expect(r.code).toBe(2);
    expect(r.stdout).toContain(`${name}:1:1: error too-large: the file is over 512 KB; qpoint reads bias specs up to 512 KB`);
    expect(r.stderr).not.toMatch(/internal error/);
  });

  it('a regular file past the limit is refused from its size, with the same finding in JSON', () => {
    writeFileSync(join(OUT, 'huge.bias.yaml'), Buffer.alloc(2 * 1024 * 1024, 0x20));
    const r = qpoint(['check', 'huge.bias.yaml', '--format', 'json']);
    expect(r.code).toBe(2);
    const out = JSON.parse(r.stdout) as { files: { parsed: boolean; findings: { code: string; message: string; range: unknown }[] }[] };
    expect(out.files[0].parsed).toBe(false);
    expect(out.files[0].findings).toEqual([expect.objectContaining({ code: 'too-large', message: expect.stringMatching(/^the file is 2\.0 MB;/),
      range: { start: { line: 0, character: 0 }, end: { line: 0, character: 0 } } })]);
  });

  it('fix and report refuse a flood on standard input the same way', () => {
    expect(sh('head -c 1073741824 /dev/zero | $QPOINT fix -').stderr).toMatch(/^<stdin>:1:1: error too-large: /);
    expect(sh('head -c 1073741824 /dev/zero | $QPOINT report - --html page.html').stderr).toMatch(/^<stdin>:1:1: error too-large: /);
    expect(existsSync(join(OUT, 'page.html'))).toBe(false);
  });

  it('a spec within the limit still reads whole from standard input', () => {
    const r = sh(`$QPOINT check - < "${FAULTY}"`);
    expect(r.code).toBe(1);
    expect(r.stdout).toMatch(/^<stdin>:\d+:\d+: error /m);
  });
});

describe('--mc is bounded as the editor setting is', () => {
  it('package.json caps qpoint.monteCarlo.samples at the same maximum', () => {
    const pkg = JSON.parse(readFileSync(join(ROOT, 'package.json'), 'utf8')) as
      { contributes: { configuration: { properties: Record<string, { maximum?: number; minimum?: number }> } } };
    expect(pkg.contributes.configuration.properties['qpoint.monteCarlo.samples'].maximum).toBe(MC_SAMPLES.max);
  });

  it.each(['1e12', '300000000', String(MC_SAMPLES.max + 1)])('--mc %s is a usage error (exit 2), nothing is run', (n) => {
    const r = qpoint(['check', FAULTY, '--mc', n]);
    expect(r.code).toBe(2);
    expect(r.stderr).toContain(`qpoint: --mc takes at most 10000000 samples per output (as the editor's qpoint.monteCarlo.samples), not '${n}'`);
    expect(r.stdout).toBe('');
  });

  it('the maximum itself is accepted, by check and report', () => {
    expect(parseCommandLine(['check', 'a.bias.yaml', '--mc', String(MC_SAMPLES.max)])).toMatchObject({ ok: true, command: { mc: MC_SAMPLES.max } });
    expect(parseCommandLine(['report', 'a.bias.yaml', '--html', 'a.html', '--mc', '1e12'])).toMatchObject({ ok: false });
  });
});

describe('fix --apply replaces the spec atomically', () => {
  it('under a file-size limit (ulimit -f 1: 512 bytes) the original stays whole and nothing is said fixed', () => {
    const file = faultyCopy('limited.bias.yaml');
    const before = readFileSync(file);
    expect(before.length).toBeGreaterThan(1024);
    const r = sh(`ulimit -f 1 && $QPOINT fix limited.bias.yaml --apply`);
    expect(r.code).toBe(2);
    expect(r.stderr).toBe('qpoint: cannot write limited.bias.yaml: file too large for this system or its limits (ulimit -f); nothing was changed\n');
    expect(r.stdout).not.toMatch(/^fixed /m);
    expect(readFileSync(file).equals(before)).toBe(true);
    expect(leftovers()).toEqual([]);
  });

  it('keeps the file mode, and says what it fixed after writing', () => {
    const file = faultyCopy('mode.bias.yaml');
    chmodSync(file, 0o640);
    const r = qpoint(['fix', 'mode.bias.yaml', '--apply']);
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(/^fixed [a-z-]+: .*\n(fixed .*\n)*wrote mode\.bias\.yaml \(\d+ fixes in \d+ rounds\)\n/);
    expect(statSync(file).mode & 0o7777).toBe(0o640);
    expect(readFileSync(file, 'utf8')).not.toBe(readFileSync(FAULTY, 'utf8'));
    expect(leftovers()).toEqual([]);
  });

  it('through a symbolic link replaces the target and keeps the link', () => {
    const target = faultyCopy('target.bias.yaml');
    symlinkSync('target.bias.yaml', join(OUT, 'link.bias.yaml'));
    expect(qpoint(['fix', 'link.bias.yaml', '--apply']).code).toBe(0);
    expect(lstatSync(join(OUT, 'link.bias.yaml')).isSymbolicLink()).toBe(true);
    expect(readFileSync(target, 'utf8')).not.toBe(readFileSync(FAULTY, 'utf8'));
  });

  it('a read-only spec is an ordinary error naming the file, exit 2, untouched', () => {
    const file = faultyCopy('readonly.bias.yaml');
    chmodSync(file, 0o444);
    const r = qpoint(['fix', 'readonly.bias.yaml', '--apply']);
    expect(r.code).toBe(2);
    expect(r.stderr).toBe('qpoint: cannot write readonly.bias.yaml: the file is read-only; nothing was changed\n');
    expect(r.stdout).not.toMatch(/^fixed /m);
    expect(readFileSync(file, 'utf8')).toBe(readFileSync(FAULTY, 'utf8'));
  });
});

describe('replaceIfUnchanged: an edit saved while fix runs is never overwritten', () => {
  it('writes nothing when the file changed since it was read, and says so', () => {
    const file = faultyCopy('edited.bias.yaml');
    const read = readSpec(file);
    if (!read.ok) throw new Error(read.reason);
    const edited = read.text + '# a line the designer added meanwhile\n';
    writeFileSync(file, edited);
    expect(replaceIfUnchanged(file, read.digest, 'fixed text\n')).toEqual({ ok: false, changed: true, reason: 'it changed while qpoint was fixing it' });
    expect(readFileSync(file, 'utf8')).toBe(edited);
    expect(leftovers()).toEqual([]);
  });

  it('replaces the file when it still holds what was read', () => {
    const file = faultyCopy('replaced.bias.yaml');
    const read = readSpec(file);
    if (!read.ok) throw new Error(read.reason);
    expect(replaceIfUnchanged(file, read.digest, 'fixed text\n')).toEqual({ ok: true });
    expect(readFileSync(file, 'utf8')).toBe('fixed text\n');
  });

  it('a missing file is a reason in words', () => {
    expect(replaceIfUnchanged(join(OUT, 'gone.bias.yaml'), 'x', '')).toEqual({ ok: false, changed: false, reason: 'no such file' });
  });
});

describe('report never writes over its input', () => {
  it.each([
    ['the same path', 'same.bias.yaml', 'same.bias.yaml'],
    ['another spelling of the path', 'spelled.bias.yaml', './spelled.bias.yaml'],
    ['a symbolic link to it', 'linked.bias.yaml', 'linked-page.html'],
  ])('refuses %s, exit 2, the spec unchanged', (_what, spec, html) => {
    const file = faultyCopy(spec);
    if (html === 'linked-page.html') symlinkSync(spec, join(OUT, html));
    const r = qpoint(['report', spec, '--html', html]);
    expect(r.code).toBe(2);
    expect(r.stderr).toBe(`qpoint: --html ${html} is the spec itself; name another file for the page\n`);
    expect(readFileSync(file, 'utf8')).toBe(readFileSync(FAULTY, 'utf8'));
  });
});
