// The first step of `npm test`: the Debian packages the browser and workbench suites need
// (scripts/workbench/apt-packages.txt) are installed before any suite starts. As root, missing
// ones are installed with apt-get (the package lists are refreshed when an install cannot find
// them); otherwise the run stops at once with the exact command to run. Plain Node, no build.
import { spawnSync } from 'node:child_process';
import { readFileSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';

export const PACKAGE_LIST = join(dirname(fileURLToPath(import.meta.url)), 'workbench', 'apt-packages.txt');

/** Package names of a list file: one a line, `#` starts a comment. */
export function readPackageList(text) {
  return text.split('\n').map((line) => line.replace(/#.*/, '').trim()).filter(Boolean);
}

/** The command a user without root runs to install `missing`. */
export function installCommand(missing) {
  return `sudo apt-get update && sudo apt-get install -y --no-install-recommends ${missing.join(' ')}`;
}

/**
 * Check `packages` with dpkg-query and install the missing ones when `isRoot`.
 * `env` is the environment the tools run in (its PATH finds dpkg-query and apt-get).
 * Returns { ok, missing, installed, message }: `message` is what to print when not ok.
 */
export function setUp({ packages, isRoot, env = process.env, log = (line) => process.stdout.write(line + '\n') }) {
  const run = (cmd, args, inherit = false) => spawnSync(cmd, args, { env, encoding: 'utf8', stdio: inherit ? ['ignore', 'inherit', 'inherit'] : 'pipe' });
  const probe = run('dpkg-query', ['--version']);
  if (probe.error || probe.status !== 0) {
    return { ok: false, missing: packages, installed: [], message:
      `npm test needs these Debian packages, and this machine has no dpkg-query to check them: ${packages.join(' ')}.\n` +
      'On Debian or Ubuntu: ' + installCommand(packages) };
  }
  const missing = packages.filter((p) => {
    const r = run('dpkg-query', ['-W', '-f=${Status}', p]);
    return r.status !== 0 || !/\binstall ok installed\b/.test(r.stdout);
  });
  if (missing.length === 0) return { ok: true, missing, installed: [], message: '' };
  if (!isRoot) {
    return { ok: false, missing, installed: [], message:
      `npm test needs Debian packages that are not installed: ${missing.join(' ')}. Install them, then run npm test again:\n  ${installCommand(missing)}` };
  }
  const aptEnv = { ...env, DEBIAN_FRONTEND: 'noninteractive' };
  const apt = (args) => spawnSync('apt-get', args, { env: aptEnv, encoding: 'utf8', stdio: ['ignore', 'inherit', 'inherit'] });
  const install = ['install', '-y', '-qq', '--no-install-recommends', ...missing];
  log(`test set-up: installing ${missing.join(' ')} with apt-get`);
  let r = apt(install);
  if (r.error || r.status !== 0) {
    // Empty or stale package lists (a fresh machine): refresh them once and try again.
    log('test set-up: apt-get could not install them; running apt-get update and trying again');
    const update = apt(['update', '-qq']);
    r = update.error || update.status !== 0 ? update : apt(install);
  }
  if (r.error || r.status !== 0) {
    return { ok: false, missing, installed: [], message:
      `npm test needs Debian packages that apt-get could not install: ${missing.join(' ')}. Run:\n  apt-get update && apt-get install -y --no-install-recommends ${missing.join(' ')}` };
  }
  return { ok: true, missing, installed: missing, message: '' };
}

function main() {
  const packages = readPackageList(readFileSync(PACKAGE_LIST, 'utf8'));
  const result = setUp({ packages, isRoot: typeof process.getuid === 'function' && process.getuid() === 0 });
  if (!result.ok) {
    process.stderr.write(`\nqpoint test set-up: ${result.message}\n\n`);
    process.exit(1);
  }
}

if (process.argv[1] && fileURLToPath(import.meta.url) === resolve(process.argv[1])) main();
