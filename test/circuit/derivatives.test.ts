/**
 * Analytic small-signal parameters against central finite differences (design §3: "computed
 * analytically and checked against finite differences in tests"), across cutoff, triode,
 * saturation, reverse operation, body bias and the EKV inversion levels; and the assembled
 * circuit Jacobian against finite differences of the nodal residuals.
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { assemble } from '../../src/core/circuit/assemble';
import { Workspace } from '../../src/core/circuit/workspace';
import { buildTemplate } from '../../src/core/circuit/templates';
import { buildNetlist } from '../../src/core/circuit/netlistCircuit';
import { newChannelEval } from '../../src/core/models/core';
import { prepareDevice } from '../../src/core/models/device';
import { MODEL_NAMES } from '../../src/core/models/registry';
import { evalTerminal } from '../../src/core/models/terminal';
import type { ModelKind, NetlistMirror, Polarity, TemplateMirror } from '../../src/core/types';
import { makeSpec, netlist, RAZAVI_N, template } from '../analysis/builders';
import { forModel } from '../models/table/make-table';

const H = 1e-6;

function fdCheck(model: ModelKind, type: Polarity, vgs: number, vds: number, vbs: number): void {
  const dev = prepareDevice(forModel(model, { ...RAZAVI_N, lambda: 0.08 }), { w: 10e-6, l: 1e-6, m: 1 }, type,
    { model, temperature: 300, tnom: 300 });
  const at = newChannelEval();
  const id = (g: number, d: number, b: number): number => { evalTerminal(dev, g, d, b, at); return at.id; };
  const ch = newChannelEval();
  evalTerminal(dev, vgs, vds, vbs, ch);
  const fdGm = (id(vgs + H, vds, vbs) - id(vgs - H, vds, vbs)) / (2 * H);
  const fdGds = (id(vgs, vds + H, vbs) - id(vgs, vds - H, vbs)) / (2 * H);
  const fdGmb = (id(vgs, vds, vbs + H) - id(vgs, vds, vbs - H)) / (2 * H);
  // Tolerance: FD truncation O(H²·I''') and rounding O(ε·I/H), plus a kink of the square law
  // (continuous first derivative, jumping second) within H of the point.
  const scale = Math.max(Math.abs(ch.gm), Math.abs(ch.gds), Math.abs(ch.gmb), 1e-9);
  const tol = 2e-4 * scale + 1e-10;
  expect(Math.abs(ch.gm - fdGm)).toBeLessThan(tol);
  expect(Math.abs(ch.gds - fdGds)).toBeLessThan(tol);
  expect(Math.abs(ch.gmb - fdGmb)).toBeLessThan(tol);
}

describe('device derivatives vs finite differences', () => {
  const points: [string, number, number, number][] = [
    ['saturation', 1.3, 1.5, 0],
    ['saturation with body bias', 1.6, 1.5, -0.8],
    ['triode', 1.5, 0.2, 0],
    ['triode with body bias', 1.8, 0.3, -0.5],
    ['near the triode/saturation edge', 1.2, 0.5 + 3e-6, 0],
    ['cutoff', 0.5, 1.0, 0],
    ['reverse (VDS < 0) triode', 1.5, -0.2, -0.1],
    ['reverse (VDS < 0) saturation', 1.8, -1.2, 0],
    ['moderate inversion', 0.75, 1.0, 0],
  ];
  for (const model of MODEL_NAMES) {
    for (const type of ['nmos', 'pmos'] as const) {
      it.each(points)(`${model} ${type}: %s`, (_name, vgs, vds, vbs) => {
        const s = type === 'pmos' ? -1 : 1;
        fdCheck(model, type, s * vgs, s * vds, s * vbs);
      });
    }
  }
  it('EKV weak inversion (IC ≈ 1e-4): derivatives follow exp/(n·U_T)', () => {
    fdCheck('ekv', 'nmos', 0.45, 1.0, 0);
  });
  it('random operating points (fast-check, fixed seed)', () => {
    fc.assert(fc.property(
      fc.constantFrom<ModelKind>(...MODEL_NAMES), fc.constantFrom<Polarity>('nmos', 'pmos'),
      fc.double({ min: 0, max: 3, noNaN: true }), fc.double({ min: -2, max: 3, noNaN: true }),
      fc.double({ min: -1.5, max: 0, noNaN: true }),
      (model, type, vgs, vds, vbs) => {
        const s = type === 'pmos' ? -1 : 1;
        fdCheck(model, type, s * vgs, s * vds, s * vbs);
      }), { seed: 20240601, numRuns: 400 });
  });
});

/** Compare ws.G with finite differences of ws.F over every node voltage. */
function jacobianCheck(ws: Workspace, refresh: () => void): void {
  refresh();
  const G = ws.G.slice();
  const nt = ws.nt;
  // Every entry, the structural zeros of the sparse pattern included.
  const at = (i: number, j: number): number => ws.pattern.entry(G, i, j);
  for (let j = 0; j < nt; j++) {
    const v0 = ws.v[j]!;
    ws.v[j] = v0 + H; refresh(); const fp = ws.F.slice();
    ws.v[j] = v0 - H; refresh(); const fm = ws.F.slice();
    ws.v[j] = v0;
    for (let i = 0; i < nt; i++) {
      const fd = (fp[i]! - fm[i]!) / (2 * H);
      expect(Math.abs(at(i, j) - fd)).toBeLessThan(1e-4 * Math.abs(fd) + 1e-9);
    }
  }
}

describe('assembled nodal Jacobian vs finite differences of the residuals', () => {
  it.each(['simple', 'cascode', 'wide-swing', 'wilson', 'wilson-balanced'] as const)('%s, NMOS and PMOS, odd node voltages', (kind) => {
    for (const type of ['nmos', 'pmos'] as const) {
      const spec = makeSpec([template(kind, { type, vout: 1.7, vbias: type === 'nmos' ? 1.5 : 1.8, input: { resistor: 20e3 } })]);
      const mc = buildTemplate(spec, spec.mirrors[0] as TemplateMirror, 0, 1.7, type === 'nmos' ? 1.5 : 1.8);
      // Arbitrary voltages: some devices saturated, some in triode, some off.
      for (let k = 0; k < mc.circuit.nFree; k++) mc.ws.v[k] = 0.3 + 0.7 * k;
      for (let k = mc.circuit.nFree; k < mc.ws.nt; k++) mc.ws.v[k] = mc.circuit.fixedV[k]!;
      jacobianCheck(mc.ws, () => assemble(mc.circuit, mc.ws, 1, 1e-12));
    }
  });
  it('netlist with a resistor, a current source and a mixed-polarity pair', () => {
    const spec = makeSpec([netlist({
      name: 'n', type: 'nmos',
      devices: [
        { name: 'M1', type: 'nmos', d: 'a', g: 'a', s: 'vss', b: 'vss', w: 10e-6, l: 1e-6, m: 1 },
        { name: 'M2', type: 'nmos', d: 'out', g: 'a', s: 'vss', b: 'vss', w: 10e-6, l: 1e-6, m: 1 },
        { name: 'M3', type: 'pmos', d: 'a', g: 'p', s: 'vdd', b: 'vdd', w: 10e-6, l: 1e-6, m: 1 },
      ],
      currents: [{ name: 'I1', from: 'vdd', to: 'a', i: 50e-6 }],
      resistors: [{ name: 'R1', a: 'p', b: 'vss', r: 1e5 }],
      output: { node: 'out', v: 2 }, input: { source: 'I1' },
    })]);
    const mc = buildNetlist(spec, spec.mirrors[0] as NetlistMirror, 2);
    for (let k = 0; k < mc.circuit.nFree; k++) mc.ws.v[k] = 0.9 + 0.4 * k;
    for (let k = mc.circuit.nFree; k < mc.ws.nt; k++) mc.ws.v[k] = mc.circuit.fixedV[k]!;
    jacobianCheck(mc.ws, () => assemble(mc.circuit, mc.ws, 1, 1e-12));
  });
});

it('workspace buffers do not overlap', () => {
  const spec = makeSpec([template('cascode', { vout: 2 })]);
  const mc = buildTemplate(spec, spec.mirrors[0] as TemplateMirror, 0, 2, undefined);
  const ws = new Workspace(mc.circuit);
  const bufs = [ws.v, ws.F, ws.absI, ws.dx, ws.saved, ws.best, ws.G];
  bufs.forEach((b, i) => b.fill(i + 1));
  bufs.forEach((b, i) => expect(b.every((x) => x === i + 1)).toBe(true));
});
