/**
 * `qpoint sweep` reads the spec as `qpoint check` does (one resolve step: design targets sized),
 * follows the solution path through a region change, and marks honestly the points where no
 * operating point exists.
 * - Square law without length modulation: VOV = sqrt(2·ID/(kp·W/L)) (Razavi, Design of Analog
 *   CMOS Integrated Circuits, 2nd ed., §2.2, from memory) — a `size: auto` mirror sized for
 *   VOV = 0.2 V carries its input current ratio at the nominal Vout in both commands.
 * - A PMOS Wilson (Gray, Hurst, Lewis, Meyer, Analysis and Design of Analog Integrated Circuits,
 *   5th ed., §4.4.4, from memory): the output device's source is the diode node Y, about one VSG
 *   below vdd. Once Vout climbs toward Y, `out` leaves saturation, then can no longer carry the
 *   diode's current: the input device loses its gate drive and no node voltage lets the ideal
 *   input current flow — there is no operating point, and the sweep must say so at those points
 *   (and only those), never print a figure there.
 */
import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { ROOT, useCli } from './harness';

const RAZAVI = readFileSync(join(ROOT, 'test/cli/fixtures/razavi-d.bias.yaml'), 'utf8');

const qpoint = useCli('sweep');

function csvRows(stdout: string): { vout: string; iout: number; rout: number; converged: string }[] {
  const [head, ...lines] = stdout.trim().split('\n');
  expect(head).toBe('vout_V,iout_A,rout_ohm,converged');
  return lines.map((l) => {
    const [vout, iout, rout, converged] = l.split(',');
    return { vout: vout!, iout: Number(iout), rout: Number(rout), converged: converged! };
  });
}

describe('sweep uses the same resolved spec as check', () => {
  const AUTO = RAZAVI.replace('    size: { w: 10u, l: 1u }', '    size: auto\n    design: { vov: 0.2 }\n    devices: { out: { m: 4 } }');

  it('on a spec with size: auto, Iout at the nominal Vout is the figure check reports', () => {
    const check = JSON.parse(qpoint(['check', '-', '--format', 'json'], AUTO).stdout) as
      { files: { mirrors: { iout: number; vout: number; devices: { w: number }[] }[] }[] };
    const m = check.files[0]!.mirrors[0]!;
    // Sized, not the placeholder: 4 × 100 µA through a VOV near 0.2 V.
    expect(m.iout * 1e6).toBeGreaterThan(390);
    const rows = csvRows(qpoint(['sweep', '-', '--mirror', 'copy', '--vout', '1:2:0.5', '--csv'], AUTO).stdout);
    expect(rows.map((r) => r.vout)).toEqual(['1', '1.5', '2']);
    expect(rows.every((r) => r.converged === 'true')).toBe(true);
    expect(rows[1]!.iout).toBeCloseTo(m.iout, 12);
  });
});

describe('a sweep through the rail on a PMOS Wilson', () => {
  const PWILSON = RAZAVI.replace(/mirrors:[\s\S]*$/, [
    'mirrors:',
    '  - name: pwilson',
    '    kind: wilson',
    '    type: pmos',
    '    input: 20u',
    '    size: { w: 20u, l: 2u }',
    '    output: { v: 0.6 }',
    '',
  ].join('\n'));

  it('every point converges or is marked, and the CSV voltages are the grid values', () => {
    const r = qpoint(['sweep', '-', '--mirror', 'pwilson', '--vout', '0:3:0.1', '--csv'], PWILSON);
    expect(r.code).toBe(0);
    const rows = csvRows(r.stdout);
    expect(rows.map((x) => x.vout)).toEqual(Array.from({ length: 31 }, (_, k) => String(Number((k / 10).toFixed(1)))));
    for (const row of rows) {
      if (row.converged === 'true') {
        expect(Number.isFinite(row.iout), `Iout at ${row.vout} V`).toBe(true);
      } else {
        expect(row.converged).toBe('false');
        expect(row.iout).toBeNaN();
      }
    }
    // The nominal point agrees with check; below the diode node Y (vdd − VSG of `diode`, from
    // check's own report) every point has an operating point, and only points above Y (the top
    // of the range) have none.
    const check = JSON.parse(qpoint(['check', '-', '--format', 'json'], PWILSON).stdout) as
      { files: { mirrors: { iout: number; devices: { role: string; vgs: number }[] }[] }[] };
    const nominal = check.files[0]!.mirrors[0]!;
    const at06 = rows.find((x) => x.vout === '0.6')!;
    expect(at06.converged).toBe('true');
    expect(at06.iout).toBeCloseTo(nominal.iout, 12);
    const y = 3 - nominal.devices.find((d) => d.role === 'diode')!.vgs;
    for (const row of rows) if (Number(row.vout) < y) expect(row.converged, `Vout ${row.vout} V below Y = ${y} V`).toBe('true');
    const firstFailed = rows.findIndex((x) => x.converged === 'false');
    expect(firstFailed).toBeGreaterThan(0);
    expect(Number(rows[firstFailed]!.vout)).toBeGreaterThan(y);
    expect(rows.slice(firstFailed).every((x) => x.converged === 'false')).toBe(true);
  });

  it('the text form marks the points with no operating point instead of printing NaN', () => {
    const r = qpoint(['sweep', '-', '--mirror', 'pwilson', '--vout', '0.9:3:0.3'], PWILSON);
    expect(r.code).toBe(0);
    expect(r.stdout).not.toMatch(/NaN/);
    const csv = csvRows(qpoint(['sweep', '-', '--mirror', 'pwilson', '--vout', '0.9:3:0.3', '--csv'], PWILSON).stdout);
    const marked = r.stdout.split('\n').filter((l) => l.includes('(no operating point found)'));
    expect(marked).toHaveLength(csv.filter((x) => x.converged === 'false').length);
  });
});
