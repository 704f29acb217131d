/**
 * The CLI's JSON contract (design §5) holds on broken files too: `qpoint check FILE --format json`
 * prints one object with `format: 1` and `files[0].findings`, exits 0, 1 or 2, and never reports an
 * internal error — on mutated copies of the project's specs, random bytes and hostile YAML.
 * Runs the built CLI (`npm test` builds first; otherwise run `npm run build`).
 */
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import fc from 'fast-check';
import { afterAll, describe, expect, it } from 'vitest';
import { arbBytes, arbMutatedSpec, arbYamlFeatures, seedSpecs } from './inputs';

const CLI = join(process.cwd(), 'dist', 'cli.js');
const dir = mkdtempSync(join(tmpdir(), 'qpoint-fuzz-cli-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

interface CheckJson { format: number; files: { file: string; findings: { code: string; severity: string }[] }[] }

describe('qpoint check --format json on broken files', () => {
  it('always prints the contract object', () => {
    expect(existsSync(CLI), `${CLI} is missing: run npm run build`).toBe(true);
    const seeds = seedSpecs();
    const inputs = [
      ...fc.sample(arbMutatedSpec(seeds), { numRuns: 6, seed: 11 }),
      ...fc.sample(arbBytes, { numRuns: 2, seed: 12 }),
      ...fc.sample(arbYamlFeatures, { numRuns: 2, seed: 13 }),
    ];
    inputs.forEach((input, i) => {
      const ext = input.file.endsWith('.json') ? '.bias.json' : '.bias.yaml';
      const file = join(dir, `case${i}${ext}`);
      writeFileSync(file, input.text);
      const run = spawnSync(process.execPath, [CLI, 'check', file, '--format', 'json'], { encoding: 'utf8', timeout: 30_000 });
      expect([0, 1, 2], `exit ${run.status} for ${input.kind}: ${run.stderr}`).toContain(run.status);
      expect(run.stderr).not.toMatch(/internal error/i);
      const out = JSON.parse(run.stdout) as CheckJson;
      expect(out.format).toBe(1);
      expect(out.files).toHaveLength(1);
      expect(Array.isArray(out.files[0].findings)).toBe(true);
      expect(out.files[0].findings.map((f) => f.code)).not.toContain('internal-error');
      // Exit 1 exactly when an error finding was printed, unless the file did not read (2).
      const errors = out.files[0].findings.some((f) => f.severity === 'error');
      if (run.status === 0) expect(errors).toBe(false);
      if (run.status === 1) expect(errors).toBe(true);
    });
  });
});
