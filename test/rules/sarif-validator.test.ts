/**
 * `qpoint check --format sarif` through the SARIF SDK's own validator (`Sarif.Multitool
 * validate`, npm @microsoft/sarif-multitool 5.7): the SARIF 2.1.0 schema plus the SDK's rules
 * for well-formed logs (SARIF1xxx: stable ids, URI references, …; SARIF2xxx: advice for
 * consumers). The logs are real CLI output: the example, a copy with faults (results with
 * related locations and fixes), relative and absolute file names, a spec error.
 */
import { spawnSync } from 'node:child_process';
import { accessSync, chmodSync, constants, copyFileSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';

const root = resolve(__dirname, '../..');
const cli = join(root, 'dist/cli.js');
const require = createRequire(import.meta.url);

/** The platform binary of the multitool (only Linux is installed here). */
function multitool(): string | undefined {
  try {
    const bin = require('@microsoft/sarif-multitool-linux') as string;
    try {
      accessSync(bin, constants.X_OK);
    } catch {
      chmodSync(bin, 0o755);  // its postinstall makes it executable; an install without scripts does not
    }
    return bin;
  } catch {
    return undefined;
  }
}

const dir = mkdtempSync(join(tmpdir(), 'qpoint-sarif-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

interface ValidatorResult { ruleId: string; level?: string; message: { text?: string } }

/** The validator's findings on a log (its output is itself a SARIF log). */
function validate(log: string, name: string): ValidatorResult[] {
  const bin = multitool();
  if (!bin) throw new Error('@microsoft/sarif-multitool-linux is not installed (npm ci)');
  const input = join(dir, `${name}.sarif`);
  const output = join(dir, `${name}.validation.sarif`);
  writeFileSync(input, log);
  const r = spawnSync(bin, ['validate', input, '-o', output, '-q'], { encoding: 'utf8', timeout: 120_000 });
  expect(r.status, r.stderr || r.stdout).toBe(0);
  const out = JSON.parse(readFileSync(output, 'utf8')) as { runs: { results?: ValidatorResult[]; invocations?: { executionSuccessful: boolean }[] }[] };
  expect(out.runs[0]!.invocations?.[0]?.executionSuccessful).toBe(true);
  return out.runs[0]!.results ?? [];
}

function sarifOf(files: string[]): string {
  const r = spawnSync(process.execPath, [cli, 'check', ...files, '--format', 'sarif'], { cwd: root, encoding: 'utf8' });
  expect([0, 1]).toContain(r.status);
  return r.stdout;
}

const example = readFileSync(join(root, 'examples/sensor-afe.bias.yaml'), 'utf8');

describe('SARIF through the SARIF SDK validator', () => {
  it('the example, a faulty copy (absolute path) and a spec error give no error and no warning', () => {
    // The copies sit in a temporary folder: their characterisation table goes with them.
    copyFileSync(join(root, 'examples/halden180-nlvt.devtable.csv'), join(dir, 'halden180-nlvt.devtable.csv'));
    const faulty = join(dir, 'faulty.bias.yaml');
    // The plain Wilson's VDS mismatch: findings with fixes and related locations.
    writeFileSync(faulty, example.replace('kind: wilson-balanced', 'kind: wilson'));
    const broken = join(dir, 'broken.bias.yaml');
    writeFileSync(broken, example.replace('kind: wilson\n', 'kind: wilsn\n'));
    const log = sarifOf(['examples/sensor-afe.bias.yaml', faulty, broken]);
    const parsed = JSON.parse(log) as { runs: { results: { fixes?: unknown[]; relatedLocations?: unknown[] }[] }[] };
    // The log really carries what the rules look at.
    expect(parsed.runs[0]!.results.some((x) => (x.fixes?.length ?? 0) > 0)).toBe(true);
    expect(parsed.runs[0]!.results.some((x) => (x.relatedLocations?.length ?? 0) > 0)).toBe(true);
    const found = validate(log, 'check');
    const serious = found.filter((x) => x.level === undefined || x.level === 'error' || x.level === 'warning');
    expect(serious.map((x) => `${x.ruleId}: ${x.message.text ?? ''}`)).toEqual([]);
  });

  it('the validator can fail: a relative reference with a leading slash is an error (SARIF1004)', () => {
    const log = JSON.parse(sarifOf(['examples/sensor-afe.bias.yaml'])) as { runs: { artifacts: { location: { uri: string } }[] }[] };
    log.runs[0]!.artifacts[0]!.location.uri = '/examples/sensor-afe.bias.yaml';
    const found = validate(JSON.stringify(log), 'broken');
    expect(found.some((x) => x.ruleId === 'SARIF1004' && x.level === 'error')).toBe(true);
  });
});
