/**
 * Engine behaviour across the spec's features: bias banks, resistor input, netlists, sweeps,
 * EKV mirrors, report fields. Checks are against closed-form square-law results (references
 * §2, §9) or against an independent route through the engine (template vs netlist).
 */
import { describe, expect, it } from 'vitest';
import { analyzeSpec, measureMirror, solveAt, sweepVout } from '../../src/core/analysis/index';
import type { MirrorReport, NetlistMosDevice } from '../../src/core/types';
import { ctxOf, makeSpec, netlist, sz, template } from './builders';

const rel = (a: number, b: number): number => Math.abs(a / b - 1);
const U = { w: 10e-6, l: 1e-6, m: 1 };

describe('bias banks', () => {
  const bank = () => makeSpec([template('cascode', {
    name: 'tail', vout: 0, outputs: [
      { name: 'o1', v: 2.0 },
      { name: 'o2', v: 2.6, devices: { out: { m: 2 }, outc: { m: 2 } } },
      { name: 'o3', v: 1.8, devices: { out: { m: 4 }, outc: { m: 4 } } },
    ],
  })]);
  it('one report per output, named mirror.output, with the output path', () => {
    const reports = analyzeSpec(bank());
    expect(reports.map((r) => r.name)).toEqual(['tail.o1', 'tail.o2', 'tail.o3']);
    expect(reports.map((r) => r.output)).toEqual(['o1', 'o2', 'o3']);
    expect(reports[1]!.path).toEqual(['mirrors', 0, 'outputs', 1]);
    expect(reports[1]!.devices.map((d) => d.name)).toEqual(['ref', 'refc', 'o2.out', 'o2.outc']);
    expect(reports[1]!.devices[2]!.role).toBe('out');
  });
  it('shared reference nodes are identical whichever output is measured (gates draw no current)', () => {
    const reports = analyzeSpec(bank());
    for (const r of reports) {
      expect(r.nodes.a).toBeCloseTo(reports[0]!.nodes.a!, 12);
      expect(r.nodes.b).toBeCloseTo(reports[0]!.nodes.b!, 12);
    }
    // The other outputs sit at their own nominal voltages.
    expect(reports[0]!.nodes['o2.out']).toBe(2.6);
    expect(reports[0]!.nodes['o3.out']).toBe(1.8);
  });
  it('ratioIdeal is m·W/L of each output over ref; error small for a cascode', () => {
    const reports = analyzeSpec(bank());
    expect(reports.map((r) => r.ratioIdeal)).toEqual([1, 2, 4]);
    for (const r of reports) expect(Math.abs(r.error!)).toBeLessThan(0.01);
    // Measuring o3 alone equals measuring it inside the bank.
    const alone = measureMirror(ctxOf(makeSpec([template('cascode', { vout: 1.8, devices: { out: { m: 4 }, outc: { m: 4 } } })])));
    expect(rel(reports[2]!.iout, alone.iout)).toBeLessThan(1e-9);
    expect(rel(reports[2]!.rout, alone.rout)).toBeLessThan(1e-6);
    expect(Math.abs(reports[2]!.compliance - alone.compliance)).toBeLessThan(2e-5);
  });
  it('perturbations are keyed by the bank device names', () => {
    const spec = bank();
    const ctx = { spec, mirror: spec.mirrors[0]!, outputIndex: 1 };
    const a = solveAt(ctx, 2.6);
    const b = solveAt(ctx, 2.6, { dvt: { 'o2.out': 0.01 }, dbeta: {} });
    const c = solveAt(ctx, 2.6, { dvt: { 'o1.out': 0.01 }, dbeta: {} });
    expect(b.iout).toBeLessThan(a.iout * 0.99);
    expect(c.iout).toBeCloseTo(a.iout, 15);
  });
  it('wide-swing bank: one picked vbias for every output', () => {
    const spec = makeSpec([template('wide-swing', { vout: 0, outputs: [{ name: 'p', v: 2 }, { name: 'q', v: 1.2, devices: { out: { m: 3 }, outc: { m: 3 } } }] })]);
    const [p, q] = analyzeSpec(spec);
    expect(p!.vbiasPicked).toBe(true);
    expect(q!.vbias).toBe(p!.vbias);
    expect(p!.devices.find((d) => d.name === 'ref')!.margin).toBeCloseTo(0.1, 6);
  });
});

describe('resistor input', () => {
  it('iin = (vdd − VGS)/R for a simple NMOS mirror, and the diode carries it', () => {
    const r = measureMirror(ctxOf(makeSpec([template('simple', { input: { resistor: 22e3 }, vout: 2 })])));
    expect(r.converged).toBe(true);
    expect(rel(r.iin!, (3.3 - r.nodes.a!) / 22e3)).toBeLessThan(1e-12);
    expect(rel(r.devices[0]!.id!, r.iin!)).toBeLessThan(1e-7);
    // Closed form: β/2·(VGS − VT)²·(1 + λVGS) = (vdd − VGS)/R.
    const vgs = r.nodes.a!;
    expect(rel(((134e-6 * 10) / 2) * (vgs - 0.7) ** 2 * (1 + 0.1 * vgs), (3.3 - vgs) / 22e3)).toBeLessThan(1e-7);
  });
  it('PMOS: the resistor runs from the input node to vss', () => {
    const r = measureMirror(ctxOf(makeSpec([template('cascode', { type: 'pmos', input: { resistor: 50e3 }, vout: 1 })])));
    expect(r.converged).toBe(true);
    expect(rel(r.iin!, r.nodes.b! / 50e3)).toBeLessThan(1e-12);
    expect(r.iout).toBeGreaterThan(0);
  });
});

describe('netlist mirrors', () => {
  const dev = (name: string, d: string, g: string, s: string, b = 'vss', extra: Partial<NetlistMosDevice> = {}): NetlistMosDevice =>
    ({ name, type: 'nmos', d, g, s, b, ...U, ...extra });
  it('a netlist cascode equals the cascode template (iout, rout, compliance, sigma)', () => {
    const coeff = { avt: 5e-9, abeta: 1e-8 };
    const spec = makeSpec([netlist({
      name: 'n', type: 'nmos',
      devices: [dev('M1', 'a', 'a', 'gnd'), dev('M3', 'b', 'b', 'a'), dev('M2', 'c', 'a', '0'), dev('M4', 'out', 'b', 'c')],
      currents: [{ name: 'Iref', from: 'vdd', to: 'b', i: 100e-6 }],
      output: { node: 'out', v: 2.2 }, input: { source: 'Iref' }, pair: { ref: 'M1', out: 'M2' },
    })], { nmos: coeff });
    const n = measureMirror(ctxOf(spec));
    const t = measureMirror(ctxOf(makeSpec([template('cascode', { vout: 2.2 })], { nmos: coeff })));
    expect(n.converged).toBe(true);
    expect(rel(n.iout, t.iout)).toBeLessThan(1e-9);
    expect(rel(n.rout, t.rout)).toBeLessThan(1e-6);
    expect(Math.abs(n.compliance - t.compliance)).toBeLessThan(2e-5);
    expect(rel(n.sigma!, t.sigma!)).toBeLessThan(1e-6);
    expect(n.ratioIdeal).toBe(1);
    expect(n.error).toBeCloseTo(t.error!, 9);
    expect(n.routApprox).toBeUndefined();
    expect(n.devices.map((d) => d.name)).toEqual(['M1', 'M3', 'M2', 'M4']);
  });
  it('held voltages and resistors: a source-degenerated device with its gate held', () => {
    // M1 with 10 kΩ to vss, gate held at 1.5 V: ID = β/2·(1.5 − ID·R − VT(VSB))²·(1 + λ·VDS).
    const spec = makeSpec([netlist({
      name: 'deg', type: 'nmos',
      devices: [dev('M1', 'out', 'g', 's', 'vss', { w: 20e-6 })],
      currents: [{ name: 'I0', from: 'vdd', to: 'vss', i: 1e-6 }],
      voltages: [{ name: 'Vg', node: 'g', v: 1.5 }],
      resistors: [{ name: 'Rs', a: 's', b: 'vss', r: 10e3 }],
      output: { node: 'out', v: 3 }, input: { source: 'I0' },
    })]);
    const r = measureMirror(ctxOf(spec));
    const vs = r.nodes.s!;
    const id = vs / 10e3;
    const vt = 0.7 + 0.45 * (Math.sqrt(0.9 + vs) - Math.sqrt(0.9));
    expect(rel(id, ((134e-6 * 20) / 2) * (1.5 - vs - vt) ** 2 * (1 + 0.1 * (3 - vs)))).toBeLessThan(1e-7);
    expect(rel(r.iout, id)).toBeLessThan(1e-7);
    // Degenerated Rout = ro + Rs + (gm + gmb)·ro·Rs (exact for one device).
    const m = r.devices[0]!;
    expect(rel(r.rout, 1 / m.gds + 10e3 + ((m.gm + m.gmb!) * 10e3) / m.gds)).toBeLessThan(1e-5);
    expect(r.ratioIdeal).toBeUndefined();
  });
  it('PMOS netlist: iout is the current delivered into the output', () => {
    const p = (name: string, d: string, g: string): NetlistMosDevice => ({ name, type: 'pmos', d, g, s: 'vdd', b: 'vdd', ...U });
    const spec = makeSpec([netlist({
      name: 'pm', type: 'pmos', devices: [p('MP1', 'a', 'a'), p('MP2', 'out', 'a')],
      currents: [{ name: 'I1', from: 'a', to: 'vss', i: 40e-6 }],
      output: { node: 'out', v: 1 }, input: { source: 'I1' }, pair: { ref: 'MP1', out: 'MP2' },
    })]);
    const r = measureMirror(ctxOf(spec));
    const t = measureMirror(ctxOf(makeSpec([template('simple', { type: 'pmos', input: 40e-6, vout: 1 })])));
    expect(r.iout).toBeGreaterThan(0);
    expect(rel(r.iout, t.iout)).toBeLessThan(1e-9);
    expect(Math.abs(r.compliance - t.compliance)).toBeLessThan(2e-5);
  });
});

describe('sweeps and curves', () => {
  it('curve: 61 points vss…vdd; the simple mirror follows the square law point by point', () => {
    const r = measureMirror(ctxOf(makeSpec([template('simple', { vout: 2 })])), { curve: true });
    const c = r.curve!;
    expect(c.length).toBe(61);
    expect(c[0]!.vout).toBe(0);
    expect(c[60]!.vout).toBeCloseTo(3.3, 12);
    const beta = 134e-6 * 10, vov = r.nodes.a! - 0.7;
    for (const p of c) {
      expect(p.converged).toBe(true);
      const vds = p.vout;
      const expected = vds >= vov
        ? (beta / 2) * vov * vov * (1 + 0.1 * vds)
        : beta * (vov * vds - vds * vds / 2) * (1 + 0.1 * vds);
      expect(Math.abs(p.iout - expected)).toBeLessThan(1e-10 + 1e-7 * expected);
    }
    // Rout in saturation is 1/gds: (1/λ + VDS)/ID.
    const last = c[60]!;
    expect(rel(last.rout, (1 / 0.1 + 3.3) / last.iout)).toBeLessThan(1e-6);
  });
  it('sweepVout matches independent solves, in any order of points', () => {
    const ctx = ctxOf(makeSpec([template('wilson', { vout: 2.5 })]));
    const vs = [3.0, 0.5, 2.0, 1.2, 2.9];
    const pts = sweepVout(ctx, vs);
    pts.forEach((p, i) => {
      expect(p.vout).toBe(vs[i]);
      const op = solveAt(ctx, vs[i]!);
      expect(p.converged).toBe(op.converged);
      if (p.converged) expect(rel(p.iout, op.iout)).toBeLessThan(1e-7);
    });
  });
  it('cascode Rout from the curve collapses below the compliance (outc leaves saturation)', () => {
    const r = measureMirror(ctxOf(makeSpec([template('cascode', { vout: 2.5 })])), { curve: true });
    const above = r.curve!.find((p) => p.vout > r.compliance + 0.2)!;
    const below = r.curve!.filter((p) => p.vout < r.compliance - 0.2).at(-1)!;
    expect(above.rout / below.rout).toBeGreaterThan(20);
  });
});

describe('EKV mirrors', () => {
  it.each(['simple', 'cascode', 'wide-swing', 'wilson', 'wilson-balanced'] as const)('%s converges and mirrors within a few per cent', (kind) => {
    const r = measureMirror(ctxOf(makeSpec([template(kind, { vout: 2.5 })], { model: 'ekv' })));
    expect(r.converged).toBe(true);
    expect(Math.abs(r.ratio! - 1)).toBeLessThan(kind === 'simple' || kind === 'wilson' ? 0.15 : 0.01);
    expect(r.devices.every((d) => d.region === 'saturation')).toBe(true);
  });
  it('simple EKV mirror: ratio = (1 + λVout)/(1 + λVGS) in saturation (IR negligible)', () => {
    const r = measureMirror(ctxOf(makeSpec([template('simple', { vout: 2.5 })], { model: 'ekv' })));
    expect(rel(r.ratio!, (1 + 0.1 * 2.5) / (1 + 0.1 * r.nodes.a!))).toBeLessThan(1e-6);
  });
  it('weak inversion: gm/ID of the devices approaches 1/(n·U_T)', () => {
    const r = measureMirror(ctxOf(makeSpec([template('simple', { input: 1e-9, vout: 1.5 })], { model: 'ekv' })));
    expect(r.devices[1]!.inversion).toBe('weak');
    expect(r.devices[1]!.gmId).toBeGreaterThan(0.9 / (1.3 * 0.025852));
  });
});

describe('report fields', () => {
  const r: MirrorReport = measureMirror(ctxOf(makeSpec([template('cascode', { type: 'pmos', vout: 1.0, devices: { out: { m: 2 }, outc: { m: 2 } } })])));
  it('PMOS voltages are magnitudes (VSG, VSD, VBS) and currents positive', () => {
    for (const d of r.devices) {
      expect(d.vgs).toBeGreaterThan(0.7);
      expect(d.vds).toBeGreaterThan(0);
      expect(d.id).toBeGreaterThan(0);
      // The body bias as a magnitude too: VBS of a PMOS with its bulk at vdd (design §4).
      expect(d.vbs).toBeGreaterThanOrEqual(0);
      expect(d.type).toBe('pmos');
    }
    expect(r.iout).toBeGreaterThan(0);
    expect(r.ratioIdeal).toBe(2);
  });
  it('margin = vds − vdsat, vov = vgs − vth, ro = 1/gds, gmId = gm/id', () => {
    for (const d of r.devices) {
      expect(d.margin).toBeCloseTo(d.vds! - d.vdsat!, 14);
      expect(d.vov).toBeCloseTo(d.vgs! - d.vth!, 14);
      expect(d.ro).toBeCloseTo(1 / d.gds, 3);
      expect(d.gmId).toBeCloseTo(d.gm / d.id!, 10);
    }
  });
  it('nodes hold absolute voltages, including the rails and the output', () => {
    expect(r.nodes.vdd).toBe(3.3);
    expect(r.nodes.vss).toBe(0);
    expect(r.nodes.out).toBe(1.0);
    expect(r.vout).toBe(1.0);
    expect(r.nodes.a).toBeLessThan(3.3 - 0.8);
  });
  it('auto-sized devices are flagged in the report', () => {
    const m = template('simple', { vout: 2 });
    m.devices.ref = { ...m.devices.ref!, auto: { w: true } };
    const rep = measureMirror(ctxOf(makeSpec([m])));
    expect(rep.devices[0]!.sized).toBe(true);
    expect(rep.devices[1]!.sized).toBeUndefined();
  });
  it('operating temperature: kp(T) and VT0(T) enter the solve (mirror current at 400 K)', () => {
    const p = { tcv: -2e-3, lambda: 0 };
    const cold = measureMirror(ctxOf(makeSpec([template('simple', { vout: 2 })], { tnom: 300, temperature: 300, nmos: p })));
    const hot = measureMirror(ctxOf(makeSpec([template('simple', { vout: 2 })], { tnom: 300, temperature: 400, nmos: p })));
    // Same input current: the diode's VOV grows as sqrt(1/kp(T)), kp ∝ T^−1.5, and VT0 falls by 0.2 V.
    const vovHot = hot.devices[0]!.vov, vovCold = cold.devices[0]!.vov;
    expect(hot.devices[0]!.vth).toBeCloseTo(0.5, 9);
    expect(vovHot! / vovCold!).toBeCloseTo(Math.sqrt(1 / (400 / 300) ** -1.5), 7);   // gmin leakage: 1e-9
  });
  it('size variants: sz() builder covers m and bulk', () => {
    expect(sz(1, 2, 3, 'source')).toEqual({ w: 1, l: 2, m: 3, bulk: 'source' });
  });
});

describe('linearized Rout against re-solves', () => {
  it.each(['simple', 'cascode', 'wide-swing', 'wilson', 'wilson-balanced'] as const)('%s, both polarities, square law and EKV: Rout = ΔVout/ΔIout (±1 mV)', (kind) => {
    for (const model of ['square-law', 'ekv'] as const) {
      for (const type of ['nmos', 'pmos'] as const) {
        const vout = type === 'nmos' ? 2.4 : 0.9;
        // PMOS at 50 µA: under EKV (1/n of the square-law current for one kp, design §3) two
        // stacked VSG at 100 µA exceed the 3.3 V supply, which is no operating point at all.
        const ctx = ctxOf(makeSpec([template(kind, { type, vout, input: type === 'pmos' ? 50e-6 : undefined })], { model }));
        const r = measureMirror(ctx);
        expect(r.converged, `${kind} ${model} ${type}: ${r.solveNote ?? ''}`).toBe(true);
        const h = 1e-3;
        const di = solveAt(ctx, vout + h).iout - solveAt(ctx, vout - h).iout;
        // dIout/dVout is positive for NMOS (sinks more) and negative for PMOS (sources less).
        const fd = (type === 'nmos' ? 1 : -1) * (2 * h) / di;
        expect(rel(r.rout, fd)).toBeLessThan(1e-4);
      }
    }
  });
});
