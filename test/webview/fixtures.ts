/**
 * A hand-made FileReport for the panel's logic tests: its numbers are invented (they only have
 * to be consistent enough to lay out), and every section of the page has data — a bias bank, a
 * not-converged output, corners, Monte Carlo. The browser tests use real core reports instead.
 */
import type { CurvePoint, FileReport, MirrorReport, MosDeviceReport } from '../../src/core/types';

const r = (line: number, character: number, length = 3) => ({
  start: { line, character }, end: { line, character: character + length },
});

function device(name: string, over: Partial<MosDeviceReport> = {}): MosDeviceReport {
  return {
    name, role: name, type: 'nmos', w: 2e-6, l: 1e-6, m: 1, id: 1e-5, vgs: 0.72, vds: 0.5, vbs: 0,
    vth: 0.45, vov: 0.27, vdsat: 0.27, margin: 0.23, region: 'saturation', inversion: 'strong',
    ic: 14.2, gm: 7.4e-5, gds: 7.9e-7, gmb: 1.6e-5, ro: 1.27e6, gmId: 7.4, ...over,
  };
}

/** An invented saturating curve: zero at 0 V, then 40 µA·(1 + v/25 V) above ~0.6 V. */
function curve(points = 61, vdd = 1.8): CurvePoint[] {
  return Array.from({ length: points }, (_, i) => {
    const v = (vdd * i) / (points - 1);
    const s = Math.tanh(v / 0.2);
    const iout = 40e-6 * s * (1 + v / 25);
    const rout = i === 0 ? 5e3 : 25 / 40e-6 / Math.max(s, 1e-3) * (v < 0.6 ? v / 0.6 : 1) ** 2 + 1e4;
    return { vout: v, iout, rout, converged: i !== 3 };
  });
}

export function tailMirror(over: Partial<MirrorReport> = {}): MirrorReport {
  return {
    name: 'tail', mirror: 'tail', kind: 'cascode', type: 'nmos', converged: true, iterations: 7,
    residual: 1e-15, vout: 0.9, iin: 1e-5, iout: 4.012e-5, ratio: 4.012, ratioIdeal: 4, error: 0.003,
    errorSplit: { vds: 0.0025, body: 0.0005, geometry: 0 }, rout: 2.13e7, routApprox: 2.05e7,
    compliance: 0.5834, sigma: 0.0029, nodes: { A: 0.72, B: 1.47, C: 0.5 },
    devices: [
      device('ref'), device('refc', { vbs: 0.72, vth: 0.58 }),
      device('out', { m: 4, id: 4.012e-5, sized: true }), device('outc', { m: 4, id: 4.012e-5, vds: 0.4, margin: 0.05 }),
    ],
    path: ['mirrors', 0], mirrorIndex: 0, outputIndex: 0, require: { ratio: 4, rout: 2e7, compliance: 0.6, sigma: 0.003 },
    curve: curve(),
    corners: [
      { name: 'slow-cold', converged: true, iin: 1e-5, iout: 4.03e-5, ratio: 4.03, error: 0.0075, rout: 1.9e7, compliance: 0.66, sigma: 0.0033, minMargin: 0.02, minMarginDevice: 'outc' },
      { name: 'fast-hot', converged: true, iin: 1e-5, iout: 4.0e-5, ratio: 4.0, error: 0.0001, rout: 2.4e7, compliance: 0.58, sigma: 0.0029, minMargin: 0.09, minMarginDevice: 'outc' },
    ],
    mc: {
      samples: 200, seed: 7, mean: 4.011e-5, sigma: 0.0032, min: 3.97e-5, max: 4.05e-5, yield: 0.965,
      histogram: { edges: [3.97e-5, 3.99e-5, 4.01e-5, 4.03e-5, 4.05e-5], counts: [20, 80, 75, 25] },
    },
    ...over,
  };
}

export function bankOutput(name: string, j: number, over: Partial<MirrorReport> = {}): MirrorReport {
  return {
    name: `load.${name}`, mirror: 'load', output: name, kind: 'simple', type: 'pmos', converged: true,
    iterations: 5, residual: 1e-15, vout: 0.8, iin: 2e-5, iout: 2.05e-5, ratio: 1.025, ratioIdeal: 1,
    error: 0.025, rout: 6.1e5, routApprox: 6.0e5, compliance: 1.42, nodes: { G: 1.0 },
    devices: [
      device('ref', { type: 'pmos', id: 2e-5 }),
      device(`${name}.out`, { role: 'out', type: 'pmos', id: 2.05e-5, vds: 1.0, region: j === 1 ? 'triode' : 'saturation', margin: j === 1 ? -0.05 : 0.6 }),
    ],
    path: ['mirrors', 1, 'outputs', j], mirrorIndex: 1, outputIndex: j, require: { ratio: 1 },
    ...over,
  };
}

export function fixtureReport(): FileReport {
  return {
    file: '/srv/chips/afe.bias.yaml', parsed: true, title: 'Halden 180 sensor bias',
    mirrors: [tailMirror(), bankOutput('a', 0), bankOutput('b', 1, { converged: false, solveNote: 'Newton, source stepping' })],
    findings: [
      { severity: 'warning', code: 'low-margin', message: 'outc margin 50 mV < 100 mV', path: ['mirrors', 0, 'devices', 'outc'], range: r(14, 6, 4) },
      { severity: 'error', code: 'ratio-error', message: 'ratio 1.025 misses 1 by 2.5 % > 1 %', path: ['mirrors', 1, 'devices', 'ref', 'w'], range: r(22, 12) },
      { severity: 'error', code: 'not-saturated', message: 'b.out is in triode', path: ['mirrors', 1, 'outputs', 1, 'devices', 'out'], range: r(30, 8) },
      { severity: 'info', code: 'square-law-weak-inversion', message: 'IC 0.8', path: ['mirrors', 1, 'outputs', 0, 'devices', 'out'], range: r(27, 8) },
      { severity: 'warning', code: 'unknown-key', message: 'unknown key "tempco"', path: ['process', 'tempco'], range: r(3, 2, 6) },
    ],
    anchors: [
      { kind: 'mirror', path: ['mirrors', 0], range: r(10, 10, 4), report: 'tail' },
      { kind: 'device', path: ['mirrors', 0, 'devices', 'out'], range: r(13, 6), report: 'tail', device: 'out' },
      { kind: 'device', path: ['mirrors', 0, 'devices', 'outc'], range: r(14, 6, 4), report: 'tail', device: 'outc' },
      { kind: 'mirror', path: ['mirrors', 1], range: r(20, 10, 4), report: 'load.a' },
      { kind: 'device', path: ['mirrors', 1, 'devices', 'ref'], range: r(22, 6), report: 'load.a', device: 'ref' },
      { kind: 'output', path: ['mirrors', 1, 'outputs', 0], range: r(26, 12, 1), report: 'load.a' },
      { kind: 'output', path: ['mirrors', 1, 'outputs', 1], range: r(29, 12, 1), report: 'load.b' },
      { kind: 'device', path: ['mirrors', 1, 'outputs', 1, 'devices', 'out'], range: r(30, 8), report: 'load.b', device: 'b.out' },
    ],
  };
}
