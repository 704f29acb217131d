/**
 * Hard circuits: the engine returns converged: false with a note, or a sane result — never an
 * exception, always within a bounded time: bad input always yields a clear finding.
 */
import { describe, expect, it } from 'vitest';
import { analyzeSpec, measureMirror, solveAt, sweepVout } from '../../src/core/analysis/index';
import { buildMirror } from '../../src/core/analysis/solve';
import { solveDc } from '../../src/core/circuit/newton';
import type { MirrorReport, ResolvedSpec } from '../../src/core/types';
import { ctxOf, makeSpec, netlist, sz, template } from '../analysis/builders';

// No wall-clock limits here: a solve that hung would fail through the test timeout
// (vitest.config.ts), and the solver's own iteration and time bounds are tested below with
// starved retries and an injected clock.

function sane(r: MirrorReport): void {
  if (r.converged) {
    expect(Number.isFinite(r.iout)).toBe(true);
    expect(Object.values(r.nodes).every(Number.isFinite)).toBe(true);
    expect(r.devices.every((d) => Number.isFinite(d.id) && Number.isFinite(d.gm))).toBe(true);
  } else {
    expect(r.solveNote).toMatch(/\w/);
  }
}

describe('hard circuits', () => {
  it('an input current the supply cannot carry: the diode node rises beyond vdd, which is no operating point (beyondRails names it)', () => {
    const r = measureMirror(ctxOf(makeSpec([template('simple', { input: 10e-3, vout: 2 })])));
    sane(r);
    expect(r.converged).toBe(false);
    // VGS = 0.7 + sqrt(2·10 mA/1.34 mA/V²) ≈ 4.56 V (λ shifts it a little): above the 3.3 V supply.
    expect(r.nodes.a).toBeGreaterThan(3.3);
    expect(r.beyondRails).toMatchObject({ node: 'a', rail: 'vdd', stack: ['ref'] });
    expect(r.beyondRails!.need).toBeCloseTo(r.nodes.a!, 9);
    expect(r.rout).toBeNaN();
  });
  it('an input current no device can carry: a node far outside the supplies is reported as not converged', () => {
    const r = measureMirror(ctxOf(makeSpec([template('cascode', { input: 10, vout: 2 })])));
    sane(r);
    expect(r.converged).toBe(false);
    expect(r.solveNote).toMatch(/far outside the supplies/);
  });
  it('a device that never saturates (output held at vss): converged, out in triode/cutoff, compliance above vout', () => {
    for (const kind of ['simple', 'cascode', 'wide-swing'] as const) {
      const r = measureMirror(ctxOf(makeSpec([template(kind, { vout: 0 })]), 0), { curve: true });
      sane(r);
      expect(r.converged).toBe(true);
      expect(r.devices.some((d) => d.region !== 'saturation')).toBe(true);
      expect(r.compliance).toBeGreaterThan(0.2);
      expect(r.curve!.length).toBe(61);
    }
  });
  it('a Wilson with its output at vss has no operating point (nothing feeds the diode node): a clear failure', () => {
    // The output device turns around and drains the diode node too; the ideal input current
    // then has no path and its node runs away. Physically the input source loses compliance.
    for (const kind of ['wilson', 'wilson-balanced'] as const) {
      const r = measureMirror(ctxOf(makeSpec([template(kind, { vout: 0 })]), 0), { curve: true });
      sane(r);
      expect(r.converged).toBe(false);
      expect(r.solveNote).toMatch(/tried Newton|far outside/);
      // The curve is still drawn where the mirror works, in bounded time.
      const curve = measureMirror(ctxOf(makeSpec([template(kind, { vout: 2.5 })])), { curve: true }).curve!;
      expect(curve.filter((p) => p.converged && p.vout > 1.5).length).toBeGreaterThan(20);
    }
  });
  it('a Wilson whose output is above vdd - nothing breaks, figures finite', () => {
    const r = measureMirror(ctxOf(makeSpec([template('wilson', { vout: 6 })])));
    sane(r);
    expect(r.converged).toBe(true);
  });
  it('zero width: not solved, the note names the device', () => {
    const r = measureMirror(ctxOf(makeSpec([template('cascode', { vout: 2, devices: { outc: { w: 0 } } })])));
    expect(r.converged).toBe(false);
    expect(r.solveNote).toMatch(/device outc: W = 0 m/);
    expect(r.devices.every((d) => Number.isFinite(d.id))).toBe(true);
  });
  it('non-finite parameter: not solved, with a note', () => {
    const r = measureMirror(ctxOf(makeSpec([template('simple', { vout: 2 })], { nmos: { kp: Number.NaN } })));
    expect(r.converged).toBe(false);
    expect(r.solveNote).toMatch(/kp/);
  });
  it('huge and tiny sizes: a sane result', () => {
    for (const size of [sz(1, 1e-6), sz(1e-9, 1e-3), sz(1e3, 1e3)]) {
      const r = measureMirror(ctxOf(makeSpec([template('cascode', { vout: 2, size, input: 1e-6 })])));
      sane(r);
    }
  });
  it('a disconnected netlist node (a floating gate) settles at mid-supply through gmin', () => {
    const spec = makeSpec([netlist({
      name: 'n', type: 'nmos',
      devices: [
        { name: 'M1', type: 'nmos', d: 'a', g: 'a', s: 'vss', b: 'vss', w: 10e-6, l: 1e-6, m: 1 },
        { name: 'M2', type: 'nmos', d: 'out', g: 'a', s: 'vss', b: 'vss', w: 10e-6, l: 1e-6, m: 1 },
        { name: 'M3', type: 'nmos', d: 'vdd', g: 'floating', s: 'x', b: 'vss', w: 1e-6, l: 1e-6, m: 1 },
      ],
      currents: [{ name: 'I1', from: 'vdd', to: 'a', i: 100e-6 }],
      output: { node: 'out', v: 2 }, input: { source: 'I1' },
    })]);
    const r = measureMirror(ctxOf(spec));
    sane(r);
    expect(r.converged).toBe(true);
    expect(r.nodes.floating).toBeCloseTo(1.65, 6);
    expect(r.iout).toBeCloseTo(103.9103e-6 * (1 + 0.1 * 2) / (1 + 0.1 * 1.5), 9);
  });
  it('a current forced into an isolated netlist node: not converged, with a note', () => {
    const spec = makeSpec([netlist({
      name: 'n', type: 'nmos',
      devices: [{ name: 'M1', type: 'nmos', d: 'out', g: 'g', s: 'vss', b: 'vss', w: 10e-6, l: 1e-6, m: 1 }],
      currents: [{ name: 'I1', from: 'vdd', to: 'island', i: 1e-6 }],
      voltages: [{ name: 'V1', node: 'g', v: 1 }],
      output: { node: 'out', v: 2 }, input: { source: 'I1' },
    })]);
    const r = measureMirror(ctxOf(spec));
    expect(r.converged).toBe(false);
    // The node runs away to I/gmin = 1 MV: caught by the step limit growing with the distance
    // outside the supplies, then by the sanity bound.
    expect(r.solveNote).toMatch(/island/);
  });
  it('a netlist that names an unknown input source or holds a rail: not solved, with notes', () => {
    const base = {
      name: 'n', type: 'nmos' as const,
      devices: [{ name: 'M1', type: 'nmos' as const, d: 'out', g: 'out', s: 'vss', b: 'vss', w: 10e-6, l: 1e-6, m: 1 }],
      currents: [{ name: 'I1', from: 'vdd', to: 'out', i: 1e-6 }],
    };
    const a = measureMirror(ctxOf(makeSpec([netlist({ ...base, output: { node: 'out', v: 2 }, input: { source: 'Inope' } })])));
    expect(a.converged).toBe(false);
    expect(a.solveNote).toMatch(/Inope/);
    const b = measureMirror(ctxOf(makeSpec([netlist({ ...base, output: { node: 'gnd', v: 2 }, input: { source: 'I1' } })])));
    expect(b.converged).toBe(false);
    expect(b.solveNote).toMatch(/rail/);
  });
  it('an output index that does not exist: not solved', () => {
    const spec = makeSpec([template('simple', { vout: 2 })]);
    const op = solveAt({ spec, mirror: spec.mirrors[0]!, outputIndex: 5 }, 2);
    expect(op.converged).toBe(false);
  });
  it('a malformed spec object does not throw out of the public API', () => {
    const broken = { ...makeSpec([]), mirrors: [{ kind: 'simple', name: 'x' }] } as unknown as ResolvedSpec;
    expect(() => analyzeSpec(broken)).not.toThrow();
    const [r] = analyzeSpec(broken);
    expect(r!.converged).toBe(false);
    expect(r!.solveNote).toMatch(/internal error/);
    expect(() => solveAt({ spec: broken, mirror: broken.mirrors[0]!, outputIndex: 0 }, 1)).not.toThrow();
    expect(() => sweepVout({ spec: broken, mirror: broken.mirrors[0]!, outputIndex: 0 }, [1, 2])).not.toThrow();
  });
});

describe('solver fallbacks and budgets', () => {
  const start = (kind: 'simple' | 'cascode' | 'wilson' | 'wide-swing', v: number) => {
    const spec = makeSpec([template(kind, { vout: 2, vbias: 1.6 })]);
    const mc = buildMirror(ctxOf(spec), 2, 1.6);
    for (let k = 0; k < mc.circuit.nFree; k++) mc.ws.v[k] = v;   // every node at vdd: a poor guess
    return mc;
  };
  const reference = (kind: 'simple' | 'cascode' | 'wilson' | 'wide-swing'): Float64Array => {
    const ref = buildMirror(ctxOf(makeSpec([template(kind, { vout: 2, vbias: 1.6 })])), 2, 1.6);
    ref.guess();
    expect(solveDc(ref.circuit, ref.ws).converged).toBe(true);
    return ref.ws.v;
  };
  it.each([['simple', 'source stepping'], ['wilson', 'source stepping'], ['cascode', 'gmin stepping'], ['wide-swing', 'gmin stepping']] as const)(
    '%s: plain Newton on a 10-iteration leash fails from vdd; %s recovers the same point', (kind, how) => {
      const mc = start(kind, 3.3);
      const r = solveDc(mc.circuit, mc.ws, { maxIterations: 10 });
      expect(r.converged).toBe(true);
      expect(r.note).toBe(`converged by ${how}`);
      const ref = reference(kind);
      for (let k = 0; k < mc.circuit.nFree; k++) expect(mc.ws.v[k]).toBeCloseTo(ref[k]!, 7);
    });
  it('with every retry starved the result says what was tried, and leaves the best iterate', () => {
    const mc = start('cascode', 3.3);
    const r = solveDc(mc.circuit, mc.ws, { maxIterations: 3 });
    expect(r.converged).toBe(false);
    expect(r.note).toMatch(/^tried Newton \(3 iterations\), then source stepping \(stalled/);
    expect(r.note).toMatch(/gmin stepping \(failed at/);
    expect(mc.ws.v.every(Number.isFinite)).toBe(true);
  });
  it('an injected clock ends a hopeless solve after one attempt, saying what was tried', () => {
    // The Wilson with its output at vss has no operating point (see above): Newton cycles.
    const spec = makeSpec([template('wilson', { vout: 0 })]);
    const mc = buildMirror(ctxOf(spec), 0, undefined);
    mc.guess();
    let t = 0;
    const r = solveDc(mc.circuit, mc.ws, { clock: () => (t += 1000) });
    expect(r.converged).toBe(false);
    expect(r.note).toMatch(/^tried Newton \((200 iterations|time budget)\)/);
    expect(r.note).toMatch(/no time left for source stepping, then no time left for gmin stepping$/);
    expect(r.iterations).toBeLessThanOrEqual(210);
    expect(Number.isFinite(r.residual)).toBe(true);
  });
});
