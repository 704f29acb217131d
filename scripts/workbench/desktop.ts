/**
 * The same extension-host suite in VS Code desktop, through @vscode/test-electron, for machines
 * that can download VS Code (it cannot here: the download needs the internet). Started by
 * `npm run test:desktop` (scripts/workbench/run-desktop.mjs bundles and runs this file).
 */
import { runTests } from '@vscode/test-electron';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { prepareRun } from './prepare';

async function main(): Promise<number> {
  const root = process.cwd();
  const run = await prepareRun(root, join(root, 'test-output', 'desktop'));
  try {
    await runTests({
      version: process.env.QPOINT_VSCODE_VERSION ?? '1.100.3',
      extensionDevelopmentPath: root,
      extensionTestsPath: run.suiteDir,
      extensionTestsEnv: { QPOINT_SUITE_RESULT: run.resultFile, QPOINT_EXPECT_SPECS: String(run.specs.length) },
      launchArgs: [run.workspace, '--disable-extensions', '--disable-workspace-trust', '--skip-welcome', '--skip-release-notes',
        '--user-data-dir', join(root, 'test-output', 'desktop', 'user-data')],
    });
    return 0;
  } catch (err) {
    console.error(`qpoint desktop suite failed: ${err instanceof Error ? err.message : String(err)}`);
    try {
      const r = JSON.parse(readFileSync(run.resultFile, 'utf8')) as { results: { name: string; ok: boolean; detail?: string }[] };
      for (const x of r.results.filter((y) => !y.ok)) console.error(`FAIL ${x.name}\n${x.detail ?? ''}`);
    } catch { /* the suite did not get to write results */ }
    return 1;
  }
}

main().then((code) => process.exit(code), (err: unknown) => { console.error(err); process.exit(1); });
