/**
 * The bipolar transistor (design §10) and the bipolar mirrors: the transport model's analytic
 * derivatives against finite differences in every region, its temperature laws, and the
 * mirrors' figures through the whole solver against the published and derived values of
 * docs/references.md §12 (the check device DB: IS = 1e-16 A, βF = 100, VAF = 100 V, 300 K).
 */
import { describe, expect, it } from 'vitest';
import { analyzeText } from '../../src/core/analyze';
import { assemble } from '../../src/core/circuit/assemble';
import { bfAt, CUTOFF_IS, evalBipolar, isAt, newBipolarEval, prepareBipolar, vbeCutoff, vbeFor } from '../../src/core/models/bipolar';
import { resolveText } from '../../src/core/resolve';
import { buildMirror } from '../../src/core/analysis/solve';
import type { BipolarDeviceReport, BipolarParams, BipolarType, MirrorReport } from '../../src/core/types';

const DB: BipolarParams = { is: 1e-16, bf: 100, br: 1, vaf: 100, eg: 1.11, xti: 3, xtb: 0, vcesat: 0.2 };
const rel = (a: number, b: number): number => Math.abs(a / b - 1);

describe('transport model: analytic derivatives against central differences', () => {
  const H = 1e-7;
  // Forward-active, saturation, cutoff, reverse (VBC > VBE), and the Early factor's floor.
  const points: [string, number, number][] = [
    ['forward-active', 0.7, -2], ['saturation', 0.72, 0.6], ['cutoff', -0.3, -2],
    ['reverse', 0.1, 0.68], ['deep reverse', 0.3, 0.7 + 0.1],
  ];
  for (const type of ['npn', 'pnp'] as BipolarType[]) {
    for (const [label, vbe, vbc] of points) {
      it(`${type} ${label}: ∂IC/∂VBE, ∂IC/∂VBC, ∂IB/∂VBE, ∂IB/∂VBC`, () => {
        const dev = prepareBipolar(DB, { area: 2, m: 1 }, type, 300, 300);
        const e = newBipolarEval(), a = newBipolarEval(), b = newBipolarEval();
        evalBipolar(dev, vbe, vbc, e);
        const fd = (f: 'ic' | 'ib', dbe: number, dbc: number): number => {
          evalBipolar(dev, vbe + dbe, vbc + dbc, a); evalBipolar(dev, vbe - dbe, vbc - dbc, b);
          return (a[f] - b[f]) / (2 * H);
        };
        const scale = Math.max(Math.abs(e.dicVbe), Math.abs(e.dicVbc), 1e-15);
        expect(Math.abs(fd('ic', H, 0) - e.dicVbe) / scale).toBeLessThan(1e-5);
        expect(Math.abs(fd('ic', 0, H) - e.dicVbc) / scale).toBeLessThan(1e-5);
        const sb = Math.max(Math.abs(e.dibVbe), Math.abs(e.dibVbc), 1e-17);
        expect(Math.abs(fd('ib', H, 0) - e.dibVbe) / sb).toBeLessThan(1e-5);
        expect(Math.abs(fd('ib', 0, H) - e.dibVbc) / sb).toBeLessThan(1e-5);
      });
    }
  }

  it('the assembled Jacobian of every bipolar kind in both polarities matches finite differences of the residuals', () => {
    for (const kind of ['simple', 'cascode', 'wilson', 'wilson-balanced', 'beta-helper', 'widlar']) {
      for (const type of ['npn', 'pnp']) {
        const s = resolveText(spec([{ kind, type, vout: type === 'npn' ? 3 : 2 }]), 'j.bias.yaml').parsed.spec!;
        const mc = buildMirror({ spec: s, mirror: s.mirrors[0]!, outputIndex: 0 }, type === 'npn' ? 3 : 2, undefined);
        mc.guess();
        const c = mc.circuit, ws = mc.ws;
        for (let k = c.nFree; k < ws.nt; k++) ws.v[k] = c.fixedV[k]!;            // the held nodes
        for (let k = 0; k < c.nFree; k++) ws.v[k] = ws.v[k]! + 0.01 * mc.sign * (k + 1);   // off the solution
        assemble(c, ws, 1, 1e-12);
        const G = ws.G.slice(), F0 = new Float64Array(ws.n);
        const h = 1e-7;
        let scale = 0;
        for (let i = 0; i < c.nFree; i++) for (let j = 0; j < c.nFree; j++) scale = Math.max(scale, Math.abs(ws.pattern.entry(G, i, j)));
        for (let j = 0; j < c.nFree; j++) {
          const v0 = ws.v[j]!;
          ws.v[j] = v0 + h; assemble(c, ws, 1, 1e-12);
          const Fp = ws.F.slice(0, ws.n);
          ws.v[j] = v0 - h; assemble(c, ws, 1, 1e-12);
          for (let i = 0; i < c.nFree; i++) F0[i] = (Fp[i]! - ws.F[i]!) / (2 * h);
          ws.v[j] = v0;
          for (let i = 0; i < c.nFree; i++) {
            const g = ws.pattern.entry(G, i, j);
            expect(Math.abs(F0[i]! - g), `${kind} ${type} ∂F${i}/∂v${j}`).toBeLessThan(1e-4 * scale);
          }
        }
      }
    }
  });
});

describe('temperature laws (docs/references.md §12, IS(T) and βF(T); values computed)', () => {
  it('IS(T)/IS(Tnom) and VBE(T) at 100 µA, EG 1.11 eV, XTI 3, Tnom 300.15 K', () => {
    const table: [number, number, number][] = [
      [233.15, 2.065164e-6, 0.818145], [273.15, 1.083667e-2, 0.756892], [300.15, 1, 0.714674],
      [358.15, 1.771972e3, 0.621925], [398.15, 9.028551e4, 0.556517],
    ];
    for (const [t, ratio, vbe] of table) {
      expect(rel(isAt(DB, t, 300.15) / DB.is, ratio)).toBeLessThan(2e-6);
      expect(vbeFor(prepareBipolar({ ...DB, vaf: undefined }, { area: 1, m: 1 }, 'npn', t, 300.15), 100e-6)).toBeCloseTo(vbe, 6);
    }
  });
  it('dVBE/dT at Tnom = (VBE − EG − XTI·UT)/T = −1.575614 mV/K', () => {
    const at = (t: number): number => vbeFor(prepareBipolar({ ...DB, vaf: undefined }, { area: 1, m: 1 }, 'npn', t, 300.15), 100e-6);
    expect((at(300.15 + 1e-3) - at(300.15 - 1e-3)) / 2e-3).toBeCloseTo(-1.575614e-3, 8);
  });
  it('βF(T) = βF·(T/Tnom)^xtb: 68.4614 at −40 °C and 152.7786 at 125 °C with xtb 1.5', () => {
    expect(bfAt({ ...DB, xtb: 1.5 }, 233.15, 300.15)).toBeCloseTo(68.4614, 4);
    expect(bfAt({ ...DB, xtb: 1.5 }, 398.15, 300.15)).toBeCloseTo(152.7786, 4);
  });
});

interface MirrorText { kind: string; type: string; vout: number; input?: string; extra?: string; name?: string }

/** A spec of bipolar mirrors on the check devices (DB as npn, DBP as pnp: βF 50, VAF 50 V). */
function spec(ms: MirrorText[], npn = 'is: 1e-16, bf: 100, vaf: 100', pnp = 'is: 1e-16, bf: 50, vaf: 50'): string {
  return [
    'format: 1',
    'process:',
    '  tnom: 300 K',
    '  temperature: 300 K',
    `  npn: { ${npn} }`,
    `  pnp: { ${pnp} }`,
    'supplies: { vdd: 5 }',
    'mirrors:',
    ...ms.flatMap((m, i) => [
      `  - name: ${m.name ?? `m${i}`}`,
      `    kind: ${m.kind}`,
      `    type: ${m.type}`,
      `    input: ${m.input ?? '100u'}`,
      ...(m.kind === 'widlar' && !m.extra?.includes('degeneration') ? ['    degeneration: 5k'] : []),
      ...(m.extra ? [`    ${m.extra}`] : []),
      `    output: { v: ${m.vout} }`,
    ]),
  ].join('\n');
}

function reports(text: string): MirrorReport[] {
  const r = analyzeText(text, 'b.bias.yaml');
  expect(r.findings.filter((f) => f.severity === 'error' && !['ratio-error'].includes(f.code))).toEqual([]);
  return r.mirrors;
}
const one = (m: MirrorText, npn?: string, pnp?: string): MirrorReport => reports(spec([m], npn, pnp))[0]!;
const dev = (r: MirrorReport, name: string): BipolarDeviceReport => r.devices.find((d) => d.name === name) as BipolarDeviceReport;

describe('ratios with β = 100 and no Early effect (docs/references.md §12; formulas derived, values computed)', () => {
  const noEarly = 'is: 1e-16, bf: 100';
  it('simple 1:1: 1/(1 + 2/β) = 0.980392; 1:4: 4/(1 + 5/β) = 3.80952381', () => {
    expect(one({ kind: 'simple', type: 'npn', vout: 3 }, noEarly).ratio).toBeCloseTo(1 / 1.02, 7);
    expect(one({ kind: 'simple', type: 'npn', vout: 3, extra: 'devices: { out: { area: 4 } }' }, noEarly).ratio).toBeCloseTo(3.80952381, 7);
    expect(one({ kind: 'simple', type: 'npn', vout: 3, extra: 'devices: { out: { m: 4 } }' }, noEarly).ratioIdeal).toBe(4);
  });
  it('beta-helper: 1/(1 + 2/(β(β + 1))) = 0.999802019', () => {
    expect(one({ kind: 'beta-helper', type: 'npn', vout: 3 }, noEarly).ratio).toBeCloseTo(0.999802019, 8);
  });
  it('Wilson: 1 − 2/(β² + 2β + 2) = 0.999803960, and the four-device Wilson the same β error', () => {
    expect(one({ kind: 'wilson', type: 'npn', vout: 3 }, noEarly).ratio).toBeCloseTo(0.99980396, 8);
    expect(one({ kind: 'wilson-balanced', type: 'npn', vout: 3 }, noEarly).ratio).toBeCloseTo(0.99980396, 8);
  });
  it('self-biased cascode: β²/(β² + 4β + 2) = 0.961353586', () => {
    expect(one({ kind: 'cascode', type: 'npn', vout: 3 }, noEarly).ratio).toBeCloseTo(0.961353586, 8);
  });
  it('the error split names the base currents alone', () => {
    const r = one({ kind: 'simple', type: 'npn', vout: 3 }, noEarly);
    const s = r.errorSplit as { base: number; vce: number; geometry: number };
    expect(s.base).toBeCloseTo(1 / 1.02 - 1, 8);
    expect(s.vce).toBeCloseTo(0, 10);   // only the reverse term of IC sees VCE
    expect(s.geometry).toBeCloseTo(0, 12);
  });
});

describe('full DC solve with the Early effect on IC only (docs/references.md §12, convention C; computed)', () => {
  const cases: [string, number, number][] = [
    ['simple', 2, 0.993052], ['simple', 3, 1.002788], ['simple', 5, 1.022260],
    ['wilson', 2, 0.992950], ['wilson', 3, 0.993141], ['wilson', 5, 0.993514],
    ['wilson-balanced', 2, 0.999914], ['wilson-balanced', 3, 1.000108], ['wilson-balanced', 5, 1.000484],
    ['cascode', 2, 0.961729], ['cascode', 3, 0.961912], ['cascode', 5, 0.962267],
  ];
  it.each(cases)('%s at Vout %s V: IO/IIN = %s (to 1e-4 in current)', (kind, vout, ratio) => {
    expect(rel(one({ kind, type: 'npn', vout }).ratio!, ratio)).toBeLessThan(1e-4);
  });
  it('node voltages at Vout 3 V: simple VBE 0.713625 V; Wilson X 1.427253 V, Y 0.713699 V; cascode A 0.713381 V, B 1.427014 V', () => {
    expect(dev(one({ kind: 'simple', type: 'npn', vout: 3 }), 'ref').vbe).toBeCloseTo(0.713625, 5);
    const w = one({ kind: 'wilson', type: 'npn', vout: 3 });
    expect(w.nodes.x).toBeCloseTo(1.427253, 5);
    expect(w.nodes.y).toBeCloseTo(0.713699, 5);
    const c = one({ kind: 'cascode', type: 'npn', vout: 3 });
    expect(c.nodes.a).toBeCloseTo(0.713381, 5);
    expect(c.nodes.b).toBeCloseTo(1.427014, 5);
  });
  it('Rout at Vout 3 V within 0.5 %: simple 1.0271 MΩ, Wilson 52.696 MΩ, four-device Wilson 52.138 MΩ, cascode 55.263 MΩ', () => {
    expect(rel(one({ kind: 'simple', type: 'npn', vout: 3 }).rout, 1.0271e6)).toBeLessThan(5e-3);
    expect(rel(one({ kind: 'wilson', type: 'npn', vout: 3 }).rout, 52.696e6)).toBeLessThan(5e-3);
    expect(rel(one({ kind: 'wilson-balanced', type: 'npn', vout: 3 }).rout, 52.138e6)).toBeLessThan(5e-3);
    expect(rel(one({ kind: 'cascode', type: 'npn', vout: 3 }).rout, 55.263e6)).toBeLessThan(5e-3);
  });
  it('PNP simple (DBP), VEC of out 2 V: ratio 0.986475, VEB 0.712951 V, Rout 527.13 kΩ', () => {
    const r = one({ kind: 'simple', type: 'pnp', vout: 3 });
    expect(rel(r.ratio!, 0.986475)).toBeLessThan(1e-4);
    expect(dev(r, 'ref').vbe).toBeCloseTo(0.712951, 5);
    expect(dev(r, 'out').vce).toBeCloseTo(2, 9);   // reported as the magnitude VEC
    expect(rel(r.rout, 527.13e3)).toBeLessThan(5e-3);
  });
});

describe('Rout limits: β·ro/2 for the Wilson and the self-biased cascode (docs/references.md §12)', () => {
  it('the textbook β·ro/2 is within 6 % of the exact Rout, far below the MOSFET-like gm·ro² a base current with an Early factor would give', () => {
    for (const kind of ['wilson', 'wilson-balanced', 'cascode']) {
      const r = one({ kind, type: 'npn', vout: 3 });
      expect(rel(r.rout, r.routApprox!), kind).toBeLessThan(0.06);
      const o = dev(r, kind === 'cascode' ? 'outc' : 'out');
      // A base current free of the Early effect bounds Rout at β·ro/2: the MOSFET's gm·ro·ro
      // (the limit that appears when IB carries the Early factor, ~4 GΩ here) is 80× higher.
      expect(r.rout).toBeLessThan(o.gm * o.ro * o.ro / 50);
    }
  });
  it('Wilson at 250 µA, β = 90, VA = 25 V: Rout ≈ β·ro/2 = 4.5 MΩ (transtutors problem; exact hybrid-π 4.3507 MΩ at ro = VA/IC)', () => {
    const r = one({ kind: 'wilson', type: 'npn', vout: 2, input: '250u' }, 'is: 1e-16, bf: 90, vaf: 25');
    const o = dev(r, 'out');
    expect(rel(r.routApprox!, o.beta * o.ro / 2)).toBeLessThan(1e-12);
    expect(rel(r.rout, r.routApprox!)).toBeLessThan(0.06);
    // β and ro both carry the Early factor (1 + VCE/VA) here (VCE of each device its own);
    // taken out at out's VCE, the exact hybrid-π 4.3507 MΩ within 5 %.
    expect(rel(r.rout / (1 + o.vce / 25) ** 2, 4.3507e6)).toBeLessThan(0.05);
  });
});

describe('Widlar: IOUT·R = UT·ln(IIN/IOUT) (Gray et al. §4.4.1; docs/references.md §12, Lambert-W values computed)', () => {
  const huge = 'is: 1e-16, bf: 1e12';
  it('IIN 100 µA, R 5 kΩ: 11.281736 µA without base currents; 11.166114 µA with β = 100', () => {
    expect(rel(one({ kind: 'widlar', type: 'npn', vout: 3 }, huge).iout, 11.281736e-6)).toBeLessThan(1e-5);
    expect(rel(one({ kind: 'widlar', type: 'npn', vout: 3 }, 'is: 1e-16, bf: 100').iout, 11.166114e-6)).toBeLessThan(1e-5);
  });
  it('IIN 100 µA, R 10 kΩ: 6.908670 µA; IIN 1 mA, R 10 kΩ: 11.535913 µA (11.421457 µA with β = 100)', () => {
    expect(rel(one({ kind: 'widlar', type: 'npn', vout: 3, extra: 'degeneration: 10k' }, huge).iout, 6.908670e-6)).toBeLessThan(1e-5);
    expect(rel(one({ kind: 'widlar', type: 'npn', vout: 3, input: '1m', extra: 'degeneration: 10k' }, huge).iout, 11.535913e-6)).toBeLessThan(1e-5);
    expect(rel(one({ kind: 'widlar', type: 'npn', vout: 3, input: '1m', extra: 'degeneration: 10k' }, 'is: 1e-16, bf: 100').iout, 11.421457e-6)).toBeLessThan(1e-5);
  });
  it('the ratio it is designed to give is the law\'s, so its error is what base currents add (references §12: 11.281736 / 11.166114 µA from 100 µA)', () => {
    const ideal = one({ kind: 'widlar', type: 'npn', vout: 3 }, huge);
    expect(rel(ideal.ratioIdeal!, 0.11281736)).toBeLessThan(1e-6);
    expect(Math.abs(ideal.error!)).toBeLessThan(1e-5);
    const q = one({ kind: 'widlar', type: 'npn', vout: 3 }, 'is: 1e-16, bf: 100');
    expect(rel(q.ratioIdeal!, 0.11281736)).toBeLessThan(1e-6);
    // The law's ratio times the error gives back the β = 100 current of references §12.
    expect(rel(q.iin! * q.ratioIdeal! * (1 + q.error!), 11.166114e-6)).toBeLessThan(1e-5);
    // Its ratio departs from the area ratio by design: no split against the geometry.
    expect(q.errorSplit).toBeUndefined();
  });
  it('design 1 mA → 10 µA: R = 11.9053 kΩ; Rout ≈ ro·(1 + gm·(R ∥ rπ)) within 0.5 %; compliance IOUT·R + vcesat', () => {
    const r = one({ kind: 'widlar', type: 'pnp', vout: 2, input: '1m', extra: 'degeneration: 11.9053k' }, undefined, 'is: 1e-16, bf: 1e12');
    expect(rel(r.iout, 10e-6)).toBeLessThan(1e-5);
    const q = one({ kind: 'widlar', type: 'npn', vout: 3, input: '1m', extra: 'degeneration: 11.9053k' }, 'is: 1e-16, bf: 100, vaf: 100');
    expect(rel(q.rout, q.routApprox!)).toBeLessThan(5e-3);
    // Without the Early effect IOUT holds down to the limit: the emitter sits at IE·R.
    const k = one({ kind: 'widlar', type: 'npn', vout: 3, input: '1m', extra: 'degeneration: 11.9053k' }, 'is: 1e-16, bf: 100');
    expect(k.compliance).toBeCloseTo(k.iout * 11.9053e3 * (1 + 1 / 100) + 0.2, 3);
  });
});

describe('mismatch: the area law from ais and abf (docs/references.md §12)', () => {
  it('1:1 mirror, ais 1 %, abf 5 %, β = 100: σ = 0.99141 % (sensitivity (β + 1)/(β + 2) to IS, 1/(β + 2) to β)', () => {
    const r = one({ kind: 'simple', type: 'npn', vout: 3 }, 'is: 1e-16, bf: 100, ais: 1%, abf: 5%');
    expect(rel(r.sigma!, 0.0099141)).toBeLessThan(1e-4);
    const big = one({ kind: 'simple', type: 'npn', vout: 3, extra: 'size: { area: 10 }' }, 'is: 1e-16, bf: 100, ais: 1%, abf: 5%');
    expect(rel(big.sigma!, r.sigma! / Math.sqrt(10))).toBeLessThan(1e-6);   // area law (common practice)
  });
});

describe('BiCMOS netlists solve like the templates (independent solves agree)', () => {
  const head = [
    'format: 1', 'process:', '  tnom: 300 K', '  temperature: 300 K',
    '  nmos: { kp: 200u, vt0: 0.5, lambda: 0.05 }',
    '  npn: { is: 1e-16, bf: 100, vaf: 100 }', 'supplies: { vdd: 5 }', 'mirrors:',
  ];
  it('an NPN simple mirror written as a netlist: the template\'s iout to 1e-9 and Rout to 1e-6', () => {
    const text = [...head,
      '  - name: t', '    kind: simple', '    type: npn', '    input: 100u', '    output: { v: 3 }',
      '  - name: n', '    kind: netlist',
      '    devices:', '      Q1: { type: npn, c: a, b: a, e: vss }', '      Q2: { type: npn, c: o, b: a, e: vss }',
      '    currents: { I1: { from: vdd, to: a, i: 100u } }', '    output: { node: o, v: 3 }', '    input: { source: I1 }', '    pair: { ref: Q1, out: Q2 }',
    ].join('\n');
    const [t, n] = reports(text);
    expect(rel(n!.iout, t!.iout)).toBeLessThan(1e-9);
    expect(rel(n!.rout, t!.rout)).toBeLessThan(1e-6);
    expect(n!.ratioIdeal).toBe(1);
  });
  it('an NMOS cascode on an NPN mirror: the NPN carries the template\'s current at the cascode\'s source voltage, Rout ≈ ro_q + ro_m + gm_m·ro_m·ro_q', () => {
    const text = [...head,
      '  - name: n', '    kind: netlist', '    type: nmos',
      '    devices:', '      Q1: { type: npn, c: a, b: a, e: vss }', '      Q2: { type: npn, c: x, b: a, e: vss }',
      '      M1: { type: nmos, d: o, g: vb, s: x, b: x, w: 20u, l: 1u }',
      '    currents: { I1: { from: vdd, to: a, i: 100u } }', '    voltages: { VB: { node: vb, v: 1.8 } }',
      '    output: { node: o, v: 3 }', '    input: { source: I1 }',
    ].join('\n');
    const n = reports(text)[0]!;
    const t = one({ kind: 'simple', type: 'npn', vout: n.nodes.x! });
    expect(rel(n.iout, t.iout)).toBeLessThan(1e-4);
    const q = dev(n, 'Q2');
    const m = n.devices.find((d) => d.name === 'M1')!;
    expect(rel(n.rout, q.ro + m.ro + m.gm * m.ro * q.ro)).toBeLessThan(5e-3);
  });
});

describe('the bipolar off rule and the start-up check of a bipolar self-biased netlist (docs/references.md §11, §12)', () => {
  it('a device is off up to VBE = UT·ln 1001 = 0.178605 V at 300 K, whatever its area (IC = 1000·IS; computed)', () => {
    for (const area of [1, 8]) {
      const d = prepareBipolar({ ...DB, vaf: undefined }, { area, m: 1 }, 'npn', 300, 300);
      expect(vbeCutoff(d)).toBeCloseTo(0.178605, 6);
      // The region report's cutoff is the same rule: 1 mV either side, IC crosses 1000·IS.
      const e = newBipolarEval();
      evalBipolar(d, vbeCutoff(d) - 1e-3, vbeCutoff(d) - 2, e);
      expect(e.ic).toBeLessThan(CUTOFF_IS * d.is);
      evalBipolar(d, vbeCutoff(d) + 1e-3, vbeCutoff(d) - 2, e);
      expect(e.ic).toBeGreaterThan(CUTOFF_IS * d.is);
    }
  });

  /** A ΔVBE (PTAT) cell: Q1 a diode, Q2 of eight times its area over RS, a PNP mirror closing the
   *  loop, Qo copying Q1; no input, so self-biased. I = UT·ln 8/RS ≈ 10 µA with RS 5.4 kΩ. */
  const cell = (extra = ''): string => [
    'format: 1', 'process:', '  tnom: 300 K', '  temperature: 300 K',
    '  npn: { is: 1e-16, bf: 100, vaf: 100 }', '  pnp: { is: 1e-16, bf: 50, vaf: 50 }',
    'supplies: { vdd: 5 }', 'mirrors:',
    '  - name: ptat', '    kind: netlist', '    type: npn',
    '    devices:',
    '      Q1: { type: npn, c: x, b: x, e: vss }',
    '      Q2: { type: npn, c: y, b: x, e: s, area: 8 }',
    '      Q3: { type: pnp, c: x, b: y, e: vdd }',
    '      Q4: { type: pnp, c: y, b: y, e: vdd }',
    '      Qo: { type: npn, c: out, b: x, e: vss }',
    '    resistors:', `      rs: { a: s, b: vss, r: 5.4k }${extra}`,
    '    output: { node: out, v: 2.5 }',
  ].join('\n');

  it('without a start-up: the loop can rest with every junction off, so no-startup', () => {
    const file = analyzeText(cell(), 'ptat.bias.yaml');
    const m = file.mirrors[0]!;
    expect(m.converged).toBe(true);
    expect(m.reference!.startup).toEqual({ zeroState: true, element: false });
    const f = file.findings.find((x) => x.code === 'no-startup');
    expect(f?.severity).toBe('error');
    expect(f?.path).toEqual(['mirrors', 0, 'kind']);
    expect(f?.range.start).toEqual({ line: 9, character: 10 });
    // The solve itself found the loop's operating point, every junction on.
    expect(m.devices.every((d) => d.region === 'forward-active')).toBe(true);
  });

  it('with a resistor from vdd into the diode\'s node there is no zero-current state (Q1 would see the supply): no finding', () => {
    const file = analyzeText(cell('\n      rst: { a: vdd, b: x, r: 10M }'), 'ptat.bias.yaml');
    expect(file.mirrors[0]!.reference!.startup.zeroState).toBe(false);
    expect(file.findings.map((x) => x.code)).not.toContain('no-startup');
  });
});
