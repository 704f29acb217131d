// A VDS mismatch that the sizing already compensates raises no `vds-mismatch` warning; the same
// mirror without a required ratio still gets one. The size in the spec is the closed form for a
// simple mirror under length modulation (square law, docs/references.md §2 and §9):
// W_out/W_ref = R·(1 + λ·VDS,ref)/(1 + λ·VDS,out), with VDS,ref = VGS of the diode.
import { describe, expect, it } from 'vitest';
import { analyzeText } from '../../src/core/analyze';

const spec = (extra: string) => `format: 1
process:
  nmos: { kp: 280u, vt0: 0.45, lambda: 0.08, lref: 1u }
  pmos: { kp: 70u, vt0: 0.48 }
supplies: { vdd: 1.8 }
mirrors:
  - name: copy
    kind: simple
    type: nmos
    input: 20u
    size: { w: 7u, l: 2u }
    devices: { out: { w: WOUT } }
    output: { v: 0.9 }
${extra}`;

/** Diode VGS with its own (1 + λ·VGS), solved by fixed point (λ = 0.08·1u/2u = 0.04 /V). */
function compensatedWout(): number {
  const beta = 280e-6 * 7 / 2, lambda = 0.04, id = 20e-6;
  let vgs = 0.6;
  for (let k = 0; k < 50; k++) vgs = 0.45 + Math.sqrt((2 * id) / (beta * (1 + lambda * vgs)));
  return 2 * 7e-6 * (1 + lambda * vgs) / (1 + lambda * 0.9);
}

describe('vds-mismatch once the sizing compensates it', () => {
  const w = `${(compensatedWout() * 1e6).toFixed(4)}u`;

  it('is silent when the required ratio is met', () => {
    const r = analyzeText(spec('    require: { ratio: 2 }\n').replace('WOUT', w), 'c.bias.yaml');
    expect(r.mirrors[0]!.ratio).toBeCloseTo(2, 4);
    expect(r.findings.filter((f) => f.code === 'vds-mismatch' || f.code === 'ratio-error')).toEqual([]);
  });

  it('still warns when no ratio is required (the geometric ratio is then the target)', () => {
    const r = analyzeText(spec('').replace('WOUT', w), 'c.bias.yaml');
    const codes = r.findings.map((f) => f.code);
    expect(codes).toContain('vds-mismatch');
  });
});
