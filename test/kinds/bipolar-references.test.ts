/**
 * The bipolar self-biased references (design §9.2, §10) through the solver from a spec: the
 * ΔVBE/R (PTAT) cell's current UT·ln(n)/R and loop gain 1/(1 + ln n), the VBE/R cell's
 * I·R = UT·ln(I/IS) and loop gain UT/VBE, both cells' temperature coefficients against the
 * derivatives of those laws, an independent hand-written netlist of each cell at finite β and
 * Early voltage, and the start-up check with its MOSFET start-up device (docs/references.md §14).
 */
import { describe, expect, it } from 'vitest';
import { analyzeText } from '../../src/core/analyze';
import { buildMirror } from '../../src/core/analysis/solve';
import { assemble } from '../../src/core/circuit/assemble';
import { resolveText } from '../../src/core/resolve';
import type { FileReport, MirrorReport } from '../../src/core/types';

const rel = (a: number, b: number): number => Math.abs(a / b - 1);

interface Opts { bf?: number; vaf?: number; vdd?: number; t?: string }

/** Check device DB of references §14 (IS 1e-16 A at 300 K = tnom; βF and VAF as asked: the
 *  textbook laws assume β → ∞ and no Early effect), its PNP twin, and MOSFETs for the start-up
 *  device: NMOS set D and the PMOS set of references §2. */
function spec(mirror: string, o: Opts = {}): string {
  const bj = `{ is: 1e-16, bf: ${o.bf ?? 1e9}${o.vaf !== undefined ? `, vaf: ${o.vaf}` : ''} }`;
  return `format: 1
process:
  tnom: 300 K
  temperature: ${o.t ?? '300 K'}
  nmos: { kp: 134u, vt0: 0.7, phi: 0.9 }
  pmos: { kp: 38u, vt0: 0.8, gamma: 0.4, phi: 0.8 }
  npn: ${bj}
  pnp: ${bj}
supplies: { vdd: ${o.vdd ?? 3} }
mirrors:
${mirror}`;
}

const ptat = (o: { type?: string; k?: number; r?: string; startup?: string } = {}): string => `  - name: pt
    kind: ptat
    type: ${o.type ?? 'npn'}
    k: ${o.k ?? 8}
    resistor: ${o.r ?? '10k'}${o.startup ? `\n    startup: ${o.startup}` : ''}
    output: { v: 1.5 }
`;

const vbe = (o: { type?: string; r?: string; startup?: string } = {}): string => `  - name: vr
    kind: vbe-resistor
    type: ${o.type ?? 'npn'}
    resistor: ${o.r ?? '6.5k'}${o.startup ? `\n    startup: ${o.startup}` : ''}
    output: { v: 1.5 }
`;

function only(text: string): { file: FileReport; m: MirrorReport } {
  const file = analyzeText(text, 'ref.bias.yaml');
  const m = file.mirrors[0];
  if (!m) throw new Error(`no report: ${JSON.stringify(file.findings)}`);
  return { file, m };
}
const codes = (f: FileReport): string[] => f.findings.map((x) => x.code);
const current = (text: string): number => only(text).m.reference!.current;

describe('ΔVBE/R (PTAT) reference, β → ∞, no Early effect (references §14)', () => {
  // I = UT·ln(n)/R: Gray, Hurst, Lewis and Meyer, Analysis and Design of Analog Integrated
  // Circuits, 5th ed., §4.4.2–4.4.3 (from memory; the values computed in references §14). Loop
  // gain 1/(1 + ln n) (derived, references §14).
  it.each([
    ['npn', 8, '10k', 5.375772e-6, 0.324734],
    ['pnp', 8, '10k', 5.375772e-6, 0.324734],
    ['npn', 2, '10k', 1.791924e-6, 0.590616],
    ['pnp', 8, '52k', 1.033802e-6, 0.324734],
  ])('%s, n = %s, R = %s: I = %s A, loop gain %s', (type, k, r, i, lg) => {
    const { file, m } = only(spec(ptat({ type, k, r })));
    expect(m.converged).toBe(true);
    expect(rel(m.reference!.current, i)).toBeLessThan(1e-6);
    expect(m.reference!.loopGain!).toBeCloseTo(lg, 5);
    // `k:` is the emitter-area ratio of `wide` over `ref`; the tap copies ref 1:1.
    expect(m.devices.find((d) => d.name === 'wide')).toMatchObject({ area: k });
    expect(rel(m.iout, i)).toBeLessThan(1e-6);
    expect(codes(file)).toContain('no-startup');
  });
  it('at 300.15 K: 5.378460 µA (UT grows with T)', () => {
    expect(rel(current(spec(ptat(), { t: '300.15 K' })), 5.37846e-6)).toBeLessThan(1e-6);
  });
  it('its temperature coefficient is +1/T with a resistor without drift: +3333.33 ppm/K at 300 K', () => {
    // (1/I)·dI/dT by a central difference of two solves, ±0.05 K.
    const lo = current(spec(ptat(), { t: '299.95 K' })), hi = current(spec(ptat(), { t: '300.05 K' }));
    const tc = ((hi - lo) / 0.1 / current(spec(ptat()))) * 1e6;
    expect(tc).toBeCloseTo(3333.33, 1);
  });
});

describe('VBE/R reference, β → ∞, no Early effect (references §14)', () => {
  // I·R = UT·ln(I/IS): Gray, Hurst, Lewis and Meyer, 5th ed., §4.4.2 (from memory; the values
  // computed in references §14). Loop gain 1/(gm·R) = UT/VBE, the bipolar form of the
  // VGS-over-resistor cell's (derived, references §14).
  it.each([
    ['npn', '6.5k', 110.284282e-6, 0.716848],
    ['pnp', '6.5k', 110.284282e-6, 0.716848],
    ['npn', '7k', 102.122888e-6, 0.71486],
    ['pnp', '70k', 9.328481e-6, 0.652994],
  ])('%s, R = %s: I = %s A, VBE %s V', (type, r, i, vbeValue) => {
    const { m } = only(spec(vbe({ type, r })));
    expect(m.converged).toBe(true);
    expect(rel(m.reference!.current, i)).toBeLessThan(1e-6);
    const ref = m.devices.find((d) => d.name === 'ref') as unknown as { vbe: number };
    expect(ref.vbe).toBeCloseTo(vbeValue, 6);
    expect(m.reference!.loopGain!).toBeCloseTo(0.025852 / vbeValue, 5);
    expect(rel(m.iout, i)).toBeLessThan(1e-6);
  });
  it('its temperature coefficient (EG 1.11 eV, XTI 3, resistor without drift): −2270.68 ppm/K at 300 K', () => {
    const lo = current(spec(vbe(), { t: '299.95 K' })), hi = current(spec(vbe(), { t: '300.05 K' }));
    const tc = ((hi - lo) / 0.1 / current(spec(vbe()))) * 1e6;
    expect(tc).toBeCloseTo(-2270.68, 1);
  });
});

describe('an independent hand-written netlist of each cell, finite β and Early voltage (1e-4)', () => {
  // The same circuits written device by device (references §14): the template's wiring must be
  // the textbook cell, base currents and Early effect included (βF 100, VAF 50 V, VDD 2 V).
  const o: Opts = { bf: 100, vaf: 50, vdd: 2 };
  const su = '{ w: 1u, l: 4u }';
  it('PTAT, n = 8, R = 10 kΩ, NMOS start-up from y into x', () => {
    const { m: t } = only(spec(ptat({ startup: su }), o));
    const { m: n } = only(spec(`  - name: ptn
    kind: netlist
    type: npn
    devices:
      q1: { type: npn, c: x, b: x, e: 0 }
      q2: { type: npn, c: y, b: x, e: s, area: 8 }
      q3: { type: pnp, c: x, b: y, e: vdd }
      q4: { type: pnp, c: y, b: y, e: vdd }
      qo: { type: npn, c: out, b: x, e: 0 }
    resistors:
      rs: { a: s, b: 0, r: 10k }
    startup:
      ms: { type: nmos, d: y, g: y, s: x, w: 1u, l: 4u }
    output: { node: out, v: 1.5 }
`, o));
    expect(t.converged && n.converged).toBe(true);
    for (const node of ['x', 'y', 's']) expect(rel(t.nodes[node]!, n.nodes[node]!), node).toBeLessThan(1e-4);
    const ic = (m: MirrorReport, name: string): number => (m.devices.find((d) => d.name === name) as unknown as { ic: number }).ic;
    for (const [a, b] of [['ref', 'q1'], ['wide', 'q2'], ['top', 'q3'], ['topd', 'q4'], ['out', 'qo']] as const) {
      expect(rel(ic(t, a), ic(n, b)), a).toBeLessThan(1e-4);
    }
    expect(rel(t.iout, n.iout)).toBeLessThan(1e-4);
    // Base currents: the resistor carries wide's emitter current, (1 + 1/β) over its IC.
    expect(rel(t.reference!.current, n.nodes.s! / 10e3)).toBeLessThan(1e-4);
  });
  it('VBE/R, R = 6.5 kΩ, NMOS start-up from y into b', () => {
    const { m: t } = only(spec(vbe({ startup: su }), o));
    const { m: n } = only(spec(`  - name: vrn
    kind: netlist
    type: npn
    devices:
      q1: { type: npn, c: b, b: a, e: 0 }
      q2: { type: npn, c: y, b: b, e: a }
      q3: { type: pnp, c: b, b: y, e: vdd }
      q4: { type: pnp, c: y, b: y, e: vdd }
      qo: { type: npn, c: out, b: a, e: 0 }
    resistors:
      rs: { a: a, b: 0, r: 6.5k }
    startup:
      ms: { type: nmos, d: y, g: y, s: b, w: 1u, l: 4u }
    output: { node: out, v: 1.5 }
`, o));
    expect(t.converged && n.converged).toBe(true);
    for (const node of ['a', 'b', 'y']) expect(rel(t.nodes[node]!, n.nodes[node]!), node).toBeLessThan(1e-4);
    expect(rel(t.iout, n.iout)).toBeLessThan(1e-4);
    expect(rel(t.reference!.current, n.nodes.a! / 6.5e3)).toBeLessThan(1e-4);
  });
});

describe('the start-up check of the bipolar references (design §9.2, §13)', () => {
  it.each(['npn', 'pnp'])('%s: without a start-up device the zero-current state is found: no-startup, naming the MOSFET to add', (type) => {
    for (const text of [spec(ptat({ type })), spec(vbe({ type }))]) {
      const { file, m } = only(text);
      expect(m.reference!.startup).toEqual({ zeroState: true, element: false });
      const f = file.findings.find((x) => x.code === 'no-startup')!;
      expect(f.message).toContain(`a diode-connected ${type === 'npn' ? 'nmos' : 'pmos'} device`);
    }
  });
  it.each(['npn', 'pnp'])('%s at VDD 2 V: the MOSFET start-up conducts at zero current and is off at the operating point', (type) => {
    for (const text of [spec(ptat({ type, startup: '{ w: 1u, l: 4u }' }), { vdd: 2 }), spec(vbe({ type, startup: '{ w: 1u, l: 4u }' }), { vdd: 2 })]) {
      const { file, m } = only(text);
      expect(m.reference!.startup).toMatchObject({ zeroState: true, element: true, conducts: true });
      expect(m.reference!.startup.current!).toBeLessThan(m.reference!.startup.limit!);
      expect(m.devices.find((d) => d.role === 'startup')?.type).toBe(type === 'npn' ? 'nmos' : 'pmos');
      expect(codes(file).filter((c) => c.startsWith('startup') || c === 'no-startup')).toEqual([]);
    }
  });
  it('at VDD 3 V the PTAT cell\'s start-up stays on (VDD − 2·VBE > VT): startup-leak', () => {
    const { file } = only(spec(ptat({ startup: '{ w: 1u, l: 4u }' })));
    expect(codes(file)).toContain('startup-leak');
  });
});

describe('what the spec reader asks of a bipolar reference', () => {
  it('the closing mirror\'s polarity must be in the process: an NPN cell without process.pnp', () => {
    const text = spec(ptat()).replace(/\n {2}pnp: [^\n]*/, '');
    const file = analyzeText(text, 'ref.bias.yaml');
    const f = file.findings.find((x) => x.code === 'missing-key')!;
    expect(f.message).toContain('`pnp`');
    expect(f.message).toContain('`pt`');
  });
  it('a start-up device is a MOSFET: `area` there is refused', () => {
    const file = analyzeText(spec(ptat({ startup: '{ area: 1 }' })), 'ref.bias.yaml');
    expect(file.findings.some((x) => x.severity === 'error' && x.path.join('.').startsWith('mirrors.0.startup'))).toBe(true);
  });
  it('`k:` on vbe-resistor is misplaced, and ptat without `k` asks for the emitter-area ratio', () => {
    const misplaced = analyzeText(spec(vbe().replace('resistor: 6.5k', 'resistor: 6.5k\n    k: 8')), 'ref.bias.yaml');
    expect(misplaced.findings.find((x) => x.path.join('.') === 'mirrors.0.k')?.message).toContain('ptat');
    const missing = analyzeText(spec(ptat().replace('    k: 8\n', '')), 'ref.bias.yaml');
    expect(missing.findings.find((x) => x.code === 'missing-key')?.message).toContain('emitter-area ratio');
  });
});

describe('derivatives', () => {
  it('the assembled Jacobian of ptat and vbe-resistor in both polarities, MOSFET start-up included, matches finite differences of the residuals', () => {
    for (const type of ['npn', 'pnp']) {
      for (const text of [spec(ptat({ type, startup: '{ w: 1u, l: 4u }' }), { bf: 100, vaf: 50 }), spec(vbe({ type, startup: '{ w: 1u, l: 4u }' }), { bf: 100, vaf: 50 })]) {
        const s = resolveText(text, 'j.bias.yaml').parsed.spec!;
        const mc = buildMirror({ spec: s, mirror: s.mirrors[0]!, outputIndex: 0 }, 1.5, undefined);
        mc.guess();
        const c = mc.circuit, ws = mc.ws;
        for (let k = c.nFree; k < ws.nt; k++) ws.v[k] = c.fixedV[k]!;
        for (let k = 0; k < c.nFree; k++) ws.v[k] = ws.v[k]! + 0.01 * mc.sign * (k + 1);   // off the solution
        assemble(c, ws, 1, 1e-12);
        const G = ws.G.slice();
        let scale = 0;
        for (let i = 0; i < c.nFree; i++) for (let j = 0; j < c.nFree; j++) scale = Math.max(scale, Math.abs(ws.pattern.entry(G, i, j)));
        const h = 1e-7;
        for (let j = 0; j < c.nFree; j++) {
          const v0 = ws.v[j]!;
          ws.v[j] = v0 + h; assemble(c, ws, 1, 1e-12);
          const Fp = ws.F.slice(0, ws.n);
          ws.v[j] = v0 - h; assemble(c, ws, 1, 1e-12);
          ws.v[j] = v0;
          for (let i = 0; i < c.nFree; i++) {
            const fd = (Fp[i]! - ws.F[i]!) / (2 * h);
            expect(Math.abs(fd - ws.pattern.entry(G, i, j)), `${type} ∂F${i}/∂v${j}`).toBeLessThan(1e-4 * scale);
          }
        }
      }
    }
  });
});
