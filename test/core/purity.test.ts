/**
 * src/core/ is pure (DEVELOPERS.md): no editor, no Node modules, no DOM. Two guards hold it, and
 * each is tested here on a probe file that exists only in memory, placed under src/core/:
 * - the lint (eslint.config.mjs) rejects the import itself, whatever the type packages resolve
 *   (`import * as vscode from 'vscode'` type-checks, because @types/vscode resolves it);
 * - the core's own tsconfig (ES libraries, `"types": []`) leaves Node's and the DOM's names
 *   undeclared, so `fs` or `window` there fails the type check of the whole core.
 */
import { dirname, join, resolve } from 'node:path';
import { ESLint } from 'eslint';
import ts from 'typescript';
import { describe, expect, it } from 'vitest';

const root = resolve(__dirname, '../..');
const probe = join(root, 'src/core/purity-probe.ts');

describe('lint: forbidden imports in src/core/', () => {
  const eslint = new ESLint({ cwd: root });

  async function problems(code: string, filePath = probe): Promise<string[]> {
    const [result] = await eslint.lintText(code, { filePath });
    return result.messages.map((m) => `${m.line}:${m.ruleId}`);
  }

  it.each([
    ['vscode', "import * as vscode from 'vscode';\nexport const w = vscode.window;"],
    ['fs', "import { readFileSync } from 'fs';\nexport const r = readFileSync;"],
    ['node:fs', "import { readFileSync } from 'node:fs';\nexport const r = readFileSync;"],
    ['path', "import { join } from 'path';\nexport const j = join;"],
    ['child_process', "import { spawn } from 'child_process';\nexport const s = spawn;"],
    ['a type from node:worker_threads', "export type { Worker } from 'node:worker_threads';"],
    ['uplot (a DOM module)', "import uPlot from 'uplot';\nexport const u = uPlot;"],
    ['a front end', "import { runCheck } from '../cli/check';\nexport const c = runCheck;"],
  ])('rejects an import of %s', async (_label, code) => {
    expect(await problems(code)).toContain('1:no-restricted-imports');
  });

  it('rejects require, dynamic import and import = require', async () => {
    expect(await problems("export const fs = require('fs');")).toEqual(expect.arrayContaining(['1:@typescript-eslint/no-require-imports']));
    expect(await problems("export const fs = import('node:fs');")).toContain('1:no-restricted-syntax');
    expect(await problems("import fs = require('fs');\nexport const r = fs.readFileSync;")).toEqual(
      expect.arrayContaining(['1:@typescript-eslint/no-require-imports']));
  });

  it('rejects host globals and any', async () => {
    expect(await problems('export const env = process.env;')).toContain('1:no-restricted-globals');
    expect(await problems('export const d = window.document;')).toContain('1:no-restricted-globals');
    expect(await problems('export function f(x: any): number { return x; }')).toContain('1:@typescript-eslint/no-explicit-any');
  });

  it('accepts what the core does import, and Node modules outside the core', async () => {
    expect(await problems("import { parseDocument } from 'yaml';\nimport type { Finding } from './types';\nexport const p: (t: string) => unknown = parseDocument;\nexport type F = Finding;")).toEqual([]);
    expect(await problems("import { readFileSync } from 'node:fs';\nexport const r = readFileSync;", join(root, 'src/cli/purity-probe.ts'))).toEqual([]);
  });
});

describe('the core tsconfig: Node and DOM names are undeclared', () => {
  // The whole core plus the probe, as `tsc -p src/core/tsconfig.json` sees it: a core file that
  // pulled Node's types in for everyone would make the probe compile, and this test fail.
  const configPath = join(root, 'src/core/tsconfig.json');
  const config = ts.getParsedCommandLineOfConfigFile(configPath, {}, { ...ts.sys, onUnRecoverableConfigFileDiagnostic: () => undefined })!;

  let previous: ts.Program | undefined;

  function errors(code: string): string[] {
    const host = ts.createCompilerHost(config.options);
    const readFile = host.readFile.bind(host);
    const getSourceFile = host.getSourceFile.bind(host);
    host.readFile = (f) => (resolve(f) === probe ? code : readFile(f));
    host.fileExists = (f) => resolve(f) === probe || ts.sys.fileExists(f);
    host.getSourceFile = (f, lang, ...rest) => (resolve(f) === probe ? ts.createSourceFile(f, code, lang) : getSourceFile(f, lang, ...rest));
    // The previous program lends its unchanged source files: only the probe is read anew.
    const program = ts.createProgram({ rootNames: [...config.fileNames, probe], options: config.options, host, oldProgram: previous });
    previous = program;
    const source = program.getSourceFile(probe)!;
    return ts.getPreEmitDiagnostics(program, source).map((d) => ts.flattenDiagnosticMessageText(d.messageText, '\n'));
  }

  it('a core file importing fs does not compile', () => {
    expect(dirname(probe)).toBe(join(root, 'src/core'));
    expect(errors("import { readFileSync } from 'fs';\nexport const r = readFileSync;").join('\n')).toMatch(/Cannot find module 'fs'/);
  });

  it('nor one using process or window', () => {
    expect(errors('export const env = process.env;').join('\n')).toMatch(/Cannot find name 'process'/);
    expect(errors('export const d = window.document;').join('\n')).toMatch(/Cannot find name 'window'/);
  });

  it('while a pure probe compiles cleanly', () => {
    expect(errors("import type { Finding } from './types';\nexport const none: Finding[] = [];")).toEqual([]);
  });
});
