/** A netlist larger than SPEC_LIMITS.maxNetlistElements is refused while reading, with one
 *  finding on the key of its largest section (docs/findings.md, netlist-too-large). */
import { describe, expect, it } from 'vitest';
import { analyzeText } from '../../src/core/analyze';
import { SPEC_LIMITS } from '../../src/core/defaults';

function netlistText(resistors: number): string {
  const lines = [
    'format: 1',
    'process:',
    '  nmos: { kp: 280u, vt0: 0.45 }',
    '  pmos: { kp: 70u, vt0: 0.48 }',
    'supplies: { vdd: 1.8 }',
    'mirrors:',
    '  - name: big',
    '    kind: netlist',
    '    devices:',
    '      M1: { type: nmos, d: a, g: a, s: vss, w: 2u, l: 1u }',
    '      M2: { type: nmos, d: out, g: a, s: vss, w: 2u, l: 1u }',
    '    currents: { I1: { from: vdd, to: a, i: 10u } }',
    '    resistors:',                                        // line 12
  ];
  // A star of resistor pairs: vdd — hub, hub — n_k — vss (no node left floating).
  for (let k = 0; k < resistors; k++) {
    lines.push(k === 0 ? '      R0: { a: vdd, b: hub, r: 1k }' : k % 2 ? `      R${k}: { a: hub, b: n${k}, r: 10k }` : `      R${k}: { a: n${k - 1}, b: vss, r: 10k }`);
  }
  lines.push('    output: { node: out, v: 0.9 }', '    input: { source: I1 }', '');
  return lines.join('\n');
}

describe('netlist-too-large', () => {
  it('one element past the limit: a finding on `resistors`, the mirror set aside', () => {
    const n = SPEC_LIMITS.maxNetlistElements - 3 + 1;     // + 2 devices + 1 current source
    const r = analyzeText(netlistText(n), 'big.bias.yaml');
    const f = r.findings.filter((x) => x.code === 'netlist-too-large');
    expect(f.length).toBe(1);
    expect(f[0]!.severity).toBe('error');
    expect(f[0]!.message).toContain(`${SPEC_LIMITS.maxNetlistElements + 1} elements`);
    expect(f[0]!.range.start).toEqual({ line: 12, character: 4 });
    expect(f[0]!.range.end).toEqual({ line: 12, character: 13 });
    expect(r.mirrors.length).toBe(0);
  }, 30_000);
  it('at the limit: read and solved', () => {
    const r = analyzeText(netlistText(SPEC_LIMITS.maxNetlistElements - 3), 'big.bias.yaml');
    expect(r.findings.some((x) => x.code === 'netlist-too-large')).toBe(false);
    expect(r.mirrors[0]?.converged).toBe(true);
  }, 30_000);
});
