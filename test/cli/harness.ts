/** The CLI bundled from source into a temporary folder, and run on arguments and standard input:
 *  shared by the CLI test files that need nothing but `qpoint …` on a spec text. */
import { beforeAll } from 'vitest';
import { spawnSync } from 'node:child_process';
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { build } from 'esbuild';

export const ROOT = join(__dirname, '..', '..');

export interface CliRun { code: number; stdout: string; stderr: string }

/** Bundles the CLI before the file's tests (in a folder named after `label`); returns its runner. */
export function useCli(label: string): (args: string[], input: string) => CliRun {
  const out = mkdtempSync(join(tmpdir(), `qpoint-cli-${label}-`));
  const cli = join(out, 'cli.js');
  beforeAll(async () => {
    await build({ entryPoints: { cli: join(ROOT, 'src/cli/main.ts') }, bundle: true, outdir: out, logLevel: 'error',
      platform: 'node', format: 'cjs', target: 'node20' });
  }, 120_000);
  return (args, input) => {
    const r = spawnSync(process.execPath, [cli, ...args], { cwd: ROOT, input, encoding: 'utf8', timeout: 60_000 });
    return { code: r.status ?? -1, stdout: r.stdout, stderr: r.stderr };
  };
}
