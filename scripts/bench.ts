/**
 * qpoint benchmark, on the invented "Halden 180" process. Budgets (median, this 2-core machine):
 *   engine   one mirror's full analysis (analyzeSpec) ≤ 50 µs, over one mirror of every kind in
 *            both polarities of its family, each with an operating point (representativeText);
 *            500 such mirrors ≤ 50 ms; the example spec's engine analysis ≤ 5 ms (after 100 warm-ups: EXAMPLE_WARMUP)
 *   text     the example through analyzeText (parse + solve + rules with fix verification),
 *            clean and with faults: as fast as possible (it runs on every keystroke)
 *   cli      `node dist/cli.js check` on a clean 500-mirror file within 1.5× of the floor (Node
 *            plus the yaml package reading that file); the former 150 ms including Node
 *            start-up is retired: the floor alone is above it on this machine
 *   mc       10 000 Monte Carlo samples of a cascode ≤ 100 ms, single-threaded
 *   findings a generated spec with findings (300 mirrors of every kind, both polarities, random
 *            sizes: faultySpecText) through analyzeText, warm, ≤ 50 ms; the CLI's cost per
 *            additional mirror of such specs ≤ 200 µs; one keystroke inside one mirror of a
 *            500-mirror one, analysed with the document's cache as the editor's worker does,
 *            ≤ 20 ms warm; 10 000 Monte Carlo samples of a 20-mirror linked network ≤ 1 s (with progress); a
 *            512 KiB spec analysed in under 200 MB peak (a child process's maxRSS). Each is
 *            printed beside the engine's own cost for the same mirrors, and the text ones beside
 *            the yaml package's reading of the same text (the floor under any analysis of it)
 *   netlist  a tree of 1 000 linked mirror stages (4 002 devices) as one Newton system: shown
 *   network  a bias network of 1 000 linked mirrors (a binary tree ten levels deep, polarity
 *            alternating): its joint solve and every mirror's analysis in process ≤ 100 ms; through
 *            the CLI no dearer than the same mirrors written unlinked, each at the input current
 *            and output voltages it has in the solved tree (treeConditions)
 *   bundle   dist/extension.js minified (--production) ≤ 1.5 MB
 *   tables   the example with every device from a characterisation table ≤ 3× its square-law
 *            analysis; a 5 MB table read in < 200 ms
 * plus the parse time of a file at the size limit (512 KiB, < 1 s).
 *
 *   npm run bench                          # build, then node dist/bench.js
 *   node dist/bench.js --json [--runs N] [--quick]
 *   node dist/bench.js --only example-engine [--runs N]   # the example's engine figure alone
 *   node dist/bench.js --only network [--json] [--quick]   # the network figure alone (20 runs)
 *   node dist/bench.js --only keystroke [--runs N]         # the keystroke figure alone
 *
 * Wall-clock medians and CPU time (process.cpuUsage: counts V8's helper threads, so it errs high)
 * are both printed, with the load average: other work on the machine shows as wall > CPU.
 * Engine runs analyse a fresh deep copy of the spec each time (nothing cached on spec objects is
 * reused); the copy is made outside the timing for the per-mirror, 500-mirror, example and
 * network figures (the example's is about 0.4 ms, the 1 000-mirror network's about 10 ms), inside
 * it for the others. Figures are steady state after a warm-up; the first, cold analysis is
 * printed too.
 */
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { cpus, loadavg, tmpdir } from 'node:os';
import { join } from 'node:path';
import { parseDocument } from 'yaml';
import { analyzeSpec } from '../src/core/analysis/index';
import { YAML_OPTIONS } from '../src/core/spec/yaml-options';
import { buildMirror, solveMirror } from '../src/core/analysis/solve';
import { analyzeText } from '../src/core/analyze';
import { AnalysisCache } from '../src/core/analysis-cache';
import { parseSpec } from '../src/core/spec/index';
import { resolveText } from '../src/core/resolve';
import { runRules } from '../src/core/rules/index';
import { SPEC_LIMITS } from '../src/core/defaults';
import { benchVariation } from './bench-variation';
import { benchTables } from './bench-tables';
import { readTables } from '../src/node/tables';
import { cleanSpecText, faultyExampleText, faultySpecText, HALDEN_NMOS, HALDEN_PMOS, networkTreeText, representativeText, type TreeConditions } from './spec-texts';
import { provisionalLinks, solveNetworks } from '../src/core/network/index';
import { attachNetworks } from '../src/core/network/report';
import type { NetlistMirror, Polarity, ResolvedMirror, ResolvedSpec } from '../src/core/types';

const VDD = 1.8;

/** A netlist tree of `stages` linked mirror stages: each NMOS copy of its parent's gate feeds a
 *  PMOS diode, whose PMOS copy feeds the NMOS diode the stage's children copy (a binary tree
 *  rooted at the input diode): 4 devices and 2 nodes a stage, solved as one Newton system. */
function treeNetlist(stages: number): NetlistMirror {
  const dev = (name: string, type: Polarity, d: string, g: string, s: string) =>
    ({ name, type, d, g, s, b: type === 'nmos' ? 'vss' : 'vdd', w: 4e-6, l: 1e-6, m: 1 });
  const devices = [dev('M1', 'nmos', 'g0', 'g0', 'vss'), dev('M2', 'nmos', 'out', 'g0', 'vss')];
  for (let k = 1; k <= stages; k++) {
    const parent = `g${(k - 1) >> 1}`;
    devices.push(dev(`N${k}`, 'nmos', `p${k}`, parent, 'vss'), dev(`P${k}`, 'pmos', `p${k}`, `p${k}`, 'vdd'),
      dev(`Q${k}`, 'pmos', `g${k}`, `p${k}`, 'vdd'), dev(`D${k}`, 'nmos', `g${k}`, `g${k}`, 'vss'));
  }
  return {
    kind: 'netlist', name: 'tree', type: 'nmos', path: ['mirrors', 0], require: {}, devices,
    currents: [{ name: 'Iref', from: 'vdd', to: 'g0', i: 20e-6 }], voltages: [], resistors: [],
    output: { node: 'out', v: 1.3 }, input: { source: 'Iref' }, pair: { ref: 'M1', out: 'M2' },
  };
}

function spec(mirrors: ResolvedMirror[]): ResolvedSpec {
  return {
    format: 1, title: 'Kestrel bias benchmark (Halden 180)',
    process: { model: 'square-law', tnom: 300.15, temperature: 300.15, nmos: HALDEN_NMOS, pmos: HALDEN_PMOS },
    supplies: { vdd: VDD, vss: 0 }, limits: { margin: 0.1, error: 0.01, sourceHeadroom: 0.2, tolerance: 0.05 },
    params: {}, mirrors, corners: [],
  };
}

/** Every kind in both polarities of its family, and a netlist cascode of each polarity, each
 *  with an operating point (spec-texts.ts representativeText), read as the CLI reads it. */
function representative(): ResolvedSpec {
  return parseSpec(representativeText(), 'representative.bias.yaml').spec!;
}

/** `n` mirrors: the representative ones in turn, each with its input current (where it has one)
 *  scaled by a random factor in 0.7–1.3, so that no two are alike. */
function generated(n: number): ResolvedSpec {
  let seed = 12345;
  const rnd = (): number => { seed = (seed * 1103515245 + 12345) % 2147483648; return seed / 2147483648; };
  const rep = representative();
  const mirrors: ResolvedMirror[] = [];
  for (let i = 0; i < n; i++) {
    const m = structuredClone(rep.mirrors[i % rep.mirrors.length]!);
    m.name = `${m.name}-${i}`;
    m.path = ['mirrors', i];
    if (m.kind === 'netlist') m.currents[0]!.i *= 0.7 + 0.6 * rnd();
    else {
      if (m.input.kind === 'current') m.input.i *= 0.7 + 0.6 * rnd();
      m.outputs = m.outputs.map((o, j) => ({ ...o, path: m.outputs.length > 1 ? ['mirrors', i, 'outputs', j] : ['mirrors', i] }));
    }
    mirrors.push(m);
  }
  return { ...rep, mirrors };
}

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  const k = s.length >> 1;
  return s.length % 2 ? s[k]! : 0.5 * (s[k - 1]! + s[k]!);
}
function quantile(xs: number[], q: number): number {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.min(s.length - 1, Math.floor(q * s.length))]!;
}

/** ms per analyzeSpec call over `runs` runs, each on a fresh copy: wall clock, and the
 *  process's CPU time (steadier on a shared machine, where other processes preempt this one;
 *  it also counts V8's helper threads, so it errs high). */
function time(base: ResolvedSpec, runs: number): { ms: number[]; cpuMs: number[]; reports: number; converged: number } {
  const ms: number[] = [];
  const cpuMs: number[] = [];
  let reports = 0, converged = 0;
  for (let k = 0; k < runs; k++) {
    const copy = structuredClone(base);
    const c0 = process.cpuUsage();
    const t0 = performance.now();
    // Every mirror solved for real: the engine's own speed, not that of repeats.ts.
    const out = analyzeSpec(copy, { repeats: false });
    ms.push(performance.now() - t0);
    const c = process.cpuUsage(c0);
    cpuMs.push((c.user + c.system) / 1000);
    reports = out.length;
    converged = out.filter((r) => r.converged).length;
  }
  return { ms, cpuMs, reports, converged };
}

interface Timing { median: number; p90: number; min: number; cpuMedian: number; runs: number }

/** ms of `f` over `runs` runs after `warm` untimed ones: wall and CPU. With `setup`, each run
 *  gets what it makes, made outside the timing (an engine run's fresh copy of its spec). */
function timeFn<T = void>(runs: number, warm: number, f: (x: T) => void, setup?: () => T): Timing {
  const made = (): T => (setup ? setup() : undefined as T);
  for (let i = 0; i < warm; i++) f(made());
  const ms: number[] = [];
  const cpu: number[] = [];
  for (let i = 0; i < runs; i++) {
    const x = made();
    const c0 = process.cpuUsage();
    const t0 = performance.now();
    f(x);
    ms.push(performance.now() - t0);
    const c = process.cpuUsage(c0);
    cpu.push((c.user + c.system) / 1000);
  }
  return { median: median(ms), p90: quantile(ms, 0.9), min: Math.min(...ms), cpuMedian: median(cpu), runs };
}

function cold(f: () => void): number {
  const t0 = performance.now();
  f();
  return performance.now() - t0;
}

/** Wall ms of spawned commands, `runs` times each (the children's CPU time is not visible here). */
function spawnTiming(runs: number, argv: string[]): Timing & { status: number | null } {
  const ms: number[] = [];
  let status: number | null = null;
  for (let i = 0; i < runs; i++) {
    const t0 = performance.now();
    const r = spawnSync(process.execPath, argv, { stdio: ['ignore', 'ignore', 'pipe'], timeout: 60_000 });
    ms.push(performance.now() - t0);
    status = r.status;
  }
  return { median: median(ms), p90: quantile(ms, 0.9), min: Math.min(...ms), cpuMedian: NaN, runs, status };
}

/** A script that only reads `file` with the yaml package, bundled like the CLI bundles yaml. */
function yamlFloorScript(dir: string, file: string): string {
  const esbuild = createRequire(join(process.cwd(), 'package.json'))('esbuild') as { buildSync(o: Record<string, unknown>): unknown };
  const out = join(dir, 'yaml-floor.cjs');
  esbuild.buildSync({
    stdin: { contents: `import { parseDocument } from 'yaml'; import { readFileSync } from 'node:fs';\n` +
      `parseDocument(readFileSync(${JSON.stringify(file)}, 'utf8'), { strict: true, version: '1.2', uniqueKeys: false });`, resolveDir: process.cwd() },
    bundle: true, platform: 'node', format: 'cjs', target: 'node20', outfile: out, logLevel: 'silent',
    alias: { yaml: './node_modules/yaml/browser/index.js' },
  });
  return out;
}

/** Bytes of an entry bundled like esbuild.mjs's --production build (minified), in a temp dir. */
/** The minified size of one bundle, built as esbuild.mjs builds it for `--production`: ELK
 *  (the schematic layout, loaded from dist/elk.js on first use) stays outside the extension and
 *  the CLI, as it does in the shipped build. */
function productionSize(entry: string, external: string[], elkApart = false): number | undefined {
  try {
    const esbuild = createRequire(join(process.cwd(), 'package.json'))('esbuild') as {
      buildSync(o: Record<string, unknown>): { outputFiles?: { contents: Uint8Array }[] };
    };
    const out = esbuild.buildSync({
      entryPoints: [entry], bundle: true, minify: true, platform: 'node', format: 'cjs', target: 'node20', write: false,
      external: elkApart ? [...external, './elk.js'] : external, legalComments: 'none', logLevel: 'silent', outdir: tmpdir(),
      alias: { yaml: './node_modules/yaml/browser/index.js', ...(elkApart ? { 'elkjs/lib/elk.bundled.js': './elk.js' } : {}) },
    });
    return out.outputFiles?.[0]?.contents.length;
  } catch {
    return undefined;
  }
}

/** `--memory-probe FILE`: analyse FILE once as the editor does and print this process's peak
 *  resident memory (bytes), for the parent's memory figure. */
function memoryProbe(file: string): void {
  const text = readFileSync(file, 'utf8');
  const r = analyzeText(text, 'limit.bias.yaml');
  console.log(JSON.stringify({ maxRssBytes: process.resourceUsage().maxRSS * 1024, findings: r.findings.length, mirrors: r.mirrors.length }));
}

/** The text path with findings (issue-sized figures), each beside the engine's cost for the same mirrors. */
function findingsFigures(runs: number, quick: boolean): FindingsFigures {
  const text300 = faultySpecText(300);
  const resolved300 = resolveText(text300, 'findings.bias.yaml').parsed.spec!;
  const report300 = analyzeText(text300, 'findings.bias.yaml');
  const text300Ms = timeFn(runs, 3, () => analyzeText(text300, 'findings.bias.yaml'));
  const engine300 = timeFn(runs, 3, () => analyzeSpec(structuredClone(resolved300), { repeats: false }));
  // The floor under any analysis of that text: the yaml package reading it, as the core reads it.
  const parse300 = timeFn(runs, 3, () => parseDocument(text300, YAML_OPTIONS));
  // The same floor for the CLI's per-mirror figure: the yaml package's cost of 400 more such mirrors.
  const text100 = faultySpecText(100);
  const text500 = faultySpecText(500);
  const parse100 = timeFn(runs, 3, () => parseDocument(text100, YAML_OPTIONS));
  const parse500 = timeFn(runs, 3, () => parseDocument(text500, YAML_OPTIONS));

  const { keystroke, keystrokeStats, typed } = keystrokeFigure(runs);
  const fresh500 = timeFn(Math.max(3, runs >> 2), 1, () => analyzeText(typed(), 'findings.bias.yaml'));
  const resolved500 = resolveText(typed(), 'findings.bias.yaml').parsed.spec!;
  const engine500 = timeFn(Math.max(3, runs >> 1), 1, () => analyzeSpec(structuredClone(resolved500), { repeats: false }));
  const perMirror = (x: Timing): Timing => ({ ...x, median: x.median / 500, p90: x.p90 / 500, min: x.min / 500, cpuMedian: x.cpuMedian / 500 });
  const engineOne = perMirror(engine500);

  // Monte Carlo, 10 000 samples of a 20-mirror linked network, through analyzeText with progress.
  const text20 = networkTreeText(20);
  let progressCalls = 0;
  const mc = timeFn(quick ? 2 : 3, 1, () => analyzeText(text20, 'mc.bias.yaml', { mc: { samples: 10_000, seed: 1 }, anchors: false }, { mcProgress: () => { progressCalls++; } }));
  const mcEngine = timeFn(quick ? 2 : 3, 1, () => analyzeText(text20, 'mc.bias.yaml', { anchors: false }));

  return {
    textWithFindings: {
      mirrors: 300, findings: report300.findings.length, fixes: report300.findings.reduce((n, f) => n + (f.fixes?.length ?? 0), 0),
      analyzeText: text300Ms, engine: engine300, parse: parse300,
      parsePerAdditionalMirrorUs: ((parse500.median - parse100.median) * 1000) / 400,
    },
    keystroke: {
      mirrors: 500, cached: keystroke, fresh: fresh500, engineOneMirror: engineOne,
      unitsSolved: keystrokeStats.unitsSolved, unitsReused: keystrokeStats.unitsReused,
      rechecksRun: keystrokeStats.rechecksRun, rechecksReused: keystrokeStats.rechecksReused,
    },
    monteCarlo20: { mirrors: 20, samples: 10_000, analyzeText: mc, withoutMc: mcEngine, progressCalls: progressCalls / (mc.runs + 1) },
  };
}

/** One keystroke inside one mirror of 500: the input current of the middle mirror typed over,
 *  analysed with the document's cache (what the editor's worker keeps between analyses). */
function keystrokeFigure(runs: number): { keystroke: Timing; keystrokeStats: AnalysisCache['stats']; typed: () => string } {
  const text500 = faultySpecText(500);
  const cache = new AnalysisCache();
  analyzeText(text500, 'findings.bias.yaml', {}, { cache });
  const at = text500.indexOf('input: ', text500.indexOf('_250\n'));
  const lineEnd = text500.indexOf('\n', at);
  let k = 0;
  const typed = (): string => `${text500.slice(0, at)}input: ${20 + (k++ % 9)}u${text500.slice(lineEnd)}`;
  const keystroke = timeFn(runs, 3, () => analyzeText(typed(), 'findings.bias.yaml', {}, { cache }));
  return { keystroke, keystrokeStats: cache.stats, typed };
}

/** `--only keystroke`: the keystroke figure alone, in a fresh process (the whole bench measures
 *  it after the sections above, with their objects on the heap). */
function keystrokeOnly(runs: number): void {
  const { keystroke: x, keystrokeStats: st } = keystrokeFigure(runs);
  const f = (v: number): string => v.toFixed(2);
  console.log(`keystroke in one mirror of 500 with findings, cached: median ${f(x.median)} ms  p90 ${f(x.p90)} ms  min ${f(x.min)} ms  cpu ${f(x.cpuMedian)} ms  (≤ 20 ms; ${st.unitsSolved} solved, ${st.unitsReused} reused; ${st.rechecksRun} re-checks run, ${st.rechecksReused} reused; ${x.runs} runs, load average ${loadavg().map((v) => v.toFixed(2)).join(' ')})`);
}

interface FindingsFigures {
  textWithFindings: {
    mirrors: number; findings: number; fixes: number; analyzeText: Timing; engine: Timing;
    /** The yaml package reading the text (the floor under analyzeText), and its cost per mirror
     *  of 400 more such mirrors (the floor under the CLI's per-mirror figure). */
    parse: Timing; parsePerAdditionalMirrorUs: number;
  };
  keystroke: {
    mirrors: number; cached: Timing; fresh: Timing; engineOneMirror: Timing;
    unitsSolved: number; unitsReused: number; rechecksRun: number; rechecksReused: number;
  };
  monteCarlo20: { mirrors: number; samples: number; analyzeText: Timing; withoutMc: Timing; progressCalls: number };
}

/** "N mirrors, M outputs" of a resolved spec. */
function exampleShape(spec: ResolvedSpec): string {
  const outputs = spec.mirrors.reduce((n, m) => n + (m.kind === 'netlist' ? 1 : Math.max(1, m.outputs.length)), 0);
  return `${spec.mirrors.length} mirrors, ${outputs} outputs`;
}

/**
 * Untimed analyses of the example before its engine figure is taken. Its analysis runs many code
 * paths (every kind, bipolar and table devices, a network, drift across trange), each only a few
 * times an analysis, so V8 tiers them up over tens of analyses: the median of 20 analyses falls
 * from about 14 ms (the first 20) through 9 ms (analyses 40–59) to about 4 ms from the 60th on
 * (measured on this machine). Twenty warm-ups measured the JIT still at work; a hundred measure
 * the analysis warm, as an editor session that re-analyses the file on every edit runs it.
 */
const EXAMPLE_WARMUP = 100;

/** `--only example-engine`: the example's engine figure alone, in a fresh process (the whole bench
 *  measures it after the sections above, with their objects on the heap). */
function exampleEngineOnly(root: string, runs: number): void {
  const file = join(root, 'examples/sensor-afe.bias.yaml');
  const text = readFileSync(file, 'utf8');
  const spec = resolveText(text, 'sensor-afe.bias.yaml', { tables: readTables(file, text) }).parsed.spec!;
  const x = timeFn(Math.max(3, runs >> 1), EXAMPLE_WARMUP, (copy) => analyzeSpec(copy, { repeats: false }), () => structuredClone(spec));
  const f = (v: number): string => v.toFixed(2);
  console.log(`example spec (${exampleShape(spec)}), engine: median ${f(x.median)} ms  p90 ${f(x.p90)} ms  min ${f(x.min)} ms  cpu ${f(x.cpuMedian)} ms  (≤ 5 ms; ${x.runs} runs, load average ${loadavg().map((v) => v.toFixed(2)).join(' ')})`);
}

/** A bias network of 1 000 linked mirrors solved as one circuit, then every mirror measured:
 *  `runs` timed runs after two untimed ones, each on a fresh copy made outside the timing (as the
 *  engine figures are). */
function networkFigure(runs: number): { network: Timing; netOk: boolean } {
  const netSpec = parseSpec(networkTreeText(1000), 'network.bias.yaml').spec!;
  let netOk = false;
  const network = timeFn(runs, 2, (copy) => {
    const solved = solveNetworks(provisionalLinks(copy));
    netOk = solved.networks?.[0]?.converged === true;
    attachNetworks(solved, analyzeSpec(solved));
  }, () => structuredClone(netSpec));
  return { network, netOk };
}

/** Each mirror's conditions in the solved linked tree of `n` mirrors: the unlinked file the CLI
 *  figure compares with holds every mirror at them. */
function treeConditions(n: number): TreeConditions {
  const spec = parseSpec(networkTreeText(n), 'network.bias.yaml').spec!;
  const at: TreeConditions = { iin: [], vout: [] };
  const vout: number[][] = [];
  for (const r of analyzeSpec(solveNetworks(provisionalLinks(spec)))) {
    at.iin[r.mirrorIndex] = r.iin ?? NaN;
    (vout[r.mirrorIndex] ??= [])[r.outputIndex] = r.vout;
  }
  at.vout = vout.map((v) => [v[0]!, v[1]!] as const);
  return at;
}

function main(): void {
  const args = process.argv.slice(2);
  const probe = args.indexOf('--memory-probe');
  if (probe >= 0) { memoryProbe(args[probe + 1]!); return; }
  const json = args.includes('--json');
  const quick = args.includes('--quick');
  const only = args.indexOf('--only');
  if (only >= 0 && args[only + 1] === 'network') {
    const load = loadavg();
    const { network, netOk } = networkFigure(quick ? 3 : 20);
    const med = network.median.toFixed(1), cpu = network.cpuMedian.toFixed(1), min = network.min.toFixed(1);
    if (json) console.log(JSON.stringify({ load, network1000Ms: { converged: netOk, timing: network }, checks: { network1000Ms: netOk && network.median <= 100 } }, null, 2));
    else console.log(`bias network, 1 000 linked mirrors: joint solve + analysis median ${med} ms  min ${min} ms  cpu ${cpu} ms  (≤ 100 ms${netOk ? '' : '; did not converge'}; load average ${load.map((x) => x.toFixed(2)).join(' ')})`);
    return;
  }
  const runsArg = args.indexOf('--runs');
  const runs = runsArg >= 0 ? Math.max(3, Number(args[runsArg + 1]) || 0) : quick ? 40 : 200;
  const load0 = loadavg();
  const root = process.cwd();
  if (only >= 0 && args[only + 1] === 'example-engine') { exampleEngineOnly(root, runs); return; }
  if (only >= 0 && args[only + 1] === 'keystroke') { keystrokeOnly(runs); return; }

  // ---- engine (ResolvedSpec in, reports out) ----
  const rep = representative();
  const big = generated(500);
  // Warm-up: V8 needs a few thousand analyses before its optimizing tiers settle on every
  // kind; the figures below are steady-state (a first analysis is slower, see coldFirstSpecMs).
  const t0 = performance.now();
  analyzeSpec(structuredClone(rep), { repeats: false });
  const coldMs = performance.now() - t0;
  time(rep, 400);
  time(big, 5);

  const r = time(rep, runs);
  const perMirrorUs = r.ms.map((ms) => (ms * 1000) / r.reports);
  const perMirrorCpuUs = r.cpuMs.map((ms) => (ms * 1000) / r.reports);
  const perKind: Record<string, number> = {};
  for (const m of rep.mirrors) {
    const single: ResolvedSpec = { ...rep, mirrors: [{ ...structuredClone(m), path: ['mirrors', 0] }] };
    const t = time(single, Math.max(20, runs >> 1));
    perKind[m.name] = median(t.ms) * 1000;
  }
  const b = time(big, Math.max(5, Math.round(runs / 10)));

  // ---- a large netlist: one Newton system of thousands of unknowns (sparse LU) ----
  const tree = spec([treeNetlist(1000)]);
  const treeCtx = { spec: tree, mirror: tree.mirrors[0]!, outputIndex: 0 };
  const treeMc = buildMirror(treeCtx, 1.3, undefined);
  let treeSolve = solveMirror(treeMc);
  const large = {
    devices: treeMc.circuit.devices.length, nodes: treeMc.circuit.nFree,
    solve: timeFn(quick ? 5 : 20, 2, () => { treeSolve = solveMirror(treeMc); }),
    analysis: timeFn(quick ? 3 : 10, 1, () => analyzeSpec(structuredClone(tree), { repeats: false })),
  };

  const { network, netOk } = networkFigure(quick ? 3 : 10);

  // ---- the example and texts (parse + solve + rules with verified fixes) ----
  const exampleText = readFileSync(join(root, 'examples/sensor-afe.bias.yaml'), 'utf8');
  // The example's characterisation table, read as the CLI reads it.
  const tables = readTables(join(root, 'examples/sensor-afe.bias.yaml'), exampleText);
  const faultyText = faultyExampleText(exampleText);
  const rulesFaulty = readFileSync(join(root, 'test/rules/fixtures/faulty.bias.yaml'), 'utf8');
  const big500Text = cleanSpecText(500);
  const textCold = {
    example: cold(() => analyzeText(exampleText, 'sensor-afe.bias.yaml', { tables })),
    faultyExample: cold(() => analyzeText(faultyText, 'faulty.bias.yaml', { tables })),
  };
  const exampleSpec = resolveText(exampleText, 'sensor-afe.bias.yaml', { tables }).parsed.spec!;
  const textRuns = Math.max(10, runs >> 2);
  const faultyParsed = resolveText(faultyText, 'faulty.bias.yaml', { tables }).parsed;
  const faultyReports = analyzeSpec(faultyParsed.spec!);
  const texts = {
    exampleEngine: timeFn(textRuns * 2, EXAMPLE_WARMUP, (copy) => analyzeSpec(copy, { repeats: false }), () => structuredClone(exampleSpec)),
    exampleParse: timeFn(textRuns, 10, () => parseSpec(exampleText, 'sensor-afe.bias.yaml', { tables })),
    example: timeFn(textRuns, 10, () => analyzeText(exampleText, 'sensor-afe.bias.yaml', { tables })),
    faultyExample: timeFn(textRuns, 5, () => analyzeText(faultyText, 'faulty.bias.yaml', { tables })),
    faultyRules: timeFn(textRuns, 5, () => runRules(faultyParsed, faultyReports)),
    faultyRulesWholeFile: timeFn(textRuns, 5, () => runRules(faultyParsed, faultyReports, { reread: 'whole-file' })),
    rulesFaulty: timeFn(textRuns, 5, () => analyzeText(rulesFaulty, 'faulty.bias.yaml')),
    clean500: timeFn(Math.max(5, textRuns >> 2), 2, () => analyzeText(big500Text, 'big.bias.yaml')),
  };
  const faultyReport = analyzeText(faultyText, 'faulty.bias.yaml', { tables });
  const tableBench = benchTables(exampleSpec, timeFn, textRuns * 2);
  const faults = { findings: faultyReport.findings.length, fixes: faultyReport.findings.reduce((n, f) => n + (f.fixes?.length ?? 0), 0) };

  // A file at the size limit: one-line flow mirrors up to SPEC_LIMITS.maxChars.
  let limitText = 'format: 1\nprocess:\n  nmos: { kp: 280u, vt0: 0.45 }\nsupplies: { vdd: 1.8 }\nmirrors:\n';
  const item = (k: number) => `  - { name: m${k}, kind: simple, type: nmos, input: 10u, size: { w: 2u, l: 1u }, output: { v: 0.9 } }\n`;
  for (let k = 0; limitText.length + item(k).length < SPEC_LIMITS.maxChars; k++) limitText += item(k);
  const limit = {
    chars: limitText.length,
    parseCold: cold(() => parseSpec(limitText, 'limit.bias.yaml')),
    parse: timeFn(3, 1, () => parseSpec(limitText, 'limit.bias.yaml')),
    analyzeText: timeFn(2, 1, () => analyzeText(limitText, 'limit.bias.yaml')),
  };

  // ---- specs with findings: the text path, a keystroke, Monte Carlo of 20 mirrors ----
  const findings = findingsFigures(Math.max(5, runs >> 4), quick);

  // ---- the CLI, spawned: Node start-up, module load, a clean 500-mirror check ----
  const cli = join(root, 'dist', 'cli.js');
  const cliRuns = quick ? 5 : 15;
  let cliResult: {
    nodeStart: Timing; yamlFloor: Timing; version: Timing; check500: Timing & { status: number | null };
    check500Distinct: Timing & { status: number | null }; checkExample: Timing; chars: number;
    /** `check` of faultySpecText(100) and (500): the cost of each mirror past the first 100. */
    checkFindings100: Timing; checkFindings500: Timing; perAdditionalMirrorUs: number;
    /** A 512 KiB spec analysed in a child process: its peak resident memory. */
    limitPeakBytes: number | undefined;
    networkLinked: Timing & { status: number | null }; networkUnlinked: Timing & { status: number | null };
  } | undefined;
  if (existsSync(cli)) {
    const dir = mkdtempSync(join(tmpdir(), 'qpoint-bench-'));
    try {
      const file = join(dir, 'big.bias.yaml');
      writeFileSync(file, big500Text);
      const distinct = join(dir, 'distinct.bias.yaml');
      writeFileSync(distinct, cleanSpecText(500, { distinct: true }));
      const faulty100 = join(dir, 'faulty100.bias.yaml');
      writeFileSync(faulty100, faultySpecText(100));
      const faulty500 = join(dir, 'faulty500.bias.yaml');
      writeFileSync(faulty500, faultySpecText(500));
      const limitFile = join(dir, 'limit.bias.yaml');
      writeFileSync(limitFile, limitText);
      const checkFindings100 = spawnTiming(cliRuns, [cli, 'check', faulty100]);
      const checkFindings500 = spawnTiming(cliRuns, [cli, 'check', faulty500]);
      const probe = spawnSync(process.execPath, [join(root, 'dist', 'bench.js'), '--memory-probe', limitFile], { encoding: 'utf8', timeout: 120_000 });
      let limitPeakBytes: number | undefined;
      try { limitPeakBytes = (JSON.parse(probe.stdout) as { maxRssBytes: number }).maxRssBytes; } catch { limitPeakBytes = undefined; }
      const linkedFile = join(dir, 'network.bias.yaml');
      writeFileSync(linkedFile, networkTreeText(1000));
      const unlinkedFile = join(dir, 'unlinked.bias.yaml');
      writeFileSync(unlinkedFile, networkTreeText(1000, treeConditions(1000)));
      cliResult = {
        nodeStart: spawnTiming(cliRuns, ['-e', '0']),
        // The floor under any check of this file: Node plus the yaml package (bundled as the CLI
        // bundles it) reading it, nothing else.
        yamlFloor: spawnTiming(cliRuns, [yamlFloorScript(dir, file)]),
        version: spawnTiming(cliRuns, [cli, '--version']),
        check500: spawnTiming(cliRuns, [cli, 'check', file]),
        check500Distinct: spawnTiming(cliRuns, [cli, 'check', distinct]),
        checkExample: spawnTiming(cliRuns, [cli, 'check', join(root, 'examples/sensor-afe.bias.yaml')]),
        chars: big500Text.length,
        checkFindings100, checkFindings500,
        perAdditionalMirrorUs: ((checkFindings500.median - checkFindings100.median) * 1000) / 400,
        limitPeakBytes,
        networkLinked: spawnTiming(Math.max(3, cliRuns >> 2), [cli, 'check', linkedFile]),
        networkUnlinked: spawnTiming(Math.max(3, cliRuns >> 2), [cli, 'check', unlinkedFile]),
      };
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  }

  // ---- variation ----
  const variation = benchVariation();
  const mc = variation.find((v) => v.name.startsWith('monte carlo, cascode'));

  // ---- bundles ----
  const size = (f: string) => (existsSync(join(root, f)) ? statSync(join(root, f)).size : undefined);
  const bundles = {
    extensionDev: size('dist/extension.js'), workerDev: size('dist/worker.js'), cliDev: size('dist/qpoint-cli.js'),
    extensionProduction: productionSize(join(root, 'src/extension/extension.ts'), ['vscode'], true),
    workerProduction: productionSize(join(root, 'src/extension/worker.ts'), []),
    cliProduction: productionSize(join(root, 'src/cli/main.ts'), [], true),
  };

  const load1 = loadavg();
  const checks = {
    perMirrorUs: median(perMirrorUs) <= 50,
    mirrors500Ms: median(b.ms) <= 50,
    exampleEngineMs: texts.exampleEngine.median <= 5,
    cliColdOverFloor: cliResult ? cliResult.check500.median <= 1.5 * cliResult.yamlFloor.median : false,
    textWithFindingsMs: findings.textWithFindings.analyzeText.median <= 50,
    cliPerMirrorUs: cliResult ? cliResult.perAdditionalMirrorUs <= 200 : false,
    keystrokeMs: findings.keystroke.cached.median <= 20,
    monteCarlo20Ms: findings.monteCarlo20.analyzeText.median <= 1000,
    limitPeakBytes: cliResult?.limitPeakBytes !== undefined && cliResult.limitPeakBytes < 200 * 1024 * 1024,
    monteCarlo10kMs: mc ? mc.medianMs <= 100 : false,
    network1000Ms: netOk && network.median <= 100,
    extensionBundleBytes: bundles.extensionProduction !== undefined && bundles.extensionProduction <= 1.5e6,
    limitParseMs: limit.parse.median < 1000,
    tablesVsSquareLaw: tableBench.ratio <= 3,
    tableRead5MbMs: tableBench.readMs < 200,
  };
  const result = {
    machine: { node: process.version, cpus: cpus().length, cpu: cpus()[0]?.model, loadAverageStart: load0, loadAverageEnd: load1 },
    perMirrorUs: {
      median: median(perMirrorUs), p90: quantile(perMirrorUs, 0.9), cpuMedian: median(perMirrorCpuUs),
      mirrors: r.reports, converged: r.converged,
    },
    perKindUs: perKind,
    mirrors500Ms: {
      median: median(b.ms), p90: quantile(b.ms, 0.9), cpuMedian: median(b.cpuMs), mirrors: b.reports, converged: b.converged,
    },
    textMs: { ...texts, cold: textCold, faultyExampleFindings: faults },
    findings,
    sizeLimit: limit,
    network1000Ms: { converged: netOk, timing: network },
    largeNetlistMs: { devices: large.devices, nodes: large.nodes, converged: treeSolve.converged, solve: large.solve, analysis: large.analysis },
    cliMs: cliResult,
    variationMs: variation,
    bundleBytes: bundles,
    targets: {
      perMirrorUs: 50, mirrors500Ms: 50, exampleEngineMs: 5, cliColdOverFloor: 1.5, monteCarlo10kMs: 100, network1000Ms: 100, extensionBundleBytes: 1.5e6, limitParseMs: 1000, tablesVsSquareLaw: 3, tableRead5MbMs: 200,
      textWithFindingsMs: 50, cliPerMirrorUs: 200, keystrokeMs: 20, monteCarlo20Ms: 1000, limitPeakBytes: 200 * 1024 * 1024,
    },
    tables: tableBench,
    met: checks,
    pass: Object.values(checks).every(Boolean),
    runs,
    coldFirstSpecMs: coldMs,
  };
  if (json) {
    console.log(JSON.stringify(result, null, 2));
    return;
  }
  const f = (x: number): string => x.toFixed(1).padStart(7);
  const ok = (x: boolean): string => (x ? 'ok  ' : 'MISS');
  const t = (x: Timing): string => `median ${f(x.median)} ms  p90 ${f(x.p90)} ms  min ${f(x.min)} ms${Number.isFinite(x.cpuMedian) ? `  cpu ${f(x.cpuMedian)} ms` : ''}`;
  const kb = (n: number | undefined): string => (n === undefined ? '   n/a' : `${(n / 1024).toFixed(0).padStart(6)} KiB`);
  console.log(`qpoint benchmark (${runs} runs, ${process.version}, ${cpus().length} × ${cpus()[0]?.model ?? 'cpu'}; load average ${load0.map((x) => x.toFixed(2)).join(' ')} at start, ${load1.map((x) => x.toFixed(2)).join(' ')} at end)`);
  console.log('engine (analyzeSpec on a resolved spec)');
  console.log(`  ${ok(checks.perMirrorUs)} one mirror, full analysis   median ${f(result.perMirrorUs.median)} µs   p90 ${f(result.perMirrorUs.p90)} µs   cpu ${f(result.perMirrorUs.cpuMedian)} µs   (≤ 50 µs; ${r.converged}/${r.reports} converged)`);
  for (const [k, v] of Object.entries(perKind)) console.log(`         ${k.padEnd(24)} ${f(v)} µs`);
  console.log(`  ${ok(checks.mirrors500Ms)} 500 mirrors                 median ${f(result.mirrors500Ms.median)} ms   p90 ${f(result.mirrors500Ms.p90)} ms   cpu ${f(result.mirrors500Ms.cpuMedian)} ms   (≤ 50 ms; ${b.converged}/${b.reports} converged)`);
  console.log(`  ${ok(checks.exampleEngineMs)} example spec (${exampleShape(exampleSpec)})  ${t(texts.exampleEngine)}   (≤ 5 ms)`);
  console.log(`       first analysis before warm-up (${r.reports} mirrors, cold JIT): ${coldMs.toFixed(1)} ms`);
  console.log(`       netlist tree, ${large.devices} devices / ${large.nodes} nodes: one DC solve ${t(large.solve)}${treeSolve.converged ? '' : ' (did not converge)'}`);
  console.log(`         its full analysis (compliance search included) ${t(large.analysis)}`);
  console.log(`  ${ok(checks.network1000Ms)} bias network, 1 000 linked mirrors: joint solve + analysis ${t(network)}   (≤ 100 ms${netOk ? '' : '; did not converge'})`);
  if (cliResult) console.log(`       qpoint check of it ${t(cliResult.networkLinked)}; the same mirrors unlinked ${t(cliResult.networkUnlinked)}`);
  console.log('text (analyzeText: parse + solve + rules with verified fixes)');
  console.log(`       example, parse only              ${t(texts.exampleParse)}`);
  console.log(`       example, clean                   ${t(texts.example)}   (cold ${textCold.example.toFixed(0)} ms)`);
  console.log(`       example with faults (${faults.findings} findings, ${faults.fixes} fixes) ${t(texts.faultyExample)}   (cold ${textCold.faultyExample.toFixed(0)} ms)`);
  console.log(`         of which rules, local re-reads   ${t(texts.faultyRules)}`);
  console.log(`         rules with whole-file re-reads ${t(texts.faultyRulesWholeFile)}`);
  console.log(`       rules fixture with faults        ${t(texts.rulesFaulty)}`);
  console.log(`       clean 500 mirrors (${(big500Text.length / 1024).toFixed(0)} KiB)      ${t(texts.clean500)}`);
  console.log(`  ${ok(checks.limitParseMs)} parse at the size limit (${(limit.chars / 1024).toFixed(0)} KiB)  ${t(limit.parse)}   (cold ${limit.parseCold.toFixed(0)} ms; < 1000 ms); analyzeText median ${limit.analyzeText.median.toFixed(0)} ms`);
  const tf = findings.textWithFindings;
  const ks = findings.keystroke;
  const mc20 = findings.monteCarlo20;
  console.log(`specs with findings (generated: every kind, both polarities, random sizes)`);
  console.log(`  ${ok(checks.textWithFindingsMs)} ${tf.mirrors} mirrors, ${tf.findings} findings, ${tf.fixes} fixes: analyzeText ${t(tf.analyzeText)}   (≤ 50 ms)`);
  console.log(`         the engine on those mirrors      ${t(tf.engine)}`);
  console.log(`         the yaml package reading it      ${t(tf.parse)}   (the floor: parseDocument alone)`);
  console.log(`  ${ok(checks.keystrokeMs)} keystroke in one mirror of ${ks.mirrors}, cached ${t(ks.cached)}   (≤ 20 ms; ${ks.unitsSolved} solved, ${ks.unitsReused} reused; ${ks.rechecksRun} re-checks run, ${ks.rechecksReused} reused)`);
  console.log(`         the same text analysed fresh     ${t(ks.fresh)}`);
  console.log(`         the engine, a mirror of those 500  ${t(ks.engineOneMirror)}`);
  console.log(`  ${ok(checks.monteCarlo20Ms)} Monte Carlo, 10 000 samples, ${mc20.mirrors}-mirror network (analyzeText) ${t(mc20.analyzeText)}   (≤ 1000 ms; ${mc20.progressCalls.toFixed(0)} progress calls a run)`);
  console.log(`         the same spec without Monte Carlo ${t(mc20.withoutMc)}`);
  console.log('tables (design §11)');
  console.log(`  ${ok(checks.tablesVsSquareLaw)} example, every device from a table  median ${f(tableBench.tablesMs)} ms against ${f(tableBench.squareLawMs)} ms on the square law: ${tableBench.ratio.toFixed(2)}× (≤ 3×); CPU ${f(tableBench.tablesCpuMs)} against ${f(tableBench.squareLawCpuMs)} ms`);
  console.log(`  ${ok(checks.tableRead5MbMs)} load a ${tableBench.tableMB.toFixed(1)} MB table (disk + parse)  median ${f(tableBench.readMs)} ms, CPU ${f(tableBench.readCpuMs)} ms   (< 200 ms)`);
  if (cliResult) {
    console.log(`cli (spawned, wall clock, ${cliRuns} runs each)`);
    console.log(`       node -e 0 (Node start-up)        ${t(cliResult.nodeStart)}`);
    console.log(`       node + yaml.parseDocument (500)  ${t(cliResult.yamlFloor)}   (the floor: Node reading the file with the yaml package, cold)`);
    console.log(`       qpoint --version (+ module load) ${t(cliResult.version)}`);
    console.log(`       qpoint check example             ${t(cliResult.checkExample)}`);
    console.log(`  ${ok(checks.cliColdOverFloor)} qpoint check, clean 500 mirrors  ${t(cliResult.check500)}   (≤ 1.5 × the floor = ${(1.5 * cliResult.yamlFloor.median).toFixed(0)} ms; ${(cliResult.check500.median / cliResult.yamlFloor.median).toFixed(2)} × now; exit ${cliResult.check500.status})`);
    console.log(`       … 500 distinct mirrors          ${t(cliResult.check500Distinct)}   (no two circuits alike; exit ${cliResult.check500Distinct.status})`);
    console.log(`       check, 100 mirrors with findings ${t(cliResult.checkFindings100)}`);
    console.log(`       check, 500 mirrors with findings ${t(cliResult.checkFindings500)}`);
    console.log(`  ${ok(checks.cliPerMirrorUs)} per additional mirror (500 − 100) ${cliResult.perAdditionalMirrorUs.toFixed(0).padStart(7)} µs   (≤ 200 µs; the engine: ${f(result.perMirrorUs.median)} µs a mirror; the yaml package reading it: ${tf.parsePerAdditionalMirrorUs.toFixed(0)} µs a mirror)`);
    const mb = cliResult.limitPeakBytes === undefined ? 'n/a' : `${(cliResult.limitPeakBytes / 1048576).toFixed(0)} MB`;
    console.log(`  ${ok(checks.limitPeakBytes)} peak memory, ${(limit.chars / 1024).toFixed(0)} KiB spec analysed     ${mb}   (< 200 MB; a child process's maxRSS, Node included)`);
  } else {
    console.log(`  MISS cli: ${cli} is missing (npm run build)`);
  }
  console.log('variation');
  for (const v of variation) console.log(`  ${v === mc ? ok(checks.monteCarlo10kMs) : '    '} ${v.name.padEnd(40)} median ${f(v.medianMs)} ms${v === mc ? '   (≤ 100 ms)' : ''}`);
  console.log('bundles (dev build as on disk; production = minified like esbuild.mjs --production)');
  console.log(`  ${ok(checks.extensionBundleBytes)} dist/extension.js  dev ${kb(bundles.extensionDev)}  production ${kb(bundles.extensionProduction)}   (≤ 1.5 MB)`);
  console.log(`       dist/worker.js     dev ${kb(bundles.workerDev)}  production ${kb(bundles.workerProduction)}`);
  console.log(`       dist/qpoint-cli.js dev ${kb(bundles.cliDev)}  production ${kb(bundles.cliProduction)}`);
  const missed = Object.entries(checks).filter(([, v]) => !v).map(([k]) => k);
  console.log(result.pass ? 'PASS: every budget met (wall-clock medians)' : `MISS: ${missed.join(', ')} (wall-clock medians)`);
}

main();
