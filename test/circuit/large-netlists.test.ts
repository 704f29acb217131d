/**
 * Large netlists end in bounded time with a result or a finding (issue: a star of 600 resistor
 * pairs with one node that cannot converge took 44 s, 1 200 pairs did not finish in 200 s, a
 * converging 3 000-device netlist 21 s, a sweep of 150 pairs 35 s). The solver reads its time
 * budget every iteration (checked here with an injected clock, no wall-clock assertion) and
 * factors large circuits sparse. The check values come from the same mirror solved on its own
 * as a template (a small, dense solve): the extra branches draw no current from the mirror.
 */
import { describe, expect, it } from 'vitest';
import { measureMirror, sweepVout } from '../../src/core/analysis/index';
import { buildMirror, outputCurrent, solveMirror } from '../../src/core/analysis/solve';
import { SOLVER } from '../../src/core/defaults';
import type { NetlistDevice, NetlistResistor } from '../../src/core/types';
import { ctxOf, makeSpec, netlist, sz, template } from '../analysis/builders';

const W = 10e-6, L = 1e-6, IIN = 100e-6, VOUT = 2;

function mos(name: string, type: 'nmos' | 'pmos', d: string, g: string, s: string): NetlistDevice {
  return { name, type, d, g, s, b: type === 'nmos' ? 'vss' : 'vdd', w: W, l: L, m: 1 };
}

/** A simple NMOS mirror (M1 diode, M2 out) beside a star: vdd —1 k— hub, and `pairs` branches
 *  hub —10 k— n_k —10 k— vss. With `island`, a second current source drives a node that only
 *  a gate touches: nothing can carry it, so no solve converges. */
function star(pairs: number, island: boolean) {
  const resistors: NetlistResistor[] = [{ name: 'Rhub', a: 'vdd', b: 'hub', r: 1e3 }];
  for (let k = 0; k < pairs; k++) {
    resistors.push({ name: `Ra${k}`, a: 'hub', b: `n${k}`, r: 1e4 }, { name: `Rb${k}`, a: `n${k}`, b: 'vss', r: 1e4 });
  }
  const devices = [mos('M1', 'nmos', 'a', 'a', 'vss'), mos('M2', 'nmos', 'out', 'a', 'vss')];
  const currents = [{ name: 'I1', from: 'vdd', to: 'a', i: IIN }];
  if (island) {
    devices.push(mos('M3', 'nmos', 'vdd', 'island', 'vss'));
    currents.push({ name: 'I2', from: 'vdd', to: 'island', i: 1e-6 });
  }
  return ctxOf(makeSpec([netlist({
    name: 'star', type: 'nmos', devices, currents, resistors,
    output: { node: 'out', v: VOUT }, input: { source: 'I1' }, pair: { ref: 'M1', out: 'M2' },
  })]));
}

/** The same mirror as a template: the reference for every check value below. */
const alone = ctxOf(makeSpec([template('simple', { input: IIN, vout: VOUT, size: sz(W, L) })]));

/** A clock that moves `step` ms at every reading. */
function ticking(step: number): () => number {
  let t = 0;
  return () => (t += step);
}

describe('a star of resistor pairs with a node that cannot converge', () => {
  it.each([600, 1200])('%i pairs: the time budget ends each solve within a few dozen iterations of it running out', (pairs) => {
    const mc = buildMirror(star(pairs, true), VOUT, undefined);
    expect(mc.circuit.nFree).toBe(pairs + 3);
    // Every clock reading is 10 ms later: the 50 ms budget has run out by the 6th reading, which
    // the solver takes every iteration once its grace work is done.
    const r = solveMirror(mc, undefined, { clock: ticking(10) });
    expect(r.converged).toBe(false);
    expect(r.note).toMatch(/time budget/);
    expect(r.iterations).toBeLessThan(60);
  });
  it('600 pairs, whole analysis with the real clock: not converged, with what was tried', () => {
    const r = measureMirror(star(600, true));
    expect(r.converged).toBe(false);
    expect(r.solveNote).toMatch(/tried Newton|island/);
  }, 20_000);
  it('1 200 pairs without the island converge to the mirror\'s own figures', () => {
    const r = measureMirror(star(1200, false));
    const ref = measureMirror(alone);
    expect(r.converged).toBe(true);
    expect(Math.abs(r.iout / ref.iout - 1)).toBeLessThan(1e-9);
    expect(Math.abs(r.rout / ref.rout - 1)).toBeLessThan(1e-6);
    expect(Math.abs(r.compliance - ref.compliance)).toBeLessThan(SOLVER.complianceTol);
    // Each branch node sits at the divider's voltage: vdd·Rb/(Rb + Ra + 2·1200·1k‖…) — read
    // from the solve, it is the same for every branch.
    expect(Math.abs(r.nodes.n0! - r.nodes.n1199!)).toBeLessThan(1e-9);
  }, 20_000);
});

describe('a converging 3 000-device netlist', () => {
  it('the mirror\'s figures equal the mirror solved alone; 1 499 PMOS diodes each carry one NMOS copy', () => {
    const devices = [mos('M1', 'nmos', 'a', 'a', 'vss'), mos('M2', 'nmos', 'out', 'a', 'vss')];
    for (let k = 0; k < 1499; k++) devices.push(mos(`N${k}`, 'nmos', `d${k}`, 'a', 'vss'), mos(`P${k}`, 'pmos', `d${k}`, `d${k}`, 'vdd'));
    expect(devices.length).toBe(3000);
    const ctx = ctxOf(makeSpec([netlist({
      name: 'wide', type: 'nmos', devices, currents: [{ name: 'I1', from: 'vdd', to: 'a', i: IIN }],
      output: { node: 'out', v: VOUT }, input: { source: 'I1' }, pair: { ref: 'M1', out: 'M2' },
    })]));
    const mc = buildMirror(ctx, VOUT, undefined);
    const r = solveMirror(mc);
    expect(r.converged).toBe(true);
    const ref = measureMirror(alone);
    expect(Math.abs(outputCurrent(mc) / ref.iout - 1)).toBeLessThan(1e-9);
    const full = measureMirror(ctx);
    expect(full.converged).toBe(true);
    expect(Math.abs(full.rout / ref.rout - 1)).toBeLessThan(1e-6);
    expect(full.devices.length).toBe(3000);
    // Every PMOS diode carries the current of its NMOS copy (KCL at d_k, through the solver),
    // up to gmin's share across the two channels: 1e-12 S·3.3 V/100 µA = 3.3e-8 at most.
    const n7 = full.devices.find((d) => d.name === 'N7')!, p7 = full.devices.find((d) => d.name === 'P7')!;
    expect(Math.abs(p7.id! / n7.id! - 1)).toBeLessThan(4e-8);
  }, 20_000);
});

describe('a sweep of a mirror beside 150 resistor pairs', () => {
  it('61 points, each equal to the mirror swept alone', () => {
    const vouts = Array.from({ length: 61 }, (_, k) => (3.3 * k) / 60);
    const big = sweepVout(star(150, false), vouts);
    const ref = sweepVout(alone, vouts);
    expect(big.filter((p) => p.converged).length).toBe(ref.filter((p) => p.converged).length);
    big.forEach((p, k) => {
      if (!ref[k]!.converged) return;
      expect(p.converged).toBe(true);
      expect(Math.abs(p.iout - ref[k]!.iout)).toBeLessThan(1e-9 * Math.abs(ref[k]!.iout) + 1e-15);
    });
  }, 20_000);
});

describe('a netlist whose factors would be dense', () => {
  it('is refused before any numeric work, with the reason', () => {
    // 2 000 nodes on a ring, joined by 1 000 random chords: a graph without small separators.
    let s = 7;
    const rnd = (): number => { s = (s * 1103515245 + 12345) % 2147483648; return s / 2147483648; };
    const resistors: NetlistResistor[] = [{ name: 'R', a: 'vdd', b: 'x0', r: 1e3 }];
    for (let k = 0; k < 2000; k++) resistors.push({ name: `Q${k}`, a: `x${k}`, b: `x${(k + 1) % 2000}`, r: 1e3 });
    for (let k = 0; k < 1000; k++) resistors.push({ name: `C${k}`, a: `x${Math.floor(rnd() * 2000)}`, b: `x${Math.floor(rnd() * 2000)}`, r: 1e3 });
    const ctx = ctxOf(makeSpec([netlist({
      name: 'mesh', type: 'nmos', devices: [mos('M1', 'nmos', 'a', 'a', 'vss'), mos('M2', 'nmos', 'out', 'a', 'vss')],
      currents: [{ name: 'I1', from: 'vdd', to: 'a', i: IIN }], resistors: resistors.filter((r) => r.a !== r.b),
      output: { node: 'out', v: VOUT }, input: { source: 'I1' },
    })]));
    const r = measureMirror(ctx);
    expect(r.converged).toBe(false);
    expect(r.solveNote).toMatch(/too densely connected to solve/);
  }, 20_000);
});
