// One build for every target: the extension (node, cjs, vscode external), its analysis worker,
// the CLI (a launcher with a shebang, and its bundle), the benchmark script, and the webview (browser, iife).
// `tsc --noEmit` runs first so a type error stops the build.
import * as esbuild from 'esbuild';
import { execFileSync, spawnSync } from 'node:child_process';

const production = process.argv.includes('--production');
const watch = process.argv.includes('--watch');

if (!watch) {
  const tsc = 'node_modules/typescript/bin/tsc';
  execFileSync(process.execPath, [tsc, '--noEmit', '-p', 'tsconfig.json'], { stdio: 'inherit' });
  execFileSync(process.execPath, [tsc, '--noEmit', '-p', 'src/core/tsconfig.json'], { stdio: 'inherit' });
}

const common = {
  bundle: true,
  minify: production,
  sourcemap: production ? false : 'linked',
  logLevel: 'warning',
  legalComments: 'none',
  // The yaml package's ES build: the same code as its Node build minus a `process.env` debug
  // lookup on every token, which made YAML parsing ~30 % slower (scripts/bench.ts).
  alias: { yaml: './node_modules/yaml/browser/index.js' },
};

// ELK (schematic layout) is 1.6 MB that only `qpoint report` and *Export HTML Report* use: the
// node bundles load it from dist/elk.js on first use, so startup and `check` never parse it.
const elkApart = {
  alias: { ...common.alias, 'elkjs/lib/elk.bundled.js': './elk.js' },
  external: ['./elk.js'],
};

const targets = [
  { ...common, entryPoints: { elk: 'node_modules/elkjs/lib/elk.bundled.js' }, platform: 'node', format: 'cjs',
    target: 'node20', outdir: 'dist' },
  { ...common, ...elkApart, entryPoints: { extension: 'src/extension/extension.ts' }, platform: 'node', format: 'cjs',
    target: 'node20', outdir: 'dist', external: ['vscode', ...elkApart.external] },
  { ...common, entryPoints: { worker: 'src/extension/worker.ts' }, platform: 'node', format: 'cjs',
    target: 'node20', outdir: 'dist' },
  // The executable is a small launcher that loads the CLI bundle through V8's code cache.
  { ...common, entryPoints: { cli: 'src/cli/launch.ts' }, platform: 'node', format: 'cjs', target: 'node20',
    outdir: 'dist', banner: { js: '#!/usr/bin/env node' } },
  // Minified in every build, as it ships: a cold `check` reads, and V8 deserialises, half the
  // text (~3 % of a 500-mirror check); the linked source map keeps it debuggable.
  { ...common, ...elkApart, minify: true, entryPoints: { 'qpoint-cli': 'src/cli/main.ts' }, platform: 'node', format: 'cjs', target: 'node20',
    outdir: 'dist' },
  { ...common, entryPoints: { bench: 'scripts/bench.ts' }, platform: 'node', format: 'cjs', target: 'node20',
    outdir: 'dist' },
  // The panel's script is minified in every build: the HTML report carries it inline (4.1 MB
  // unminified, 1.7 MB minified, most of it ELK); the linked source map keeps it debuggable.
  { ...common, minify: true, entryPoints: { webview: 'webview/main.ts' }, platform: 'browser', format: 'iife',
    target: 'es2022', outdir: 'dist', loader: { '.css': 'text' } },
];

import { existsSync, readFileSync, writeFileSync } from 'node:fs';
import { createHash } from 'node:crypto';

// The CLI bundle's last line names its build (a hash of the text above it), so the launcher
// (src/cli/launch.ts) picks its code cache without hashing 1 MB on every start. A bundle without
// the line (a watch build) is hashed by the launcher instead.
function stampCliBundle(file) {
  if (!existsSync(file)) return;
  const text = readFileSync(file, 'utf8');
  const body = text.endsWith('\n') ? text : `${text}\n`;
  writeFileSync(file, `${body}// qpoint-cli build ${createHash('sha1').update(body).digest('hex').slice(0, 16)}\n`);
}
const present = targets.filter((t) => Object.values(t.entryPoints).every((p) => existsSync(p)));

if (watch) {
  for (const t of present) await (await esbuild.context(t)).watch();
  console.log('qpoint: watching', present.map((t) => Object.keys(t.entryPoints)[0]).join(', '));
} else {
  await Promise.all(present.map((t) => esbuild.build(t)));
  stampCliBundle('dist/qpoint-cli.js');
  // A first run writes the CLI's code cache (src/cli/launch.ts), so the first real run is fast.
  spawnSync(process.execPath, ['dist/cli.js', 'check', 'examples/sensor-afe.bias.yaml'], { stdio: 'ignore' });
}
