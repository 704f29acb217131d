/**
 * The executable's code cache (src/cli/launch.ts): written after a first run, used after, and
 * never able to change what the CLI prints: a cache V8 does not accept (its header names another
 * V8 version, flag set or source) is rewritten, and one of another build is not even read. The CLI output is compared with the bundle run directly.
 */
import { spawnSync } from 'node:child_process';
import { copyFileSync, mkdtempSync, readdirSync, readFileSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';

const root = resolve(__dirname, '../..');
const example = join(root, 'examples/sensor-afe.bias.yaml');
const dir = mkdtempSync(join(tmpdir(), 'qpoint-launch-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));
for (const f of ['cli.js', 'qpoint-cli.js', 'elk.js', 'webview.js']) copyFileSync(join(root, 'dist', f), join(dir, f));

const caches = () => readdirSync(dir).filter((f) => f.endsWith('.v8cache'));
const run = (file: string) => spawnSync(process.execPath, [join(dir, file), 'check', example, '--format', 'json'], { encoding: 'utf8' });

describe('the CLI launcher', () => {
  const direct = run('qpoint-cli.js');

  it('writes one cache after a first run and prints what the bundle prints', () => {
    expect(caches()).toEqual([]);
    const first = run('cli.js');
    expect(first.status).toBe(direct.status);
    expect(first.stdout).toBe(direct.stdout);
    expect(caches()).toHaveLength(1);
    expect(caches()[0]).toMatch(/^qpoint-cli\.[0-9a-f]{16}\.v8cache$/);
    const cache = join(dir, caches()[0]!);
    const written = statSync(cache).mtimeMs;
    const second = run('cli.js');
    expect(second.stdout).toBe(direct.stdout);
    expect(statSync(cache).mtimeMs).toBe(written);  // accepted: not written again
  });

  it('a cache V8 does not accept is rewritten; the output does not change', () => {
    const cache = join(dir, caches()[0]!);
    const good = readFileSync(cache);
    const bad = Buffer.from(good);
    bad.fill(0x5a, 0, 32);  // the header: magic number, V8 version, source and flag hashes
    writeFileSync(cache, bad);
    const r = run('cli.js');
    expect(r.stdout).toBe(direct.stdout);
    expect(readFileSync(cache).equals(bad)).toBe(false);
  });

  it('a rebuilt bundle ignores the old cache and removes it', () => {
    const old = caches()[0]!;
    writeFileSync(join(dir, 'qpoint-cli.js'), readFileSync(join(dir, 'qpoint-cli.js'), 'utf8') + '\n// rebuilt\n');
    const r = run('cli.js');
    expect(r.stdout).toBe(direct.stdout);
    expect(caches()).toHaveLength(1);
    expect(caches()[0]).not.toBe(old);
  });

  it('runs `report`, whose schematics load the layout library on demand, through the launcher too', () => {
    // The launcher compiles the bundle with vm.Script, which has no loader for import(): the
    // report must still find dist/elk.js and draw every schematic.
    const html = join(dir, 'report.html');
    const r = spawnSync(process.execPath, [join(dir, 'cli.js'), 'report', example, '--html', html], { encoding: 'utf8' });
    expect(r.stderr).not.toContain('internal error');
    expect(r.status).toBe(0);
    expect(readFileSync(html, 'utf8')).toContain('data-schematic=');
  });
});
