import { createTwoFilesPatch } from 'diff';
import type { Command } from './args';
import { analyzeText } from '../core/analyze';
import { fixAll } from '../core/rules/fix-all';
import { findingLine } from '../core/report/text';
import { escapeControls } from '../core/text/format';
import { mirrorIndexOfPath } from '../core/mirror-at';
import { readOne, replaceIfUnchanged } from './io';
import { readTables } from '../node/tables';

type FixCommand = Extract<Command, { cmd: 'fix' }>;

/** Apply every preferred fix, re-checking between rounds; print a diff unless --apply. */
export function runFix(c: FixCommand): number {
  const read = readOne(c.file);
  if (!read) return 2;
  const name = read.name;
  // --corners: corner findings count (and get fixes verified at every corner), and a fix that
  // breaks a corner does not count as progress.
  // Tables are read once: a fix edits the spec, never a table.
  const opts = { ...(c.corners ? { corners: true } : {}), tables: readTables(c.file, read.text) };
  const before = analyzeText(read.text, name, opts);
  if (!before.parsed) {
    for (const f of before.findings) process.stderr.write(findingLine(name, f) + '\n');
    return 2;
  }
  // The first round checks the text just analysed: reuse that report instead of solving it again.
  const result = fixAll(read.text, name, (text) => (text === read.text ? before : analyzeText(text, name, opts)));
  const applied = result.applied.map((a) => escapeControls(`fixed ${a.code}: ${a.title}`) + '\n').join('');
  if (result.text === read.text && result.withheld) {
    // A spec with errors is solved for its other mirrors, but gets no fixes until it reads
    // cleanly: list what blocks, not every finding of the file (`qpoint check` lists those).
    process.stdout.write(applied);
    const aside = new Set((before.withheld ?? []).map((w) => w.index));
    const blocking = result.remaining.filter((f) => f.severity === 'error' && aside.has(mirrorIndexOfPath(f.path) ?? -1));
    process.stdout.write(`nothing fixed: fixes are offered once the spec has no errors; fix ${blocking.length === 1 ? 'this error' : `these ${blocking.length} errors`} first\n`);
    for (const f of blocking) process.stdout.write(findingLine(name, f) + '\n');
    const others = result.remaining.length - blocking.length;
    if (others > 0) process.stdout.write(`(${others} other finding${others === 1 ? '' : 's'} of the solved mirrors: qpoint check ${name})\n`);
    return 1;
  }
  if (result.text === read.text) {
    process.stdout.write(applied);
    process.stdout.write('nothing to fix\n');
  } else if (c.apply && c.file !== '-') {
    // Only a file that still holds what was read is replaced, and "fixed" is said once it is.
    const written = replaceIfUnchanged(c.file, read.digest, result.text);
    if (!written.ok) {
      process.stderr.write(written.changed
        ? `qpoint: ${name} changed while qpoint was fixing it; nothing was written (run qpoint fix again)\n`
        : `qpoint: cannot write ${name}: ${written.reason}; nothing was changed\n`);
      return 2;
    }
    process.stdout.write(applied);
    process.stdout.write(`wrote ${name} (${result.applied.length} fixes in ${result.rounds} rounds)\n`);
  } else {
    process.stdout.write(applied);
    const [from, to] = diffLabels(name);
    process.stdout.write(createTwoFilesPatch(from, to, read.text, result.text));
  }
  for (const f of result.remaining) process.stdout.write(findingLine(name, f) + '\n');
  for (const u of result.unfixed) {
    const at = u.finding.range.start;
    process.stdout.write(`not fixed ${u.finding.code} at ${name}:${at.line + 1}:${at.character + 1}: ${u.text}\n`);
  }
  return result.remaining.some((f) => f.severity === 'error') ? 1 : 0;
}

/** Diff header names: `a/<path>` and `b/<path>` for a path relative to here (apply with
 *  `patch -p1`); an absolute path as given on both sides (`patch -p0`), never `a//tmp/…`. */
function diffLabels(name: string): [string, string] {
  if (name === '<stdin>') return ['a/<stdin>', 'b/<stdin>'];
  if (/^([/\\]|[A-Za-z]:[/\\])/.test(name)) return [name, name];
  const rel = name.replace(/^(\.[/\\])+/, '');
  return [`a/${rel}`, `b/${rel}`];
}
