/**
 * The `qpoint` command as CI runs it: exit codes, text and JSON goldens, SARIF, fix, report,
 * sweep, several files per run, standard input. Physics is checked in test/analysis, test/circuit, test/models and test/kinds; here one
 * end-to-end check (YAML → CLI → numbers) is held against a published-formula value.
 * Goldens: test/cli/golden/*; regenerate with UPDATE_GOLDEN=1 after an intended change.
 */
import { describe, it, expect, beforeAll } from 'vitest';
import { spawnSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import { copyFileSync, existsSync, mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { build } from 'esbuild';

const ROOT = join(__dirname, '..', '..');
const OUT = mkdtempSync(join(tmpdir(), 'qpoint-cli-'));
const CLI = join(OUT, 'cli.js');
const EXAMPLE = 'examples/sensor-afe.bias.yaml';
const FAULTY = 'test/rules/fixtures/faulty.bias.yaml';
const RAZAVI = 'test/cli/fixtures/razavi-d.bias.yaml';

function qpoint(args: string[], input?: string): { code: number; stdout: string; stderr: string } {
  const r = spawnSync(process.execPath, [CLI, ...args], { cwd: ROOT, input, encoding: 'utf8', timeout: 60_000 });
  return { code: r.status ?? -1, stdout: r.stdout, stderr: r.stderr };
}

function golden(name: string, actual: string): void {
  const path = join(ROOT, 'test', 'cli', 'golden', name);
  if (process.env.UPDATE_GOLDEN || !existsSync(path)) writeFileSync(path, actual);
  expect(actual).toBe(readFileSync(path, 'utf8'));
}

/** JSON with numbers rounded to 6 significant digits: stable across harmless float noise. */
function rounded(value: unknown): string {
  return JSON.stringify(value, (_k, v) => (typeof v === 'number' && Number.isFinite(v) ? Number(v.toPrecision(6)) : v), 2) + '\n';
}

beforeAll(async () => {
  // Bundle the CLI and the webview beside it, as dist/ has them, into a private folder.
  await build({ entryPoints: { cli: join(ROOT, 'src/cli/main.ts'), webview: join(ROOT, 'webview/main.ts') },
    bundle: true, outdir: OUT, logLevel: 'error', loader: { '.css': 'text' },
    platform: 'node', format: 'cjs', target: 'node20' });
}, 120_000);

describe('command line', () => {
  it('prints usage and version', () => {
    const help = qpoint(['--help']);
    expect(help.code).toBe(0);
    expect(help.stdout).toMatch(/qpoint check FILE\.\.\. \[--format text\|json\|sarif\]/);
    const pkg = JSON.parse(readFileSync(join(ROOT, 'package.json'), 'utf8')) as { version: string };
    expect(qpoint(['--version']).stdout.trim()).toBe(`qpoint ${pkg.version}`);
  });

  it.each([
    [['frobnicate', EXAMPLE], /unknown command 'frobnicate'/],
    [['check'], /'check' needs a FILE/],
    [['check', EXAMPLE, '--format', 'xml'], /--format must be text, json or sarif/],
    [['check', EXAMPLE, '--html', 'x.html'], /option --html does not apply to 'check'/],
    [['check', EXAMPLE, '--mc', '2.5'], /--mc takes a whole number/],
    [['sweep', EXAMPLE, '--mirror', 'tail.lna', '--vout', '1:0:0.1'], /--vout takes FROM:TO:STEP/],
  ])('exits 2 on a wrong command line: %j', (args, message) => {
    const r = qpoint(args as string[]);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(message as RegExp);
  });
});

describe('check', () => {
  it('passes the bundled example (text golden)', () => {
    const r = qpoint(['check', EXAMPLE]);
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(/First-order hand-analysis models/);
    golden('example.txt', r.stdout);
  });

  it('prints the JSON contract of design §5 (golden)', () => {
    const r = qpoint(['check', EXAMPLE, '--format', 'json']);
    expect(r.code).toBe(0);
    const doc = JSON.parse(r.stdout) as { format: number; files: { file: string; mirrors: Record<string, unknown>[]; findings: unknown[] }[] };
    expect(doc.format).toBe(1);
    expect(doc.files[0]!.file).toBe(EXAMPLE);
    const fields = ['name', 'kind', 'type', 'converged', 'iin', 'iout', 'ratio', 'ratioIdeal', 'error', 'rout', 'compliance', 'sigma', 'devices'];
    for (const m of doc.files[0]!.mirrors) for (const f of fields) expect(m, `${String(m.name)}.${f}`).toHaveProperty(f);
    const kinds = new Set(doc.files[0]!.mirrors.map((m) => `${String(m.kind)}/${String(m.type)}`));
    expect(kinds).toEqual(new Set(['cascode/nmos', 'simple/pmos', 'wide-swing/nmos', 'wilson/nmos', 'wilson-balanced/pmos', 'simple/nmos', 'beta-multiplier/nmos', 'vgs-resistor/nmos', 'vgs-resistor/pmos', 'netlist/nmos', 'beta-helper/npn', 'widlar/npn', 'vbe-resistor/npn', 'ptat/npn']));
    // A bipolar device reports its own family's fields (design §10).
    const bjt = (doc.files[0]!.mirrors.find((m) => m.kind === 'widlar')!.devices as Record<string, unknown>[])[0]!;
    for (const f of ['name', 'role', 'type', 'area', 'm', 'ic', 'ib', 'vbe', 'vce', 'margin', 'region', 'gm', 'rpi', 'ro', 'beta']) expect(bjt).toHaveProperty(f);
    expect(bjt.region).toBe('forward-active');
    const device = (doc.files[0]!.mirrors[0]!.devices as Record<string, unknown>[])[0]!;
    for (const f of ['name', 'role', 'type', 'w', 'l', 'm', 'id', 'vgs', 'vds', 'vbs', 'vth', 'vov', 'vdsat', 'margin', 'region', 'inversion', 'ic', 'gm', 'gds', 'gmb', 'ro', 'gmId']) {
      expect(device).toHaveProperty(f);
    }
    golden('example.json', rounded(doc));
  });

  it('reproduces the simple-mirror output current of the Razavi check device end to end', () => {
    // docs/references.md §9 (C, square law of §2 with the diode's own (1+λVDS)):
    // IOUT at VOUT = 1.5 V = 103.9103 µA. Razavi parameter set from memory.
    const r = qpoint(['check', RAZAVI, '--format', 'json']);
    const m = (JSON.parse(r.stdout) as { files: { mirrors: { iout: number; devices: { vgs: number }[] }[] }[] }).files[0]!.mirrors[0]!;
    expect(m.iout * 1e6).toBeCloseTo(103.9103, 3);
    expect(m.devices[0]!.vgs).toBeCloseTo(1.067234, 5);   // diode VGS with CLM, references §2
  });

  it('exits 2 on a YAML syntax error, naming its line and column', () => {
    const r = qpoint(['check', '-'], 'format: 1\nprocess:\n  nmos: { kp: 280u, vt0: 0.45\n  pmos: {kp: 70u}\n');
    expect(r.code).toBe(2);
    expect(r.stdout).toMatch(/^<stdin>:4:3: error yaml-syntax: /m);
  });

  it('exits 1 on a current in a length field, at that value', () => {
    const text = readFileSync(join(ROOT, RAZAVI), 'utf8').replace('size: { w: 10u,', 'size: { w: 10uA,');
    const r = qpoint(['check', '-'], text);
    expect(r.code).toBe(1);
    expect(r.stdout).toMatch(/^<stdin>:17:16: error bad-unit: `w` is a length \(m\); got a current `10uA`$/m);
  });

  it('refuses an expression that reaches outside arithmetic, at its value', () => {
    // mathjs security documentation (mathjs.org/docs/expressions/security.html): import and
    // evaluate are the classic ways out; qpoint refuses them before evaluation.
    const text = readFileSync(join(ROOT, RAZAVI), 'utf8').replace('input: 100u', 'input: evaluate("1")');
    const r = qpoint(['check', '-'], text);
    expect(r.code).toBe(1);
    expect(r.stdout).toMatch(/^<stdin>:16:12: error refused-expression: /m);
  });

  it('reports every file of a run, one bad file stopping none', () => {
    const r = qpoint(['check', 'no/such.bias.yaml', RAZAVI, FAULTY, '--format', 'json']);
    expect(r.code).toBe(2);
    const doc = JSON.parse(r.stdout) as { files: { file: string; findings: { code: string; severity: string }[]; mirrors: unknown[] }[] };
    expect(doc.files.map((f) => f.file)).toEqual(['no/such.bias.yaml', RAZAVI, FAULTY]);
    expect(doc.files[0]!.findings[0]!.code).toBe('unreadable-file');
    expect(doc.files[1]!.mirrors.length).toBe(1);
    expect(doc.files[2]!.findings.some((f) => f.severity === 'error')).toBe(true);
  });

  it('writes SARIF 2.1.0 with 1-based regions', () => {
    const r = qpoint(['check', FAULTY, '--format', 'sarif']);
    expect(r.code).toBe(1);
    const log = JSON.parse(r.stdout) as { version: string; runs: { results: { ruleId: string; locations: { physicalLocation: { region: { startLine: number } } }[] }[] }[] };
    expect(log.version).toBe('2.1.0');
    const json = JSON.parse(qpoint(['check', FAULTY, '--format', 'json']).stdout) as { files: { findings: { code: string; range: { start: { line: number } } }[] }[] };
    const first = json.files[0]!.findings[0]!;
    const result = log.runs[0]!.results.find((x) => x.ruleId === first.code)!;
    expect(result.locations[0]!.physicalLocation.region.startLine).toBe(first.range.start.line + 1);
  });
});

describe('fix, report, sweep', () => {
  it('fix without --apply prints a diff and leaves the file alone', () => {
    const before = readFileSync(join(ROOT, FAULTY), 'utf8');
    const r = qpoint(['fix', FAULTY]);
    expect(r.stdout).toMatch(/^--- a\//m);
    expect(r.stdout).toMatch(/^\+\+\+ b\//m);
    expect(readFileSync(join(ROOT, FAULTY), 'utf8')).toBe(before);
  });

  it('fix --apply removes every error and keeps every comment', () => {
    const copy = join(OUT, 'faulty.bias.yaml');
    copyFileSync(join(ROOT, FAULTY), copy);
    const comments = (t: string) => t.split('\n').map((l) => l.match(/#.*$/)?.[0]).filter(Boolean);
    const before = readFileSync(copy, 'utf8');
    const r = qpoint(['fix', copy, '--apply']);
    expect(r.code).toBe(0);
    const after = readFileSync(copy, 'utf8');
    expect(after).not.toBe(before);
    expect(comments(after)).toEqual(comments(before));
    expect(qpoint(['check', copy]).code).toBe(0);
  });

  it('fix --corners fixes a corner finding (verified at every corner) that plain fix does not see', () => {
    // A 1:1 sink at 0.22 V: saturated nominally, in triode at the slow, hot corner (test/variation/corner-fixes.test.ts).
    const spec = readFileSync(join(ROOT, FAULTY), 'utf8').split('mirrors:')[0] + [
      'mirrors:', '  - name: sink', '    kind: simple', '    type: nmos', '    input: 10u', '    size: { w: 2u, l: 1u }', '    output: { v: 0.22 }',
      'corners:', '  ss: { nmos: { vt0: +50m, kp: -10% }, pmos: { vt0: +50m, kp: -10% }, temperature: 125 C, vdd: 1.62 }', ''].join('\n');
    const file = join(OUT, 'corner.bias.yaml');
    writeFileSync(file, spec.replace('  error: 1%', '  error: 5%'));
    const plain = qpoint(['fix', file]);
    expect(plain.stdout).not.toMatch(/corner-/);
    const r = qpoint(['fix', file, '--corners']);
    expect(r.stdout).toMatch(/^fixed corner-not-saturated: Widen the mirror ×[\d.]+ .* \(verified at every corner\)$/m);
    expect(r.code).toBe(0);
    expect(qpoint(['fix', file, '--corners', '--apply']).code).toBe(0);
    expect(qpoint(['check', file, '--corners']).stdout).not.toMatch(/error corner-/);
  });

  it('fix names what it could not fix', () => {
    // A resistor input with 0.1 V across it: no size makes room (findings.test.ts row).
    const spec = readFileSync(join(ROOT, FAULTY), 'utf8').split('mirrors:')[0].replace('vdd: 1.8', 'vdd: 1.2') + [
      'mirrors:', '  - name: tail', '    kind: cascode', '    type: nmos', '    input: { resistor: 100k }', '    size: { w: 2u, l: 1u }', '    output: { v: 1.0 }', ''].join('\n');
    const file = join(OUT, 'headroom.bias.yaml');
    writeFileSync(file, spec);
    const r = qpoint(['fix', file]);
    expect(r.code).toBe(1);
    expect(r.stdout).toMatch(/^not fixed input-headroom at .*headroom\.bias\.yaml:\d+:\d+: no verified fix$/m);
  });

  it('fix on a spec with an error in one mirror says why it fixes nothing and changes nothing', () => {
    const copy = join(OUT, 'typo.bias.yaml');
    const text = readFileSync(join(ROOT, FAULTY), 'utf8');
    const typo = text.replace('    kind: wilson\n', '    kind: wilsn\n');
    expect(typo).not.toBe(text);
    writeFileSync(copy, typo);
    const r = qpoint(['fix', copy, '--apply']);
    expect(r.code).toBe(1);
    expect(r.stdout).toMatch(/^nothing fixed: fixes are offered once the spec has no errors; fix this error first$/m);
    expect(r.stdout).toMatch(/error bad-value: `kind` must be one of/);
    // Only what blocks is listed; the other mirrors' findings (the faulty fixture's physics
    // errors) are counted and left to `qpoint check`.
    expect(r.stdout.split('\n').filter((l) => /:\d+:\d+: (error|warning|info) /.test(l))).toHaveLength(1);
    expect(r.stdout).toMatch(/^\(\d+ other findings of the solved mirrors: qpoint check .*typo\.bias\.yaml\)$/m);
    expect(readFileSync(copy, 'utf8')).toBe(typo);
    // check says which part was not solved
    const checked = qpoint(['check', copy]);
    expect(checked.code).toBe(1);
    expect(checked.stdout).toMatch(/mirror outputs checked in 1 file \(1 mirror not solved until its errors are fixed\): /);
  });

  it('fix names an absolute path as given in the diff header, never a//…', () => {
    const copy = join(OUT, 'abs-faulty.bias.yaml');
    copyFileSync(join(ROOT, FAULTY), copy);
    const r = qpoint(['fix', copy]);
    expect(r.stdout).toContain(`--- ${copy}\n+++ ${copy}\n`);
    expect(r.stdout).not.toMatch(/^--- a\/\//m);
  });

  it('report exits 0 once the page is written, errors and all, and stamps version, date and input hash', () => {
    const out = join(OUT, 'report', 'faulty.html');
    const r = qpoint(['report', FAULTY, '--html', out]);
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(/^wrote .*faulty\.html \(\d+ mirror outputs, \d+ findings, [1-9]\d* errors\)$/m);
    const html = readFileSync(out, 'utf8');
    const hash = createHash('sha256').update(readFileSync(join(ROOT, FAULTY))).digest('hex');
    expect(html).toContain(`<meta name="qpoint-input" content="sha256:${hash}">`);
    expect(html).toMatch(/<meta name="generator" content="qpoint \d+\.\d+\.\d+">/);
    expect(html).toMatch(/<meta name="date" content="\d{4}-\d\d-\d\dT\d\d:\d\d:\d\d\.\d{3}Z">/);
    expect(html).toContain('<caption>Findings in test/rules/fixtures/faulty.bias.yaml</caption>');
  });

  it('report writes one self-contained page with the report data', () => {
    const out = join(OUT, 'report', 'example.html');
    const r = qpoint(['report', EXAMPLE, '--html', out]);
    expect(r.code).toBe(0);
    const html = readFileSync(out, 'utf8');
    expect(html).toMatch(/<html/);
    expect(html).not.toMatch(/<script[^>]+src=/);
    expect(html).toMatch(/tail\.lna/);
    expect(html).toMatch(/"corners":\[\{"name":"ss"/);   // the example's corners are on the page
  });

  it('sweep agrees with check at the nominal output voltage', () => {
    const check = JSON.parse(qpoint(['check', RAZAVI, '--format', 'json']).stdout) as { files: { mirrors: { iout: number }[] }[] };
    const r = qpoint(['sweep', RAZAVI, '--mirror', 'copy', '--vout', '1:2.5:0.5', '--csv']);
    expect(r.code).toBe(0);
    const rows = r.stdout.trim().split('\n').slice(1).map((l) => l.split(',').map(Number));
    expect(rows.map((x) => x[0])).toEqual([1, 1.5, 2, 2.5]);
    expect(rows[1]![1]).toBeCloseTo(check.files[0]!.mirrors[0]!.iout, 12);
    // docs/references.md §9 (C): 99.3925 and 112.9460 µA at 1.0 and 2.5 V.
    expect(rows[0]![1]! * 1e6).toBeCloseTo(99.3925, 3);
    expect(rows[3]![1]! * 1e6).toBeCloseTo(112.946, 3);
  });

  it('sweep names the mirrors there are when NAME is unknown', () => {
    const r = qpoint(['sweep', EXAMPLE, '--mirror', 'nope', '--vout', '0:1:0.5']);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/no mirror 'nope'.*tail\.lna, tail\.mixer/);
  });
});
