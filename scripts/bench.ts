/**
 * Engine benchmark: times analyzeSpec on a representative spec (every kind, both polarities,
 * plus netlists) and on a generated 500-mirror spec, on the invented "Halden 180" process.
 * Prints medians; `--json` prints one JSON object instead. Targets (brief): one mirror's full
 * analysis ≤ 50 µs median, 500 mirrors ≤ 50 ms median.
 *
 *   npm run bench              # build, then node dist/bench.js
 *   node dist/bench.js --json [--runs N]
 *
 * Each timed run analyses a fresh deep copy of the spec, so nothing cached on the spec objects
 * (the wide-swing bias pick) is reused between runs; the copy is made outside the timing.
 * Figures are steady state after a warm-up; the first, cold analysis is printed too.
 */
import { analyzeSpec } from '../src/core/analysis/index';
import type {
  DeviceParams, DeviceSize, MirrorOutput, NetlistMirror, Polarity, ResolvedMirror, ResolvedSpec,
  TemplateKind, TemplateMirror,
} from '../src/core/types';
import { OUTPUT_ROLES, ROLES } from '../src/core/types';

const HALDEN_N: DeviceParams = {
  kp: 280e-6, vt0: 0.45, lambda: 0.08, lref: 1e-6, gamma: 0.45, phi: 0.85, n: 1.3, tcv: -1e-3, bex: -1.5,
  avt: 4e-9, abeta: 1e-8, lmin: 0.18e-6, wmin: 0.22e-6,
};
const HALDEN_P: DeviceParams = {
  kp: 70e-6, vt0: 0.48, lambda: 0.1, lref: 1e-6, gamma: 0.4, phi: 0.8, n: 1.35, tcv: -1.2e-3, bex: -1.3,
  avt: 5e-9, abeta: 1.2e-8, lmin: 0.18e-6, wmin: 0.22e-6,
};
const VDD = 1.8;
const KINDS: TemplateKind[] = ['simple', 'cascode', 'wide-swing', 'wilson', 'wilson-balanced'];

function size(w: number, l: number, m = 1): DeviceSize { return { w, l, m, bulk: 'rail' }; }

function templateMirror(
  index: number, kind: TemplateKind, type: Polarity, iin: number, unit: DeviceSize, mOut: number, vout: number,
): TemplateMirror {
  const outRoles = OUTPUT_ROLES[kind];
  const refRoles = ROLES[kind].filter((r) => !outRoles.includes(r));
  const name = `${kind}-${type}-${index}`;
  const output: MirrorOutput = {
    name, output: { v: vout }, require: {}, path: ['mirrors', index],
    devices: Object.fromEntries(outRoles.map((r) => [r, r === 'out' || r === 'outc' ? { ...unit, m: mOut } : { ...unit }])),
  };
  // A Wilson's ratio is set by diode over in: scale the diode instead of out.
  const devices = Object.fromEntries(refRoles.map((r) => [r, r === 'diode' ? { ...unit, m: mOut } : { ...unit }]));
  return {
    kind, name, type, input: { kind: 'current', i: iin }, devices, outputs: [output], path: ['mirrors', index],
  };
}

function netlistMirror(index: number, type: Polarity): NetlistMirror {
  const rail = type === 'nmos' ? 'vss' : 'vdd';
  const dev = (name: string, d: string, g: string, s: string) =>
    ({ name, type, d, g, s, b: rail, w: 4e-6, l: 1e-6, m: 1 });
  return {
    kind: 'netlist', name: `netlist-${type}-${index}`, type, path: ['mirrors', index], require: {},
    devices: [dev('M1', 'a', 'a', rail), dev('M3', 'b', 'b', 'a'), dev('M2', 'c', 'a', rail), dev('M4', 'out', 'b', 'c')],
    currents: [type === 'nmos' ? { name: 'Iref', from: 'vdd', to: 'b', i: 20e-6 } : { name: 'Iref', from: 'b', to: 'vss', i: 20e-6 }],
    voltages: [], resistors: [],
    output: { node: 'out', v: type === 'nmos' ? 1.3 : 0.5 }, input: { source: 'Iref' }, pair: { ref: 'M1', out: 'M2' },
  };
}

function spec(mirrors: ResolvedMirror[]): ResolvedSpec {
  return {
    format: 1, title: 'Kestrel bias benchmark (Halden 180)',
    process: { model: 'square-law', tnom: 300.15, temperature: 300.15, nmos: HALDEN_N, pmos: HALDEN_P },
    supplies: { vdd: VDD, vss: 0 }, limits: { margin: 0.1, error: 0.01, sourceHeadroom: 0.2, tolerance: 0.05 },
    params: {}, mirrors, corners: [],
  };
}

/** Every kind in both polarities, and a netlist cascode of each polarity. */
function representative(): ResolvedSpec {
  const mirrors: ResolvedMirror[] = [];
  for (const type of ['nmos', 'pmos'] as const) {
    for (const kind of KINDS) {
      const vout = type === 'nmos' ? 1.2 : 0.6;
      mirrors.push(templateMirror(mirrors.length, kind, type, 20e-6, size(4e-6, 1e-6), 2, vout));
    }
    mirrors.push(netlistMirror(mirrors.length, type));
  }
  return spec(mirrors);
}

/** 500 template mirrors with varied kinds, polarities, currents, sizes and output voltages. */
function generated(n: number): ResolvedSpec {
  let seed = 12345;
  const rnd = (): number => { seed = (seed * 1103515245 + 12345) % 2147483648; return seed / 2147483648; };
  const mirrors: ResolvedMirror[] = [];
  for (let i = 0; i < n; i++) {
    const kind = KINDS[i % KINDS.length]!;
    const type: Polarity = i % 2 === 0 ? 'nmos' : 'pmos';
    const iin = 5e-6 * (1 + 9 * rnd());
    const l = (0.5 + 2 * rnd()) * 1e-6;
    const w = l * (4 + 16 * rnd());
    const vout = type === 'nmos' ? 1.1 + 0.5 * rnd() : 0.7 - 0.5 * rnd();
    mirrors.push(templateMirror(i, kind, type, iin, size(w, l), 1 + Math.floor(4 * rnd()), vout));
  }
  return spec(mirrors);
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
    const out = analyzeSpec(copy);
    ms.push(performance.now() - t0);
    const c = process.cpuUsage(c0);
    cpuMs.push((c.user + c.system) / 1000);
    reports = out.length;
    converged = out.filter((r) => r.converged).length;
  }
  return { ms, cpuMs, reports, converged };
}

function main(): void {
  const args = process.argv.slice(2);
  const json = args.includes('--json');
  const runsArg = args.indexOf('--runs');
  const runs = runsArg >= 0 ? Math.max(3, Number(args[runsArg + 1]) || 0) : 200;

  const rep = representative();
  const big = generated(500);
  // Warm-up: V8 needs a few thousand analyses before its optimizing tiers settle on every
  // kind; the figures below are steady-state (a first analysis is slower, see --cold).
  const t0 = performance.now();
  analyzeSpec(structuredClone(rep));
  const coldMs = performance.now() - t0;
  time(rep, 400);
  time(big, 5);

  const r = time(rep, runs);
  const perMirrorUs = r.ms.map((ms) => (ms * 1000) / r.reports);
  const perMirrorCpuUs = r.cpuMs.map((ms) => (ms * 1000) / r.reports);
  const perKind: Record<string, number> = {};
  for (const m of rep.mirrors) {
    const single = spec([{ ...structuredClone(m), path: ['mirrors', 0] }]);
    const t = time(single, Math.max(20, runs >> 1));
    perKind[m.name.replace(/-\d+$/, '')] = median(t.ms) * 1000;
  }
  const b = time(big, Math.max(5, Math.round(runs / 10)));

  const result = {
    perMirrorUs: {
      median: median(perMirrorUs), p90: quantile(perMirrorUs, 0.9), cpuMedian: median(perMirrorCpuUs),
      mirrors: r.reports, converged: r.converged,
    },
    perKindUs: perKind,
    mirrors500Ms: {
      median: median(b.ms), p90: quantile(b.ms, 0.9), cpuMedian: median(b.cpuMs), mirrors: b.reports, converged: b.converged,
    },
    targets: { perMirrorUs: 50, mirrors500Ms: 50 },
    pass: median(perMirrorUs) <= 50 && median(b.ms) <= 50,
    runs,
    coldFirstSpecMs: coldMs,
    node: process.version,
  };
  if (json) {
    console.log(JSON.stringify(result, null, 2));
    return;
  }
  const f = (x: number): string => x.toFixed(1).padStart(7);
  console.log(`qpoint engine benchmark (${runs} runs, ${process.version})`);
  console.log(`  one mirror, full analysis   median ${f(result.perMirrorUs.median)} µs   p90 ${f(result.perMirrorUs.p90)} µs   cpu ${f(result.perMirrorUs.cpuMedian)} µs   (target ≤ 50 µs; ${r.converged}/${r.reports} converged)`);
  for (const [k, v] of Object.entries(perKind)) console.log(`    ${k.padEnd(24)} ${f(v)} µs`);
  console.log(`  500 mirrors                 median ${f(result.mirrors500Ms.median)} ms   p90 ${f(result.mirrors500Ms.p90)} ms   cpu ${f(result.mirrors500Ms.cpuMedian)} ms   (target ≤ 50 ms; ${b.converged}/${b.reports} converged)`);
  console.log(`  first analysis before warm-up (${r.reports} mirrors, cold JIT): ${coldMs.toFixed(1)} ms`);
  console.log(`  ${result.pass ? 'PASS' : 'MISS'}: targets ${result.pass ? 'met' : 'not met'} (wall-clock medians)`);
}

main();
