/**
 * Starts code-server in its own session (setsid via `detached`), with its own config, data and
 * XDG folders and a free port, and stops exactly that process group again.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { mkdirSync, openSync, closeSync, writeFileSync } from 'node:fs';
import { createServer } from 'node:net';
import { join } from 'node:path';

export interface WorkbenchServer {
  port: number;
  /** http://127.0.0.1:PORT */
  origin: string;
  pid: number;
  /** Page URL that opens `folder` and, optionally, loads development extensions / a test suite. */
  url(opts: { folder: string; extensionDevelopmentPath?: string; extensionTestsPath?: string }): string;
  /** SIGTERM to the process group, SIGKILL after a deadline. Never throws. */
  stop(): Promise<void>;
}

export interface StartOptions {
  entry: string;
  /** Folder that receives config/, data/, extensions/, xdg-*; created if missing. */
  stateDir: string;
  logFile: string;
  /** Extra user settings merged over the quiet defaults. */
  settings?: Record<string, unknown>;
  /** Environment for the server and its extension host. */
  env?: Record<string, string>;
  readyTimeoutMs?: number;
}

/** Settings for a quiet, deterministic workbench. */
const QUIET_SETTINGS = {
  'telemetry.telemetryLevel': 'off',
  'update.mode': 'none',
  'extensions.autoUpdate': false,
  'extensions.autoCheckUpdates': false,
  'workbench.startupEditor': 'none',
  'workbench.tips.enabled': false,
  'workbench.enableExperiments': false,
  'security.workspace.trust.enabled': false,
  'git.enabled': false,
  'editor.hover.delay': 100,
  'window.restoreWindows': 'none',
  'files.hotExit': 'off',
};

export function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const srv = createServer();
    srv.once('error', reject);
    srv.listen(0, '127.0.0.1', () => {
      const addr = srv.address();
      const port = typeof addr === 'object' && addr ? addr.port : 0;
      srv.close(() => resolve(port));
    });
  });
}

function exited(child: ChildProcess): Promise<void> {
  return new Promise((resolve) => {
    if (child.exitCode !== null || child.signalCode !== null) resolve();
    else child.once('exit', () => resolve());
  });
}

function within<T>(p: Promise<T>, ms: number): Promise<T | 'timeout'> {
  let timer: NodeJS.Timeout | undefined;
  const t = new Promise<'timeout'>((r) => { timer = setTimeout(() => r('timeout'), ms); });
  return Promise.race([p, t]).finally(() => clearTimeout(timer));
}

async function waitHealthy(origin: string, child: ChildProcess, deadlineMs: number, logFile: string): Promise<void> {
  const until = Date.now() + deadlineMs;
  let last = '';
  while (Date.now() < until) {
    if (child.exitCode !== null || child.signalCode !== null) {
      throw new Error(`code-server exited (${child.signalCode ?? child.exitCode}) before it was ready; see ${logFile}`);
    }
    try {
      const res = await fetch(`${origin}/healthz`);
      if (res.ok) return;
      last = `HTTP ${res.status}`;
    } catch (e) { last = (e as Error).message; }
    await new Promise((r) => setTimeout(r, 100));
  }
  throw new Error(`code-server not healthy within ${deadlineMs} ms (${last}); see ${logFile}`);
}

export async function startCodeServer(opts: StartOptions): Promise<WorkbenchServer> {
  const port = await freePort();
  const origin = `http://127.0.0.1:${port}`;
  const dir = (name: string) => { const p = join(opts.stateDir, name); mkdirSync(p, { recursive: true }); return p; };
  const configFile = join(dir('config'), 'config.yaml');
  writeFileSync(configFile, `bind-addr: 127.0.0.1:${port}\nauth: none\ncert: false\n`);
  const userData = dir('data');
  mkdirSync(join(userData, 'User'), { recursive: true });
  writeFileSync(join(userData, 'User', 'settings.json'),
    JSON.stringify({ ...QUIET_SETTINGS, ...opts.settings }, null, 2));
  const env: NodeJS.ProcessEnv = {
    ...process.env,
    XDG_CONFIG_HOME: dir('xdg-config'), XDG_DATA_HOME: dir('xdg-data'), XDG_CACHE_HOME: dir('xdg-cache'),
    ...opts.env,
  };
  delete env.VSCODE_IPC_HOOK_CLI;
  const fd = openSync(opts.logFile, 'a');
  const child = spawn(process.execPath, [opts.entry,
    '--config', configFile, '--user-data-dir', userData, '--extensions-dir', dir('extensions'),
    '--bind-addr', `127.0.0.1:${port}`, '--auth', 'none',
    '--disable-telemetry', '--disable-update-check', '--disable-workspace-trust',
    '--disable-getting-started-override',
  ], { detached: true, env, stdio: ['ignore', fd, fd] });
  closeSync(fd);
  const pid = child.pid;
  if (pid === undefined) throw new Error('code-server did not start (no pid)');

  let stopped = false;
  const stop = async () => {
    if (stopped) return;
    stopped = true;
    const signalGroup = (sig: NodeJS.Signals) => { try { process.kill(-pid, sig); } catch { /* gone */ } };
    signalGroup('SIGTERM');
    if (await within(exited(child), 5_000) === 'timeout') signalGroup('SIGKILL');
    await within(exited(child), 5_000);
    // Children of the server (extension host, file watcher) share the group: make sure none stays.
    signalGroup('SIGKILL');
  };
  try {
    await waitHealthy(origin, child, opts.readyTimeoutMs ?? 30_000, opts.logFile);
  } catch (e) {
    await stop();
    throw e;
  }
  const remote = (p: string) => `vscode-remote://127.0.0.1:${port}${p}`;
  return {
    port, origin, pid, stop,
    url({ folder, extensionDevelopmentPath, extensionTestsPath }) {
      const payload: [string, string][] = [];
      if (extensionDevelopmentPath) payload.push(['extensionDevelopmentPath', remote(extensionDevelopmentPath)]);
      if (extensionTestsPath) payload.push(['extensionTestsPath', remote(extensionTestsPath)]);
      let u = `${origin}/?folder=${encodeURIComponent(folder)}`;
      if (payload.length) u += `&payload=${encodeURIComponent(JSON.stringify(payload))}`;
      return u;
    },
  };
}
