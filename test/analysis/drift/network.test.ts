/**
 * Drift and noise of a bias network's outputs (design §12 on §9): read through the group's joint
 * circuit, so a linked output carries the drift of the root and the noise of every device above
 * it. Check values: the whole text re-analysed with vdd or the temperature moved (an independent
 * path: the network re-solved, each output re-measured) agrees with the linearized figures to
 * 2 % (design §12 "done when"); thermal noise against the hand small-signal sum over the devices
 * on the path (docs/references.md §13, the simple 1:1 mirror's 8kTγ·gm, computed).
 */
import { describe, expect, it } from 'vitest';
import { analyzeText } from '../../../src/core/analyze';
import { BOLTZMANN } from '../../../src/core/defaults';
import type { FileReport, MirrorReport } from '../../../src/core/types';
import { textOf } from '../../rules/helpers';

const rel = (a: number, b: number): number => Math.abs(a / b - 1);

/** A resistor-fed NMOS root: output `a` feeds a PMOS mirror, `b` is a leaf at 1 V. */
function chain(opts: { vdd?: number; celsius?: number; noiseOnly?: boolean; require?: string; npn?: boolean } = {}): string {
  const lambda = opts.noiseOnly ? '0' : '0.08';
  const plambda = opts.noiseOnly ? '0' : '0.1';
  return [
    'format: 1',
    'process:',
    '  tnom: 27 C',
    `  temperature: ${opts.celsius ?? 27} C`,
    '  trange: [-40 C, 125 C]',
    `  nmos: { kp: 280u, vt0: 0.45, lambda: ${lambda}, lref: 1u, gamma: ${opts.noiseOnly ? 0 : 0.45}, phi: 0.85, tcv: -1m, bex: -1.5 }`,
    `  pmos: { kp: 70u, vt0: 0.48, lambda: ${plambda}, lref: 1u, gamma: ${opts.noiseOnly ? 0 : 0.4}, phi: 0.8, tcv: -1.2m, bex: -1.3 }`,
    ...(opts.npn ? ['  npn: { is: 1e-16, bf: 100, vaf: 60, xtb: 1.5 }'] : []),
    `supplies: { vdd: ${opts.vdd ?? 1.8} }`,
    'analysis: { noise: { f: 1M, band: [1k, 10M] } }',
    'mirrors:',
    '  - name: root',
    '    kind: simple',
    `    type: ${opts.npn ? 'npn' : 'nmos'}`,
    opts.noiseOnly ? '    input: 10u' : '    input: { resistor: 120k, tc1: 1m }',
    opts.npn ? '    size: { area: 1 }' : '    size: { w: 40u, l: 1u }',
    '    outputs:',
    '      - name: a',
    '      - name: b',
    '        output: { v: 1.0 }',
    '  - name: dist',
    '    kind: simple',
    '    type: pmos',
    '    input: { from: root.a }',
    '    size: { w: 16u, l: 1u }',
    '    output: { v: 0.6 }',
    ...(opts.require ? [`    require: { noise: ${opts.require} }`] : []),
    '',
  ].join('\n');
}

const analyse = (text: string): FileReport => analyzeText(text, 'chain.bias.yaml', { anchors: false, ruleFixes: false, linkFixes: false });
const report = (r: FileReport, name: string): MirrorReport => {
  const m = r.mirrors.find((x) => x.name === name);
  if (!m) throw new Error(`no report ${name}: ${r.findings.map((f) => f.message).join('; ')}`);
  return m;
};

describe.each([['MOS', false], ['NPN-rooted (IS(T), βF(T))', true]])('a linked output drifts with its network, %s root (re-solves of the whole text agree to 2 %%)', (_, npn) => {
  const nominal = analyse(chain({ npn }));
  const h = 1e-3, dT = 0.05;
  const up = analyse(chain({ npn, vdd: 1.8 + h })), down = analyse(chain({ npn, vdd: 1.8 - h }));
  const hot = analyse(chain({ npn, celsius: 27 + dT })), cold = analyse(chain({ npn, celsius: 27 - dT }));
  it.each(['dist', 'root.a', 'root.b'])('%s', (name) => {
    const r = report(nominal, name);
    expect(r.converged).toBe(true);
    const s = (1.8 / r.iout) * (report(up, name).iout - report(down, name).iout) / (2 * h);
    expect(Math.abs(r.supplySensitivity! - s)).toBeLessThan(0.02 * Math.abs(s));
    const tc = ((report(hot, name).iout - report(cold, name).iout) / (2 * dT) / r.iout) * 1e6;
    expect(Math.abs(r.tc! - tc)).toBeLessThan(0.02 * Math.abs(tc));
  });
});

describe('a MOS network', () => {
  const nominal = analyse(chain());
  it('the fed PMOS mirror carries the root resistor’s supply dependence, not its own λ alone', () => {
    // With an ideal input the PMOS mirror's own sensitivity is a λ effect of a few percent; the
    // root's resistor makes it of order 1 (references §13 (b): 1.42 for a resistor-fed mirror).
    expect(report(nominal, 'dist').supplySensitivity!).toBeGreaterThan(0.5);
  });
  it('tcBox comes from the network re-solved across trange', () => {
    const r = analyzeText(chain(), 'chain.bias.yaml', { anchors: false, ruleFixes: false, linkFixes: false, curve: true });
    const d = report(r, 'dist');
    expect(d.drift).toHaveLength(11);
    expect(d.drift!.every((p) => p.converged)).toBe(true);
    // Its ends are the whole network re-solved at −40 and 125 °C.
    const at = (celsius: number): number => report(analyse(chain({ celsius })), 'dist').iout;
    expect(rel(d.drift![0]!.iout, at(-40))).toBeLessThan(1e-6);
    expect(rel(d.drift![10]!.iout, at(125))).toBeLessThan(1e-6);
    expect(d.tcBox).toBeGreaterThan(0);
  });
});

describe('a linked output carries the noise of every device above it', () => {
  const r = analyse(chain({ noiseOnly: true }));
  const dist = report(r, 'dist'), root = r.mirrors.find((m) => m.name === 'root.a')!;
  it('thermal, λ = 0: 8kTγ·(gm of the root pair + gm of the PMOS pair) within 2 %', () => {
    const gm = (m: MirrorReport, d: string): number => m.devices.find((x) => x.name === d)!.gm;
    const kT = BOLTZMANN * 300.15;
    // references §13: each 1:1 pair adds 4kTγ·gm for its output device and, mirrored 1:1, for its
    // diode; the root's pair is mirrored 1:1 once more by dist.
    const want = 4 * kT * (2 / 3) * (gm(root, 'ref') + gm(root, 'a.out') + gm(dist, 'ref') + gm(dist, 'out'));
    expect(rel(dist.noise!.density ** 2, want)).toBeLessThan(0.02);
  });
  it('names each device’s share: its own by name, the root’s by path', () => {
    const s = dist.noise!.shares;
    expect(Object.keys(s).sort()).toEqual(expect.arrayContaining(['out', 'ref', 'root/a.out', 'root/ref']));
    const gm = (m: MirrorReport, d: string): number => m.devices.find((x) => x.name === d)!.gm;
    const rootPart = (gm(root, 'ref') + gm(root, 'a.out')) / (gm(root, 'ref') + gm(root, 'a.out') + gm(dist, 'ref') + gm(dist, 'out'));
    expect(Math.abs(s['root/ref']! + s['root/a.out']! - rootPart)).toBeLessThan(0.02);
  });
  it('a feeding output is read as the current it delivers into the fed mirror', () => {
    // root.a's own pair: 8kTγ·gm (references §13), the fed PMOS diode's noise barely reaching it.
    const gm = (d: string): number => root.devices.find((x) => x.name === d)!.gm;
    const want = 4 * BOLTZMANN * 300.15 * (2 / 3) * (gm('ref') + gm('a.out'));
    expect(rel(root.noise!.density ** 2, want)).toBeLessThan(0.02);
  });
});

describe('noise-high on a linked output', () => {
  it('points at the size of the device that carries most of it, in the mirror above', () => {
    const text = chain({ noiseOnly: true, require: '1p' });
    const r = analyse(text);
    const f = r.findings.find((x) => x.code === 'noise-high');
    const top = /`root\/(ref|a\.out)` carries/.exec(f?.message ?? '');
    expect(top, f?.message).not.toBeNull();
    expect(f!.path.slice(0, 2)).toEqual(['mirrors', 0]);
    // The diode's size is the mirror's unit device; the bank output's device is its output.
    expect(textOf(text, f!.range)).toBe(top![1] === 'ref' ? '40u' : 'a');
  });
});
