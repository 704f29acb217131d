/**
 * `npm test`'s first step (scripts/test-setup.mjs) against a fake dpkg-query and apt-get on
 * PATH: what it checks, when it installs, when it refreshes the package lists, and the exact
 * command it stops with when it cannot install. The fakes keep their state in files, so an
 * "installed" package is seen as installed by the next dpkg-query.
 */
import { spawnSync } from 'node:child_process';
import { chmodSync, existsSync, mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { PACKAGE_LIST, readPackageList, setUp } from '../../scripts/test-setup.mjs';

const ROOT = resolve(__dirname, '../..');
const BASE = mkdtempSync(join(tmpdir(), 'qpoint-setup-'));
afterAll(() => rmSync(BASE, { recursive: true, force: true }));

const DPKG_QUERY = `#!/bin/sh
[ "$1" = --version ] && { echo "fake dpkg-query"; exit 0; }
for p; do :; done
if grep -qx "$p" "$FAKE_STATE/installed" 2>/dev/null; then printf 'install ok installed'; exit 0; fi
echo "dpkg-query: no packages found matching $p" >&2; exit 1
`;
const APT_GET = `#!/bin/sh
echo "$*" >> "$FAKE_STATE/apt.log"
case "$1" in
  update) [ -f "$FAKE_STATE/update-fails" ] && exit 100; touch "$FAKE_STATE/updated"; exit 0 ;;
  install)
    [ -f "$FAKE_STATE/stale" ] && [ ! -f "$FAKE_STATE/updated" ] && { echo "E: Unable to locate package" >&2; exit 100; }
    for a; do case "$a" in -*|install) ;; *) echo "$a" >> "$FAKE_STATE/installed" ;; esac; done; exit 0 ;;
esac
exit 1
`;

let n = 0;
/** A fresh fake machine: `installed` packages present; `stale` lists; `updateFails`. */
function machine(opts: { installed?: string[]; stale?: boolean; updateFails?: boolean; tools?: boolean } = {}) {
  const dir = join(BASE, `m${n++}`);
  const bin = join(dir, 'bin');
  const state = join(dir, 'state');
  mkdirSync(bin, { recursive: true });
  mkdirSync(state);
  if (opts.tools !== false) {
    writeFileSync(join(bin, 'dpkg-query'), DPKG_QUERY);
    writeFileSync(join(bin, 'apt-get'), APT_GET);
    chmodSync(join(bin, 'dpkg-query'), 0o755);
    chmodSync(join(bin, 'apt-get'), 0o755);
  }
  writeFileSync(join(state, 'installed'), (opts.installed ?? []).map((p) => p + '\n').join(''));
  if (opts.stale) writeFileSync(join(state, 'stale'), '');
  if (opts.updateFails) writeFileSync(join(state, 'update-fails'), '');
  const env = { ...process.env, PATH: `${bin}:/usr/bin:/bin`, FAKE_STATE: state };
  const aptCalls = () => (existsSync(join(state, 'apt.log')) ? readFileSync(join(state, 'apt.log'), 'utf8').trim().split('\n') : []);
  return { env, aptCalls, bin };
}

const PACKAGES = ['chromium', 'ripgrep'];
const quiet = () => undefined;

describe('the package list', () => {
  it('is the one the workbench README names, comments and blank lines left out', () => {
    expect(readPackageList(readFileSync(PACKAGE_LIST, 'utf8'))).toEqual(['chromium', 'libkrb5-dev', 'ripgrep', 'libxkbfile-dev', 'libsecret-1-dev']);
    expect(readPackageList('# browser\nchromium  # the one\n\n  ripgrep\n')).toEqual(['chromium', 'ripgrep']);
  });
});

describe('setUp', () => {
  it('does nothing when every package is installed', () => {
    const m = machine({ installed: PACKAGES });
    expect(setUp({ packages: PACKAGES, isRoot: true, env: m.env, log: quiet })).toEqual({ ok: true, missing: [], installed: [], message: '' });
    expect(m.aptCalls()).toEqual([]);
  });

  it('without root, stops with the exact command and touches nothing', () => {
    const m = machine({ installed: ['ripgrep'] });
    const r = setUp({ packages: PACKAGES, isRoot: false, env: m.env, log: quiet });
    expect(r.ok).toBe(false);
    expect(r.missing).toEqual(['chromium']);
    expect(r.message).toContain('sudo apt-get update && sudo apt-get install -y --no-install-recommends chromium');
    expect(m.aptCalls()).toEqual([]);
  });

  it('as root, installs the missing packages only, without an update when the lists are good', () => {
    const m = machine({ installed: ['ripgrep'] });
    const r = setUp({ packages: PACKAGES, isRoot: true, env: m.env, log: quiet });
    expect(r).toEqual({ ok: true, missing: ['chromium'], installed: ['chromium'], message: '' });
    expect(m.aptCalls()).toEqual(['install -y -qq --no-install-recommends chromium']);
    // the fake dpkg-query now sees it: a second run has nothing to do
    expect(setUp({ packages: PACKAGES, isRoot: true, env: m.env, log: quiet }).missing).toEqual([]);
  });

  it('as root on stale package lists, runs apt-get update and installs again', () => {
    const m = machine({ stale: true });
    const lines: string[] = [];
    const r = setUp({ packages: PACKAGES, isRoot: true, env: m.env, log: (l) => lines.push(l) });
    expect(r.ok).toBe(true);
    expect(m.aptCalls()).toEqual([
      'install -y -qq --no-install-recommends chromium ripgrep', 'update -qq', 'install -y -qq --no-install-recommends chromium ripgrep',
    ]);
    expect(lines).toEqual(['test set-up: installing chromium ripgrep with apt-get',
      'test set-up: apt-get could not install them; running apt-get update and trying again']);
  });

  it('as root, when apt-get cannot install, stops with the command', () => {
    const m = machine({ stale: true, updateFails: true });
    const r = setUp({ packages: PACKAGES, isRoot: true, env: m.env, log: quiet });
    expect(r.ok).toBe(false);
    expect(r.message).toContain('apt-get update && apt-get install -y --no-install-recommends chromium ripgrep');
    expect(m.aptCalls()).toEqual(['install -y -qq --no-install-recommends chromium ripgrep', 'update -qq']);
  });

  it('on a machine without dpkg-query, names the packages and the Debian command', () => {
    const m = machine({ tools: false });
    const r = setUp({ packages: PACKAGES, isRoot: true, env: { ...m.env, PATH: m.bin }, log: quiet });
    expect(r.ok).toBe(false);
    expect(r.message).toMatch(/no dpkg-query to check them: chromium ripgrep\.\nOn Debian or Ubuntu: sudo apt-get update && sudo apt-get install -y --no-install-recommends chromium ripgrep$/);
  });
});

describe('node scripts/test-setup.mjs (the first command of npm test)', () => {
  const script = join(ROOT, 'scripts/test-setup.mjs');
  const all = readPackageList(readFileSync(PACKAGE_LIST, 'utf8'));

  it('exits 0 in silence when every package is installed', () => {
    const m = machine({ installed: all });
    const r = spawnSync(process.execPath, [script], { env: m.env, encoding: 'utf8' });
    expect(r.status).toBe(0);
    expect(r.stdout + r.stderr).toBe('');
    expect(m.aptCalls()).toEqual([]);
  });

  it('exits 1 with the install command when a package is missing and cannot be installed', () => {
    // As root the fake apt-get fails (stale lists, failing update); otherwise the user is told to install.
    const m = machine({ installed: all.filter((p) => p !== 'chromium'), stale: true, updateFails: true });
    const r = spawnSync(process.execPath, [script], { env: m.env, encoding: 'utf8' });
    expect(r.status).toBe(1);
    expect(r.stderr).toContain('apt-get install -y --no-install-recommends chromium');
  });
});
