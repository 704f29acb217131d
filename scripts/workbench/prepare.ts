/**
 * What every workbench run needs, whatever hosts VS Code (code-server here, VS Code desktop via
 * @vscode/test-electron elsewhere): the extension-host suite bundled to CommonJS, and a fresh
 * workspace holding copies of the fixture specs (the suite edits them).
 */
import { build } from 'esbuild';
import { cpSync, existsSync, mkdirSync, readdirSync, rmSync } from 'node:fs';
import { join } from 'node:path';

export interface PreparedRun {
  /** Folder with index.js exporting run(): the extensionTestsPath. */
  suiteDir: string;
  /** Workspace folder with the fixture specs. */
  workspace: string;
  /** Where the suite writes its results (JSON). */
  resultFile: string;
  /** File names of the fixture specs copied into the workspace. */
  specs: string[];
}

export function requireBuiltExtension(root: string): void {
  for (const f of ['dist/extension.js', 'dist/worker.js']) {
    if (!existsSync(join(root, f))) throw new Error(`${f} is missing: build first (\`node esbuild.mjs\`; \`npm test\` does it)`);
  }
}

/** Copy the fixture specs into a fresh `workspace` folder under `outDir`. */
export function freshWorkspace(root: string, outDir: string, name: string): { dir: string; specs: string[] } {
  const dir = join(outDir, name);
  rmSync(dir, { recursive: true, force: true });
  mkdirSync(dir, { recursive: true });
  const fixtures = join(root, 'test', 'workbench', 'fixtures');
  const specs = readdirSync(fixtures).filter((f) => /\.bias\.(ya?ml|json)$/.test(f)).sort();
  for (const f of specs) cpSync(join(fixtures, f), join(dir, f));
  return { dir, specs };
}

export async function prepareRun(root: string, outDir: string): Promise<PreparedRun> {
  requireBuiltExtension(root);
  mkdirSync(outDir, { recursive: true });
  const suiteDir = join(outDir, 'suite');
  rmSync(suiteDir, { recursive: true, force: true });
  await build({
    entryPoints: [join(root, 'test', 'workbench', 'suite', 'index.ts')],
    bundle: true, platform: 'node', format: 'cjs', target: 'node20',
    external: ['vscode'], outfile: join(suiteDir, 'index.js'), sourcemap: 'inline', logLevel: 'warning',
  });
  const { dir, specs } = freshWorkspace(root, outDir, 'workspace');
  const resultFile = join(outDir, 'suite-result.json');
  rmSync(resultFile, { force: true });
  return { suiteDir, workspace: dir, resultFile, specs };
}
