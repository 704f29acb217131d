import { createHash } from 'node:crypto';
import { mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import type { Command } from './args';
import { analyzeText } from '../core/analyze';
import { renderHtmlReport } from '../core/report/html';
import { schematicsOf } from '../core/schematic';
import { networkTreesOf } from '../core/network-tree';
import { isSameFile, readOne, reasonOf } from './io';
import { VERSION } from './version';
import { readTables } from '../node/tables';

type ReportCommand = Extract<Command, { cmd: 'report' }>;

/** The webview bundle sits beside the CLI bundle in dist/. */
function webviewAssets(): { script: string } {
  return { script: readFileSync(join(__dirname, 'webview.js'), 'utf8') };
}

export async function runReport(c: ReportCommand): Promise<number> {
  if (isSameFile(c.file, c.html)) {
    process.stderr.write(`qpoint: --html ${c.html} is the spec itself; name another file for the page\n`);
    return 2;
  }
  const read = readOne(c.file);
  if (!read) return 2;
  const name = read.name;
  // The page carries what a review needs: curves, every named corner, and Monte Carlo on request.
  const report = analyzeText(read.text, name, { curve: true, corners: true, tables: readTables(c.file, read.text), ...(c.mc ? { mc: { samples: c.mc, seed: c.seed } } : {}) });
  // ELK is loaded only here: `check` and `fix` never pay for it. A plain require, not import():
  // the launcher runs this bundle through vm.Script (for V8's code cache), which has no loader for
  // a dynamic import.
  // eslint-disable-next-line @typescript-eslint/no-require-imports
  const ELK = require('elkjs/lib/elk.bundled.js') as typeof import('elkjs/lib/elk.bundled.js').default;
  const elk = new ELK();
  const schematics = await schematicsOf(elk, report);
  const trees = await networkTreesOf(elk, report);
  try {
    mkdirSync(dirname(c.html), { recursive: true });
    const stamp = { version: VERSION, date: new Date().toISOString(), inputHash: `sha256:${createHash('sha256').update(read.text).digest('hex')}` };
    writeFileSync(c.html, renderHtmlReport(report, webviewAssets(), stamp, schematics, trees));
  } catch (err) {
    process.stderr.write(`qpoint: cannot write ${c.html}: ${reasonOf(err)}\n`);
    return 2;
  }
  const errors = report.findings.filter((f) => f.severity === 'error').length;
  process.stdout.write(`wrote ${c.html} (${report.mirrors.length} mirror outputs, ${report.findings.length} findings, ${errors} errors)\n`);
  // The command's job is the page: once it is written the run succeeded (exit 0), findings and
  // all — `qpoint check` is the gate on errors. Input that could not be parsed is still exit 2.
  return report.parsed ? 0 : 2;
}
