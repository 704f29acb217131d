/**
 * What the CLI writes to a terminal or CI log from the spec's own text, and where it says a
 * finding is.
 * - Control characters: ECMA-48 (5th ed., 1991) §5 — ESC (0x1B) starts escape and control
 *   sequences (CSI `ESC [`, OSC `ESC ]`, e.g. OSC 0 sets the window title, OSC 52 the clipboard
 *   on xterm-like terminals), BEL (0x07) ends an OSC, CR (0x0D) returns to the line start so the
 *   next text overwrites it. None may reach the terminal from a title or name; JSON (RFC 8259 §7)
 *   and SARIF escape them by their own syntax.
 * - A byte-order mark is not a column (Unicode 15 §23.8): line 1 reads the same with and without
 *   one, in the text format (1-based columns), JSON (0-based LSP positions) and SARIF (1-based).
 */
import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { ROOT, useCli } from './harness';

const RAZAVI = readFileSync(join(ROOT, 'test/cli/fixtures/razavi-d.bias.yaml'), 'utf8');

const qpoint = useCli('terminal');

// C0 controls other than LF (the line break the CLI itself writes), DEL and C1.
// eslint-disable-next-line no-control-regex -- control characters are what this test looks for
const RAW_CONTROL = /[\u0000-\u0009\u000B-\u001F\u007F-\u009F]/;

describe('control characters from YAML escapes never reach the terminal', () => {
  const payloads: [string, string, string][] = [
    ['window title (OSC 0)', String.raw`"\e]0;owned\a"`, String.raw`\e]0;owned\a`],
    ['clipboard (OSC 52)', String.raw`"\e]52;c;aGk=\a"`, String.raw`\e]52;c;aGk=\a`],
    ['a faked CI line (erase line, carriage return)', String.raw`"x\e[2K\rFAKE: 0 errors"`, String.raw`x\e[2K\rFAKE: 0 errors`],
  ];

  it.each(payloads)('%s in the title and a mirror name is written escaped', (_what, yaml, shown) => {
    const spec = RAZAVI.replace('title: Razavi level-1 check device', `title: ${yaml}`)
      .replace('  - name: copy', `  - name: ${yaml}\n    require: { ratio: 2 }`);
    const r = qpoint(['check', '-'], spec);
    expect(r.stdout).not.toMatch(RAW_CONTROL);
    expect(r.stderr).not.toMatch(RAW_CONTROL);
    // The title line, the mirror's block and the finding that names it show the escaped text.
    expect(r.stdout).toContain(`<stdin> — ${shown}`);
    expect(r.stdout).toContain(`${shown}  simple nmos`);
    expect(r.stdout.split('\n').filter((l) => l.includes('ratio-error'))).toHaveLength(1);
    // JSON carries the string itself (RFC 8259 escapes it), so machines read what was written.
    const json = JSON.parse(qpoint(['check', '-', '--format', 'json'], spec).stdout) as { files: { title: string }[] };
    expect(json.files[0].title).toBe(JSON.parse(yaml.replace(/\\e/g, '\\u001b').replace(/\\a/g, '\\u0007')));
  });

  it('escapes the mirror name a sweep prints', () => {
    const spec = RAZAVI.replace('  - name: copy', String.raw`  - name: "c\e]0;t\a"`);
    const r = qpoint(['sweep', '-', '--mirror', 'nope', '--vout', '1:1.2:0.1'], spec);
    expect(r.code).toBe(2);
    expect(r.stderr).toContain(String.raw`c\e]0;t\a`);
    expect(r.stderr).not.toMatch(RAW_CONTROL);
  });
});

describe('a byte-order mark does not shift line 1', () => {
  // `format: 2` is an error at its value on line 1 (0-based line 0), column 9 (0-based 8).
  const plain = RAZAVI.replace(/^(#.*\n)+/, '').replace('format: 1', 'format: 2');
  const withBom = `\uFEFF${plain}`;

  it('text: file:1:9 with and without the mark', () => {
    for (const text of [plain, withBom]) {
      const line = qpoint(['check', '-'], text).stdout.split('\n').find((l) => l.startsWith('<stdin>:1:'));
      expect(line).toMatch(/^<stdin>:1:9: error /);
    }
  });

  it('JSON: range starts at character 8 of line 0', () => {
    for (const text of [plain, withBom]) {
      const doc = JSON.parse(qpoint(['check', '-', '--format', 'json'], text).stdout) as { files: { findings: { range: { start: { line: number; character: number } } }[] }[] };
      expect(doc.files[0].findings[0].range.start).toEqual({ line: 0, character: 8 });
    }
  });

  it('SARIF: region starts at line 1, column 9', () => {
    for (const text of [plain, withBom]) {
      const log = JSON.parse(qpoint(['check', '-', '--format', 'sarif'], text).stdout) as
        { runs: { results: { locations: { physicalLocation: { region: { startLine: number; startColumn: number } } }[] }[] }[] };
      const region = log.runs[0].results[0].locations[0].physicalLocation.region;
      expect([region.startLine, region.startColumn]).toEqual([1, 9]);
    }
  });
});
