// Bundles scripts/workbench/desktop.ts (TypeScript) and runs it: `npm run test:desktop`.
import { build } from 'esbuild';
import { spawnSync } from 'node:child_process';

const outfile = 'out/workbench-desktop.cjs';
await build({
  entryPoints: ['scripts/workbench/desktop.ts'], bundle: true, platform: 'node', format: 'cjs', target: 'node20',
  outfile, external: ['@vscode/test-electron', 'esbuild'], logLevel: 'warning',
});
const r = spawnSync(process.execPath, [outfile], { stdio: 'inherit' });
process.exit(r.status ?? 1);
