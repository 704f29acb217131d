/**
 * The `qpoint` executable: a few lines that load the real CLI bundle (dist/qpoint-cli.js) through
 * V8's code cache. Compiling the 1 MB bundle and the functions a check runs costs ~40 ms of a
 * cold start on a small machine (a check of the example: ~210 → ~170 ms with Node's own start);
 * with the cache V8 reads the bytecode instead (scripts/bench.ts, "cli"). Node 22 offers this as `module.enableCompileCache()`; Node 20 needs `vm.Script` with
 * `cachedData`, which is what this does.
 *
 * The cache sits next to the bundle, named by a hash of the bundle's text: V8 checks a cache only
 * against the source's length, so a rebuilt bundle of the same length must never meet an old
 * cache. The build writes that hash as the bundle's last line (esbuild.mjs), so a start reads it
 * there instead of hashing the whole text (~1 % of a 500-mirror check); a bundle without it (a
 * watch build, one edited by hand) is hashed here. It is written after a run in which V8 had none or rejected it (another Node version,
 * other V8 flags), to a temporary name and then renamed, so two runs at once never leave half a
 * file; caches of earlier builds are removed then. A read-only install simply runs without one.
 * Nothing here may change what the CLI prints or its exit code.
 */
import { readdirSync, readFileSync, renameSync, rmSync, writeFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { dirname, join } from 'node:path';
import { Script } from 'node:vm';

const bundle = join(__dirname, 'qpoint-cli.js');
const text = readFileSync(bundle, 'utf8');
const cacheName = `qpoint-cli.${buildOf(text)}.v8cache`;
const cacheFile = join(__dirname, cacheName);

// The same wrapper Node puts around a CommonJS file, so the bundle sees require, module, etc.
const source = `(function (exports, require, module, __filename, __dirname) {${text}\n})`;
let cachedData: Buffer | undefined;
try {
  cachedData = readFileSync(cacheFile);
} catch {
  cachedData = undefined;
}
const script = new Script(source, { filename: bundle, cachedData });

if (cachedData === undefined || script.cachedDataRejected === true) {
  // After the run, so the cache holds every function the run compiled, not only the top level.
  process.once('exit', () => {
    const temp = `${cacheFile}.${process.pid}`;
    try {
      writeFileSync(temp, script.createCachedData());
      renameSync(temp, cacheFile);
      for (const f of readdirSync(__dirname)) {
        if (/^qpoint-cli\.[0-9a-f]{16}\.v8cache$/.test(f) && f !== cacheName) rmSync(join(__dirname, f), { force: true });
      }
    } catch {
      // A read-only install or a full disk: the next run compiles again, nothing else changes.
      try { rmSync(temp, { force: true }); } catch { /* nothing was written */ }
    }
  });
}

const main = script.runInThisContext() as (exports: object, require: NodeJS.Require, module: object, filename: string, dir: string) => void;
const mod = { exports: {} };
main(mod.exports, createRequire(bundle), mod, bundle, dirname(bundle));

/** The build a bundle's text is: its stamp (`// qpoint-cli build <16 hex digits>`, its last line), else its hash. */
function buildOf(source: string): string {
  const stamp = /\n\/\/ qpoint-cli build ([0-9a-f]{16})\n$/.exec(source.slice(-64));
  if (stamp) return stamp[1]!;
  // Loaded only here: node:crypto costs a few ms of every start.
  const { createHash } = createRequire(bundle)('node:crypto') as typeof import('node:crypto');
  return createHash('sha1').update(source).digest('hex').slice(0, 16);
}
