/**
 * Installs code-server (the real VS Code workbench served to a browser) on demand into an
 * ignored cache folder, so the project never depends on it at runtime. A second call finds the
 * marker and returns at once.
 *
 * Pitfalls of an install without downloads outside the npm registry, handled here:
 * - @vscode/ripgrep downloads a prebuilt binary; we seed its download cache from Debian's `rg`.
 * - node-pty's install calls `npx node-gyp`: `npm_config_yes=true`.
 * - As root, code-server's postinstall wants `--unsafe-perm`.
 */
import { execFileSync, spawn } from 'node:child_process';
import { existsSync, mkdirSync, mkdtempSync, copyFileSync, writeFileSync, readFileSync, rmSync,
  openSync, closeSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';

/** 4.100.3 is the newest code-server that accepts Node 20 (workbench 1.100.3). */
export const CODE_SERVER_VERSION = '4.100.3';
/** The ripgrep build @vscode/ripgrep 1.15.11 fetches; we provide it from the system `rg`. */
const RIPGREP_CACHE = { pkg: '1.15.11', asset: 'ripgrep-v13.0.0-10-x86_64-unknown-linux-musl.tar.gz' };
/** Packages whose install scripts must run (npm ≥ 11 records approvals in `allowScripts`). */
const ALLOW_SCRIPTS = ['code-server', 'argon2'];

export interface CodeServerInstall {
  /** Node entry script of code-server. */
  entry: string;
  /** True when this call installed it (false: cached). */
  installed: boolean;
  /** Milliseconds spent installing (0 when cached). */
  ms: number;
}

function findOnPath(name: string): string | undefined {
  for (const dir of (process.env.PATH ?? '').split(':')) {
    const p = join(dir, name);
    if (dir && existsSync(p)) return p;
  }
  return undefined;
}

/** Seed @vscode/ripgrep's download cache with a tarball holding the system `rg`. */
function seedRipgrepCache(): void {
  const rg = findOnPath('rg');
  if (!rg) throw new Error('ripgrep (`rg`) is not installed: apt-get install -y ripgrep (see scripts/workbench/apt-packages.txt)');
  const cacheDir = join(tmpdir(), `vscode-ripgrep-cache-${RIPGREP_CACHE.pkg}`);
  const tarball = join(cacheDir, RIPGREP_CACHE.asset);
  if (existsSync(tarball)) return;
  mkdirSync(cacheDir, { recursive: true });
  const stage = mkdtempSync(join(tmpdir(), 'qpoint-rg-'));
  copyFileSync(rg, join(stage, 'rg'));
  execFileSync('tar', ['-czf', tarball, '-C', stage, 'rg']);
  rmSync(stage, { recursive: true, force: true });
}

/** A lock folder (mkdir is atomic) so two test runs never install at once. */
async function withLock<T>(dir: string, deadlineMs: number, body: () => Promise<T>): Promise<T> {
  const lock = join(dir, '.install-lock');
  const until = Date.now() + deadlineMs;
  for (;;) {
    try { mkdirSync(lock); break; } catch {
      if (Date.now() > until) throw new Error(`code-server install lock ${lock} held too long; remove it if no install runs`);
      await new Promise((r) => setTimeout(r, 500));
    }
  }
  try { return await body(); } finally { rmSync(lock, { recursive: true, force: true }); }
}

function run(cmd: string, args: string[], cwd: string, logFile: string, env: NodeJS.ProcessEnv): Promise<void> {
  return new Promise((resolve, reject) => {
    const fd = openSync(logFile, 'a');
    const child = spawn(cmd, args, { cwd, env, stdio: ['ignore', fd, fd] });
    child.on('error', (e) => { closeSync(fd); reject(e); });
    child.on('exit', (code, signal) => {
      closeSync(fd);
      if (code === 0) resolve();
      else reject(new Error(`${cmd} ${args.join(' ')} failed (${signal ?? code}); see ${logFile}`));
    });
  });
}

/**
 * Make sure code-server is installed under `cacheDir` (e.g. `<repo>/.cache/code-server`).
 * Writes npm's output to `logFile`.
 */
export async function ensureCodeServer(cacheDir: string, logFile: string): Promise<CodeServerInstall> {
  const entry = join(cacheDir, 'node_modules', 'code-server', 'out', 'node', 'entry.js');
  const marker = join(cacheDir, '.installed');
  const ready = () => existsSync(entry) && existsSync(marker)
    && readFileSync(marker, 'utf8').trim() === CODE_SERVER_VERSION;
  if (ready()) return { entry, installed: false, ms: 0 };
  mkdirSync(cacheDir, { recursive: true });
  return withLock(cacheDir, 10 * 60_000, async () => {
    if (ready()) return { entry, installed: false, ms: 0 };
    const t0 = Date.now();
    seedRipgrepCache();
    writeFileSync(join(cacheDir, 'package.json'), JSON.stringify({
      name: 'qpoint-workbench-cache', private: true,
      description: 'code-server for qpoint\'s workbench tests (installed on demand, not a project dependency)',
      allowScripts: Object.fromEntries(ALLOW_SCRIPTS.map((n) => [n, true])),
    }, null, 2));
    // JOBS: node-gyp builds the native modules (kerberos, node-pty, argon2 …) on every core.
    const env = { ...process.env, npm_config_yes: 'true', npm_config_unsafe_perm: 'true', JOBS: 'max',
      npm_config_audit: 'false', npm_config_fund: 'false', npm_config_update_notifier: 'false' };
    await run('npm', ['install', '--unsafe-perm', '--no-audit', '--no-fund', `code-server@${CODE_SERVER_VERSION}`],
      cacheDir, logFile, env);
    if (!existsSync(entry)) throw new Error(`code-server installed but ${entry} is missing; see ${logFile}`);
    const vscodeModules = join(cacheDir, 'node_modules', 'code-server', 'lib', 'vscode', 'node_modules');
    if (!existsSync(vscodeModules)) throw new Error(`code-server's postinstall did not run (no ${vscodeModules}); see ${logFile}`);
    writeFileSync(marker, CODE_SERVER_VERSION + '\n');
    return { entry, installed: true, ms: Date.now() - t0 };
  });
}
