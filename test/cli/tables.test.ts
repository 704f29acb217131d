/**
 * Tables through the CLI (issue 17's "done when"): a table generated from an independent
 * model — written here, not the project's — reproduces that model's operating point within
 * 0.5 % in current; the CLI reads tables relative to the spec and refuses ones outside its
 * folder tree.
 */
import { mkdirSync, mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { useCli } from './harness';
import { span, tableCsv } from '../models/table/make-table';

const run = useCli('tables');

/**
 * An independent long-channel model (not qpoint's): the interpolation between weak and strong
 * inversion of Binkley ("Tradeoffs and Optimization in Analog CMOS Design", 2008, §3.7, from
 * memory), id = IS·IC, IC = ln²(1 + e^((VGS − VT − m·VSB)/(2·n·U_T))), with a DIBL-like VT
 * drop (σ·VDS) and a (1 + λ·VDS) factor, saturating as 1 − e^(−VDS/(2·U_T)·…).
 */
const UT = 0.025875, NS = 1.35, VT0 = 0.42, KP = 300e-6, SIGMA = 0.02, LAMBDA = 0.06, BODY = 0.25;
function independent(l: number, vgs: number, vds: number, vsb: number): number {
  const vt = VT0 + BODY * vsb - SIGMA * vds;
  const x = (vgs - vt) / (2 * NS * UT);
  const lf = x > 30 ? x : Math.log1p(Math.exp(x));
  const xr = x - vds / (2 * UT);
  const lr = xr > 30 ? xr : Math.log1p(Math.exp(xr));
  const is = 2 * NS * (KP / l) * UT * UT;
  return is * (lf * lf - lr * lr) * (1 + LAMBDA * vds);
}

/** The independent model's simple mirror: the diode's VGS for iin (bisection), then the output
 *  device at that VGS and the output voltage, both W wide. */
function mirrorOf(iin: number, w: number, l: number, vout: number): { vgs: number; iout: number } {
  let lo = 0, hi = 1.8;
  for (let k = 0; k < 100; k++) {
    const mid = 0.5 * (lo + hi);
    if (w * independent(l, mid, mid, 0) < iin) lo = mid; else hi = mid;
  }
  const vgs = 0.5 * (lo + hi);
  return { vgs, iout: w * independent(l, vgs, vout, 0) };
}

function folder(): string {
  const dir = mkdtempSync(join(tmpdir(), 'qpoint-tables-'));
  mkdirSync(join(dir, 'spec'));
  const grid = { l: [0.5e-6, 1e-6, 2e-6], vgs: span(0, 1.8, 73), vds: span(0, 1.8, 37), vsb: span(0, 1, 6) };
  writeFileSync(join(dir, 'spec', 'n.csv'), tableCsv((l, vgs, vds, vsb) => independent(l, vgs, vds, vsb), grid));
  writeFileSync(join(dir, 'outside.csv'), 'l,vgs,vds,vsb,id\n');
  return dir;
}

const SPEC = (table: string) => `format: 1
process:
  nmos: { table: ${table} }
supplies: { vdd: 1.8 }
mirrors:
  - name: m1
    kind: simple
    type: nmos
    input: 10u
    size: { w: 5u, l: 1u }
    output: { v: 0.9 }
`;

describe('qpoint check on a table device', () => {
  it('reproduces the independent model\'s operating point within 0.5 % in current', () => {
    const dir = folder();
    const file = join(dir, 'spec', 'a.bias.yaml');
    writeFileSync(file, SPEC('n.csv'));
    const r = run(['check', '--format', 'json', file], '');
    expect(r.stderr).toBe('');
    const report = JSON.parse(r.stdout).files[0];
    const m = report.mirrors[0];
    const want = mirrorOf(10e-6, 5e-6, 1e-6, 0.9);
    expect(Math.abs(m.iout / want.iout - 1)).toBeLessThan(5e-3);
    const ref = m.devices.find((d: { name: string }) => d.name === 'ref');
    expect(Math.abs(ref.vgs - want.vgs)).toBeLessThan(1e-3);
    // DIBL makes this mirror's ratio 12 % off: qpoint reports what the model does
    expect(report.findings.map((f: { code: string }) => f.code)).toContain('ratio-error');
  });
  it('refuses a table outside the spec\'s folder tree, and an absolute path, as table-unread', () => {
    const dir = folder();
    const file = join(dir, 'spec', 'a.bias.yaml');
    for (const name of ['../outside.csv', join(dir, 'outside.csv'), 'missing.csv']) {
      writeFileSync(file, SPEC(JSON.stringify(name)));
      const r = run(['check', '--format', 'json', file], '');
      const f = JSON.parse(r.stdout).files[0].findings.find((x: { code: string }) => x.code === 'table-unread');
      expect(f?.message, name).toMatch(name === 'missing.csv' ? /no such file/ : /outside the spec's folder tree|absolute path/);
      expect(r.code).toBe(1);
    }
  });
});
