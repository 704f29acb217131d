/**
 * A small hand-made FileReport for the converter tests: a simple NMOS mirror of the Razavi
 * level-1 device (docs/references.md "D": k′ = 134 µA/V², VT0 = 0.7 V, λ = 0.1 /V, W/L = 10,
 * 100 µA; parameter set from memory, numbers computed from the square law, docs/references.md §2
 * and §9 "Constructed check on D"): diode VGS = 1.067 234 V with length modulation, IOUT at
 * VOUT = 1.5 V = 103.9103 µA. gm = β·VOV·(1+λVDS), ro = 1/(λ·β/2·VOV²) (design §3 model).
 * The YAML text is the spec these numbers belong to, with anchors at its real positions.
 */
import type { FileReport, MirrorReport, MosDeviceReport } from '../../src/core/types';

export const SPEC_TEXT = [
  'format: 1',                         // 0
  'title: D check',                    // 1
  'mirrors:',                          // 2
  '  - name: copy   # simple mirror',  // 3
  '    kind: simple',                  // 4
  '    type: nmos',                    // 5
  '    input: 100u',                   // 6
  '    size: { w: 10u, l: 1u }',       // 7
  '    devices:',                      // 8
  '      out:',                        // 9
  '        w: 10u',                    // 10
  '    output: { v: 1.5 }',            // 11
  '',
].join('\n');

const vov = 0.367234;
const beta = 134e-6 * 10;

function device(role: 'ref' | 'out', vds: number): MosDeviceReport {
  const id = (beta / 2) * vov * vov * (1 + 0.1 * vds);
  const gm = beta * vov * (1 + 0.1 * vds);
  const gds = 0.1 * (beta / 2) * vov * vov;
  return {
    name: role, role, type: 'nmos', w: 10e-6, l: 1e-6, m: 1,
    id, vgs: 0.7 + vov, vds, vbs: 0, vth: 0.7, vov, vdsat: vov, margin: vds - vov,
    region: 'saturation', inversion: 'strong', ic: 42.95, gm, gds, gmb: 0, ro: 1 / gds, gmId: gm / id,
  };
}

export const REF = device('ref', 0.7 + vov);
export const OUT = device('out', 1.5);

export const MIRROR: MirrorReport = {
  name: 'copy', mirror: 'copy', kind: 'simple', type: 'nmos', converged: true, iterations: 6, residual: 1e-15,
  vout: 1.5, iin: REF.id, iout: OUT.id, ratio: OUT.id / REF.id, ratioIdeal: 1, error: OUT.id / REF.id - 1,
  rout: OUT.ro, routApprox: OUT.ro, compliance: vov, nodes: {}, devices: [REF, OUT], path: ['mirrors', 0], mirrorIndex: 0, outputIndex: 0,
};

const r = (line: number, c0: number, c1: number) => ({ start: { line, character: c0 }, end: { line, character: c1 } });

export const FILE: FileReport = {
  file: 'd-check.bias.yaml', parsed: true, title: 'D check',
  mirrors: [MIRROR],
  findings: [
    {
      severity: 'warning', code: 'low-margin', message: 'out: margin 0.1 V is below limits.margin', path: ['mirrors', 0, 'devices', 'out', 'w'],
      range: r(10, 11, 14),
      fixes: [
        { title: 'Widen out to 12u', edits: [{ range: r(10, 11, 14), newText: '12u' }], preferred: true },
        { title: 'Widen out to 20u', edits: [{ range: r(10, 11, 14), newText: '20u' }] },
      ],
    },
    {
      severity: 'info', code: 'note', message: 'an info finding', path: ['mirrors', 0, 'size'], range: r(7, 4, 8),
      fixes: [{ title: 'info fix', edits: [{ range: r(7, 10, 27), newText: '{ w: 20u, l: 2u }' }], preferred: true }],
    },
  ],
  anchors: [
    { kind: 'mirror', path: ['mirrors', 0], range: r(3, 10, 14), report: 'copy' },
    { kind: 'device', path: ['mirrors', 0, 'devices', 'out'], range: r(9, 6, 9), report: 'copy', device: 'out' },
  ],
};
