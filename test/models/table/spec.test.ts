/**
 * `table:` in a spec (design §11, §14): findings on the `table:` value naming the table's line
 * and column; table-range; corners naming a table; one table per temperature; design targets
 * read off the table's gm/ID curve; Monte Carlo on table devices.
 */
import { describe, expect, it } from 'vitest';
import { analyzeText } from '../../../src/core/analyze';
import { tableFiles } from '../../../src/core/spec/index';
import { readTable } from '../../../src/core/models/table/read';
import type { MosDeviceReport } from '../../../src/core/types';
import { modelChannel, span, tableCsv } from './make-table';
import { marked } from '../../spec/helpers';

/** An EKV NMOS and PMOS of the example's invented process (examples/sensor-afe.bias.yaml). */
const N = { kp: 280e-6, vt0: 0.45, lambda: 0.08, lref: 1e-6, gamma: 0.45, phi: 0.85, n: 1.3, tcv: -1e-3, bex: -1.5 };
const P = { kp: 70e-6, vt0: 0.48, lambda: 0.1, lref: 1e-6, gamma: 0.4, phi: 0.8, n: 1.35, tcv: -1.2e-3, bex: -1.3 };
const G = { l: [0.5e-6, 1e-6, 2e-6], vgs: span(0, 1.8, 73), vds: span(0, 1.8, 37), vsb: span(0, 1, 6) };
const NCSV = tableCsv(modelChannel(N, 'ekv'), G);
const PCSV = tableCsv(modelChannel(P, 'ekv'), G);

const spec = (nmos: string, extra = '', mirror = '    size: { w: 4u, l: 1u }\n    output: { v: 0.9 }\n') =>
  `format: 1\nprocess:\n  model: ekv\n  nmos: ${nmos}\n  pmos: { table: p.csv }\nsupplies: { vdd: 1.8 }\n${extra}mirrors:\n  - name: m1\n    kind: cascode\n    type: nmos\n    input: 10u\n${mirror}`;
const tables = { 'n.csv': NCSV, 'p.csv': PCSV };

describe('table errors are findings on the `table:` value, naming line and column', () => {
  const cases: [string, string, RegExp][] = [
    ['missing column', 'l,vgs,vds,id\n1e-6,0,1,1e-9\n', /line 1, column 1: missing column `vsb`/],
    ['non-number', 'l,vgs,vds,vsb,id\n1e-6,0,1,0,1e-9\n1e-6,0.5,1,zero,1e-6\n', /line 3, column 12: `zero` in column `vsb` is not a number/],
    ['ragged grid', 'l,vgs,vds,vsb,id\n1e-6,0,1,0,1e-9\n1e-6,1,1,0,1e-3\n1e-6,0,2,0,1e-9\n', /ragged grid: 3 rows for 4 grid points; no row for l = 0\.000001, vgs = 1, vds = 2, vsb = 0/],
    ['duplicate point', 'l,vgs,vds,vsb,id\n1e-6,0,1,0,1e-9\n1e-6,1,1,0,1e-3\n1e-6,0,2,0,1e-9\n1e-6,1,2,0,1e-3\n1e-6,0,1,0,2e-9\n', /line 6, column 1: duplicate point l = 0\.000001, vgs = 0, vds = 1, vsb = 0/],
    ['row width', 'l,vgs,vds,vsb,id\n1e-6,0,1,0\n', /line 2, column 1: 4 values where the header names 5 columns/],
  ];
  it.each(cases)('%s', (_name, csv, message) => {
    const m = marked(spec('{ table: ⟦bad.csv⟧ }'));
    const r = analyzeText(m.text, 'a.bias.yaml', { tables: { 'bad.csv': csv, 'p.csv': PCSV } });
    const f = r.findings.find((x) => x.code === 'table-error');
    expect(f?.message).toMatch(message);
    expect(f?.range).toEqual(m.range);
    expect(f?.severity).toBe('error');
  });
  it('a file the front end could not give is table-unread, with its reason', () => {
    const m = marked(spec('{ table: ⟦../n.csv⟧ }'));
    const r = analyzeText(m.text, 'a.bias.yaml', { tables: { '../n.csv': { error: 'it is outside the spec\'s folder tree' }, 'p.csv': PCSV } });
    const f = r.findings.find((x) => x.code === 'table-unread');
    expect(f?.message).toMatch(/outside the spec's folder tree/);
    expect(f?.range).toEqual(m.range);
  });
  it('kp on a table device is ignored with a warning', () => {
    const r = analyzeText(spec('{ table: n.csv, kp: 280u }'), 'a.bias.yaml', { tables });
    expect(r.findings.map((f) => f.code)).toContain('table-ignores');
  });
  it('a table reads comments, extra columns and any row order', () => {
    const r = readTable('# invented\nid,gm,vsb,vds,vgs,l\n1e-3,0,0,1,1,1e-6\n1e-9,0,0,1,0,1e-6\n1e-9,0,0,2,0,1e-6\n1e-3,0,0,2,1,1e-6\n', 't.csv');
    expect(r.ok).toBe(true);
    if (r.ok) expect([...r.table.id]).toEqual([1e-9, 1e-3, 1e-9, 1e-3]);
  });
});

describe('a clean table spec', () => {
  it('solves with no finding, the table named nowhere as an error', () => {
    const r = analyzeText(spec('{ table: n.csv, avt: 4 mV·µm }'), 'a.bias.yaml', { tables, mc: { samples: 200, seed: 1 } });
    expect(r.findings.filter((f) => f.severity !== 'info')).toEqual([]);
    expect(r.mirrors[0]!.converged).toBe(true);
    // Monte Carlo on table devices: Pelgrom's avt shifts each table device's gate
    expect(r.mirrors[0]!.sigma).toBeGreaterThan(0);
    expect(r.mirrors[0]!.mc?.samples).toBe(200);
  });
  it('table-range names the axis and the value when a device leaves the grid', () => {
    const m = marked(spec('{ table: n.csv }', '', '    size: { w: 4u, l: ⟦3u⟧ }\n    output: { v: 0.9 }\n'));
    const r = analyzeText(m.text, 'a.bias.yaml', { tables });
    const f = r.findings.find((x) => x.code === 'table-range');
    expect(f?.severity).toBe('warning');
    expect(f?.message).toMatch(/table `n\.csv`\): l = 3 µm is outside the table's 500 nm … 2 µm/);
    expect(f?.range).toEqual(m.range);
  });
  it('a corner may name another table (a slow characterisation)', () => {
    const slow = tableCsv(modelChannel({ ...N, vt0: 0.55, kp: 250e-6 }, 'ekv'), G);
    const text = spec('{ table: n.csv }', 'corners:\n  ss: { nmos: { table: n-ss.csv } }\n');
    const r = analyzeText(text, 'a.bias.yaml', { tables: { ...tables, 'n-ss.csv': slow }, corners: true });
    const ss = r.mirrors[0]!.corners!.find((c) => c.name === 'ss')!;
    const nominal = r.mirrors[0]!;
    expect(ss.converged).toBe(true);
    // the ss table's higher threshold raises the cascode's need: compliance moves up
    expect(ss.compliance).toBeGreaterThan(nominal.compliance + 0.01);
  });
  it('one table per temperature, interpolated between: halfway in temperature lies between', () => {
    const at = (tC: number) => tableCsv(modelChannel(N, 'ekv'), { ...G, temperature: [tC] });
    const tt = { 'n27.csv': at(27), 'n127.csv': at(127), 'p.csv': PCSV };
    const vgsAt = (temp: string) => analyzeText(spec('{ table: [n27.csv, n127.csv] }').replace('model: ekv', `model: ekv\n  temperature: ${temp}`), 'a.bias.yaml', { tables: tt })
      .mirrors[0]!.devices.find((d) => d.name === 'ref')!.vgs!;
    const v27 = vgsAt('27 C'), v127 = vgsAt('127 C'), v77 = vgsAt('77 C');
    expect(v27).toBeGreaterThan(v127 + 0.05);      // tcv = −1 mV/K moves VGS by ≈ −0.1 V
    expect(v77).toBeLessThan(v27);
    expect(v77).toBeGreaterThan(v127);
  });
  it('design: { gmid: 14 } reads the table\'s gm/ID curve: the sized device runs at gm/ID 14 within 3 %', () => {
    const text = spec('{ table: n.csv }', '', '    size: auto\n    design: { gmid: 14 }\n    output: { v: 1.2 }\n');
    const r = analyzeText(text, 'a.bias.yaml', { tables });
    const ref = r.mirrors[0]!.devices.find((d) => d.name === 'ref')!;
    expect(Math.abs(ref.gmId! / 14 - 1)).toBeLessThan(0.03);
  });
});

describe('device flavours: process.devices and a mirror\'s device:', () => {
  const LVT = tableCsv(modelChannel({ ...N, vt0: 0.3 }, 'ekv'), G);
  const text = `format: 1\nprocess:\n  nmos: { kp: 280u, vt0: 0.45 }\n  pmos: { kp: 70u, vt0: 0.45 }\n  devices:\n    lvt: { type: nmos, table: lvt.csv }\nsupplies: { vdd: 1.8 }\nmirrors:\n  - name: a\n    kind: simple\n    type: nmos\n    input: 10u\n    size: { w: 4u, l: 1u }\n    output: { v: 0.9 }\n  - name: b\n    kind: simple\n    type: nmos\n    device: lvt\n    input: 10u\n    size: { w: 4u, l: 1u }\n    output: { v: 0.9 }\n`;
  it('a mirror with device: lvt runs on the lvt table, the others on process.nmos', () => {
    const r = analyzeText(text, 'a.bias.yaml', { tables: { 'lvt.csv': LVT } });
    const [a, b] = r.mirrors.map((m) => m.devices.find((d) => d.name === 'ref')!.vgs);
    // square law, VT 0.45 V: VGS = VT + sqrt(2·ID/β) = 0.45 + sqrt(2·10µ/(280µ·4)) = 0.584 V (design §3)
    expect(a).toBeCloseTo(0.5836, 3);
    // the lvt table (VT0 0.3 V) needs a smaller gate drive
    expect(b).toBeLessThan(a! - 0.1);
  });
  it('a flavour that does not exist is unknown-name at the device: value', () => {
    const m = marked(text.replace('device: lvt', 'device: ⟦hvt⟧'));
    const r = analyzeText(m.text, 'a.bias.yaml', { tables: { 'lvt.csv': LVT } });
    const f = r.findings.find((x) => x.code === 'unknown-name');
    expect(f?.message).toMatch(/no device flavour `hvt` in `process.devices` \(it has `lvt`\)/);
    expect(f?.range).toEqual(m.range);
  });
});

describe('a netlist device names its own flavour (`device:`)', () => {
  const LVT = tableCsv(modelChannel({ ...N, vt0: 0.3 }, 'ekv'), G);
  const netlist = (m2: string, mirrorExtra = '') => `format: 1\nprocess:\n  nmos: { kp: 280u, vt0: 0.45 }\n  pmos: { kp: 70u, vt0: 0.45 }\n  devices:\n    lvt: { type: nmos, table: lvt.csv }\n    thick: { type: nmos, kp: 200u, vt0: 0.7 }\nsupplies: { vdd: 1.8 }\nmirrors:\n  - name: n\n    kind: netlist\n    type: nmos\n${mirrorExtra}    devices:\n      m1: { d: a, g: a, s: vss, w: 4u, l: 1u }\n      m2: { ${m2}d: a2, g: a2, s: vss, w: 4u, l: 1u }\n      m3: { d: o, g: a, s: vss, w: 4u, l: 1u }\n    currents:\n      i1: { from: vdd, to: a, i: 10u }\n      i2: { from: vdd, to: a2, i: 10u }\n    input: { source: i1 }\n    output: { node: o, v: 0.5 }\n`;
  it('m2 with device: lvt runs on the lvt table, m1 on process.nmos; the report names the table', () => {
    const r = analyzeText(netlist('device: lvt, '), 'a.bias.yaml', { tables: { 'lvt.csv': LVT } });
    expect(r.findings.filter((f) => f.severity === 'error')).toEqual([]);
    const devs = r.mirrors[0]!.devices as MosDeviceReport[];
    const m1 = devs.find((d) => d.name === 'm1')!, m2 = devs.find((d) => d.name === 'm2')!;
    // square law, VT 0.45 V: VGS = VT + sqrt(2·ID/β) = 0.45 + sqrt(2·10µ/(280µ·4)) = 0.584 V (design §3)
    expect(m1.vgs).toBeCloseTo(0.5836, 3);
    expect(m1.table).toBeUndefined();
    expect(m2.table).toBe('lvt.csv');
    // the lvt table (EKV, VT0 0.3 V) needs a smaller gate drive for the same current
    expect(m2.vgs).toBeLessThan(m1.vgs - 0.1);
  });
  it('a flavour of parameters: m2 on `thick` (VT 0.7 V) needs 0.25 V more gate drive', () => {
    const r = analyzeText(netlist('device: thick, '), 'a.bias.yaml', { tables: { 'lvt.csv': LVT } });
    const m2 = (r.mirrors[0]!.devices as MosDeviceReport[]).find((d) => d.name === 'm2')!;
    // square law: VGS = 0.7 + sqrt(2·10µ/(200µ·4)) = 0.858 V (design §3)
    expect(m2.vgs).toBeCloseTo(0.8581, 3);
  });
  it('an unknown flavour is unknown-name at the device\'s `device:` value, with a did-you-mean and its quick fix', () => {
    const m = marked(netlist('device: ⟦lvtt⟧, '));
    const r = analyzeText(m.text, 'a.bias.yaml', { tables: { 'lvt.csv': LVT } });
    const f = r.findings.find((x) => x.code === 'unknown-name');
    expect(f?.message).toMatch(/no device flavour `lvtt` in `process.devices` \(it has `lvt`, `thick`\); did you mean `lvt`\?/);
    expect(f?.range).toEqual(m.range);
    expect(f?.fixes?.[0]?.title).toBe('Change `lvtt` to `lvt`');
  });
  it('a flavour of the other type is bad-value at the value', () => {
    const m = marked(netlist('type: pmos, device: ⟦lvt⟧, '));
    const r = analyzeText(m.text, 'a.bias.yaml', { tables: { 'lvt.csv': LVT } });
    const f = r.findings.find((x) => x.code === 'bad-value' && /flavour/.test(x.message));
    expect(f?.message).toMatch(/device flavour `lvt` is nmos, but this device is pmos/);
    expect(f?.range).toEqual(m.range);
  });
  it('`device` on the netlist mirror itself is misplaced, pointing at the per-device spelling', () => {
    const r = analyzeText(netlist('', '    device: lvt\n'), 'a.bias.yaml', { tables: { 'lvt.csv': LVT } });
    expect(r.findings.find((x) => x.code === 'unknown-key')?.message).toMatch(/written per device/);
  });
});

describe('the table files a spec names (what a front end reads before analysing)', () => {
  it('lists every `table:` of the process, its flavours and corners, however its keys are written', () => {
    expect(tableFiles(spec('{ table: n.csv }'))).toEqual(['n.csv', 'p.csv']);
    // A double-quoted key may spell the word with an escape: the text is then read in full.
    expect(tableFiles('format: 1\nprocess:\n  nmos: { "t\\x61ble": esc.csv }\n')).toEqual(['esc.csv']);
    expect(tableFiles('format: 1\nprocess:\n  devices:\n    lvt: { type: nmos, table: [a.csv, b.csv] }\ncorners:\n  slow: { nmos: { table: s.csv } }\n')).toEqual(['a.csv', 'b.csv', 's.csv']);
  });

  it('names none in a spec without the word (which is then not read for it)', () => {
    expect(tableFiles('format: 1\nprocess:\n  nmos: { kp: 280u, vt0: 0.45 }\nsupplies: { vdd: 1.8 }\nmirrors: []\n')).toEqual([]);
    expect(tableFiles('format: 1\nprocess:\n  nmos: { "k\\x70": 280u, stable: yes }\n')).toEqual([]);
  });
});
