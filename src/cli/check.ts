import type { Command } from './args';
import type { FileReport } from '../core/types';
import { analyzeText, type AnalyzeOptions } from '../core/analyze';
import { renderText } from '../core/report/text';
import { CAUTION } from '../core/text/format';
import { toSarif } from '../core/report/sarif';
import { countBySeverity } from '../core/findings';
import { displayName, readSpec } from './io';
import { readTables } from '../node/tables';
import { DOCS_URL, VERSION } from './version';

type CheckCommand = Extract<Command, { cmd: 'check' }>;

/** Check every file; one unreadable file never stops the rest. */
export function runCheck(c: CheckCommand): number {
  const opts: AnalyzeOptions = { anchors: false, ...(c.corners ? { corners: true } : {}), ...(c.mc ? { mc: { samples: c.mc, seed: c.seed } } : {}) };
  const reports: FileReport[] = [];
  let unreadable = false;
  for (const file of c.files) {
    const read = readSpec(file);
    const name = displayName(file);
    if (!read.ok) {
      unreadable = true;
      reports.push('tooLarge' in read ? { file: name, parsed: false, mirrors: [], anchors: [], findings: [read.tooLarge] } : unreadableReport(name, read.reason));
      continue;
    }
    const report = analyzeText(read.text, name, { ...opts, tables: readTables(file, read.text) });
    if (!report.parsed) unreadable = true;
    reports.push(report);
  }
  if (c.format === 'json') {
    const files = reports.map((r) => ({ file: r.file, parsed: r.parsed, title: r.title, mirrors: r.mirrors, findings: r.findings, ...(r.networks ? { networks: r.networks } : {}) }));
    process.stdout.write(JSON.stringify({ format: 1, tool: { name: 'qpoint', version: VERSION }, files }, null, 2) + '\n');
  } else if (c.format === 'sarif') {
    process.stdout.write(JSON.stringify(toSarif(reports, { version: VERSION, rulesDoc: DOCS_URL }), null, 2) + '\n');
  } else {
    const counts = countBySeverity(reports.flatMap((r) => r.findings));
    const mirrors = reports.reduce((n, r) => n + r.mirrors.length, 0);
    for (const r of reports) {
      const text = renderText(r);
      if (text) process.stdout.write(text + '\n');
    }
    const aside = reports.reduce((n, r) => n + (r.withheld?.length ?? 0), 0);
    const asideText = aside > 0 ? ` (${plural(aside, 'mirror')} not solved until ${aside === 1 ? 'its' : 'their'} errors are fixed)` : '';
    process.stdout.write(`${plural(mirrors, 'mirror output')} checked in ${plural(reports.length, 'file')}${asideText}: ` +
      `${plural(counts.error, 'error')}, ${plural(counts.warning, 'warning')}, ${plural(counts.info, 'note')}\n`);
    if (mirrors > 0) process.stdout.write(`note: ${CAUTION}\n`);
  }
  if (unreadable) return 2;
  return reports.some((r) => r.findings.some((f) => f.severity === 'error')) ? 1 : 0;
}

function unreadableReport(file: string, reason: string): FileReport {
  const zero = { line: 0, character: 0 };
  return {
    file, parsed: false, mirrors: [], anchors: [],
    findings: [{ severity: 'error', code: 'unreadable-file', message: `cannot read ${file}: ${reason}`, path: [], range: { start: zero, end: zero } }],
  };
}

function plural(n: number, word: string): string {
  return `${n} ${word}${n === 1 ? '' : 's'}`;
}
