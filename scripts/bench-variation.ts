/**
 * Timings of the variation and sizing passes, for `npm run bench` (the lead's bench script calls
 * benchVariation and prints the rows). Target: 10 000 Monte Carlo samples of a cascode mirror
 * in ≤ 100 ms single-threaded.
 */
import { runCorners } from '../src/core/variation/corners';
import { runMonteCarlo } from '../src/core/variation/montecarlo';
import { applyDesignTargets } from '../src/core/design/auto-size';
import type { CornerSpec, DeviceSize, ResolvedSpec, TemplateKind, TemplateMirror } from '../src/core/types';
import { KINDS, referenceRoles } from '../src/core/kinds/index';
import { HALDEN_NMOS, HALDEN_PMOS } from './spec-texts';

const CORNERS: CornerSpec[] = [
  { name: 'ss', path: ['corners', 'ss'], nmos: { vt0: { add: 0.05 }, kp: { scale: -0.1 } }, pmos: { vt0: { add: 0.05 }, kp: { scale: -0.1 } }, temperature: 398.15, vdd: 1.62 },
  { name: 'ff', path: ['corners', 'ff'], nmos: { vt0: { add: -0.05 }, kp: { scale: 0.1 } }, pmos: { vt0: { add: -0.05 }, kp: { scale: 0.1 } }, temperature: 233.15, vdd: 1.98 },
  { name: 'sf', path: ['corners', 'sf'], nmos: { vt0: { add: 0.05 } }, pmos: { vt0: { add: -0.05 } } },
  { name: 'fs', path: ['corners', 'fs'], nmos: { vt0: { add: -0.05 } }, pmos: { vt0: { add: 0.05 } } },
];

function templateMirror(kind: TemplateKind, size: DeviceSize, vout: number, extra: Partial<TemplateMirror> = {}): TemplateMirror {
  const out = KINDS[kind].outputRoles;
  const ref = referenceRoles(kind);
  return {
    kind, name: kind, type: 'nmos', input: { kind: 'current', i: 10e-6 },
    devices: Object.fromEntries(ref.map((r) => [r, { ...size }])),
    outputs: [{ name: kind, output: { v: vout }, require: { ratio: 1 }, path: ['mirrors', 0], devices: Object.fromEntries(out.map((r) => [r, { ...size }])) }],
    path: ['mirrors', 0],
    ...extra,
  };
}

function specOf(m: TemplateMirror): ResolvedSpec {
  return {
    format: 1,
    process: { model: 'square-law', tnom: 300.15, temperature: 300.15, grid: 10e-9, nmos: HALDEN_NMOS, pmos: HALDEN_PMOS },
    supplies: { vdd: 1.8, vss: 0 },
    limits: { margin: 0.1, error: 0.01, sourceHeadroom: 0.2, tolerance: 0.05 },
    params: {}, mirrors: [m], corners: CORNERS,
  };
}

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  const k = s.length >> 1;
  return s.length % 2 ? s[k]! : 0.5 * (s[k - 1]! + s[k]!);
}

function time(runs: number, f: () => void): number {
  f(); // warm-up: JIT and caches
  const t: number[] = [];
  for (let i = 0; i < runs; i++) {
    const t0 = performance.now();
    f();
    t.push(performance.now() - t0);
  }
  return median(t);
}

export function benchVariation(): { name: string; medianMs: number }[] {
  const unit: DeviceSize = { w: 4e-6, l: 1e-6, m: 1, bulk: 'rail' };
  const cascode = specOf(templateMirror('cascode', unit, 0.9));
  const wide = specOf(templateMirror('wide-swing', unit, 0.6));
  const auto: DeviceSize = { ...unit, auto: { w: true, l: true } };
  const sizing = specOf(templateMirror('cascode', auto, 0.9, { design: { kind: 'vov', value: 0.15 } }));
  (sizing.mirrors[0] as TemplateMirror).outputs[0]!.require = { ratio: 4, rout: 50e6 };
  const ctx = (s: ResolvedSpec) => ({ spec: s, mirror: s.mirrors[0]!, outputIndex: 0 });
  return [
    { name: 'monte carlo, cascode, 10 000 samples', medianMs: time(7, () => runMonteCarlo(ctx(cascode), 10_000, 1)) },
    { name: 'monte carlo, wide-swing, 10 000 samples', medianMs: time(5, () => runMonteCarlo(ctx(wide), 10_000, 1)) },
    { name: 'corners, cascode, 4 corners', medianMs: time(20, () => runCorners(cascode, 0, 0)) },
    { name: 'auto sizing, cascode, W and L (rout)', medianMs: time(10, () => applyDesignTargets(sizing)) },
  ];
}
