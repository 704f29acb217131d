import { describe, expect, it } from 'vitest';
import { measureMirror } from '../../src/core/analysis/index';
import { applyDesignTargets } from '../../src/core/design/auto-size';
import { gmIdFromIc, icFromGmId, icFromOverdrive } from '../../src/core/models/ekv';
import { MODELS } from '../../src/core/models/registry';
import { quantizeSize } from '../../src/core/sizing/quantize';
import { BOLTZMANN, ELEMENTARY_CHARGE } from '../../src/core/defaults';
import type { DesignTarget, DeviceReport, ResolvedSpec, TemplateKind } from '../../src/core/types';
import { makeSpec, mirror, sz } from './builders';

const UT300 = (BOLTZMANN * 300) / ELEMENTARY_CHARGE; // 25.852000 mV (references §1)

describe('closed-form sizing relations (DeviceModel.aspectForTarget)', () => {
  it('square law reproduces the Razavi set D: W/L = 10 at VOV = 0.386334 V, 100 µA', () => {
    // references §2 "D" (Razavi 0.5 µm set, from memory): VOV = sqrt(2·I/(k′·W/L)), no CLM.
    const ctx = { kp: 134e-6, n: 1.3, ut: UT300 };
    const model = MODELS['square-law'];
    expect(model.aspectForTarget(ctx, 100e-6, { kind: 'vov', value: 0.386334 }, 1)!).toBeCloseTo(10, 4);
    // gm/ID = 2/VOV (square law): the same device at gm/ID = 2/0.386334 V.
    expect(model.aspectForTarget(ctx, 100e-6, { kind: 'gmid', value: 2 / 0.386334 }, 1)!).toBeCloseTo(10, 4);
  });

  it('EKV reproduces references §6 "D in EKV terms": IS = 2.3284 µA, IC = 42.95 at 100 µA', () => {
    // IS = 2·n·β·U_T² (Enz, Krummenacher & Vittoz 1995, from memory): W/L = 10 gives IC 42.95.
    const ctx = { kp: 134e-6, n: 1.3, ut: UT300 };
    expect(2 * 1.3 * 134e-6 * 10 * UT300 * UT300).toBeCloseTo(2.3284e-6, 10);
    expect(MODELS.ekv.aspectForTarget(ctx, 100e-6, { kind: 'ic', value: 42.95 }, 1)!).toBeCloseTo(10, 2);
  });

  it('EKV overdrive ↔ IC follows the ln² form of references §6', () => {
    // (VP − VS)/U_T for IC = 0.01 … 100 (references §6 table, ln² form); VOV = n·(VP − VS).
    const rows: [number, number][] = [[0.01, -4.50434], [0.1, -1.97803], [1, 1.08265], [10, 6.23805], [100, 19.99991]];
    for (const [ic, x] of rows) {
      expect(icFromOverdrive(1.3 * x * UT300, 1.3, UT300) / ic).toBeCloseTo(1, 4);
    }
  });

  it('EKV gm/ID ↔ IC follows (1 − e^(−√IC))/√IC of references §6', () => {
    // Normalized gm·n·U_T/ID of the ln² form at IC = 0.01 … 100 (references §6 table, C).
    const rows: [number, number][] = [[0.01, 0.951626], [0.1, 0.857314], [1, 0.632121], [10, 0.302842], [100, 0.099995]];
    for (const [ic, g] of rows) {
      expect(gmIdFromIc(ic, 1.3, UT300) * 1.3 * UT300).toBeCloseTo(g, 6);
      expect(icFromGmId(g / (1.3 * UT300), 1.3, UT300)! / ic).toBeCloseTo(1, 4);
    }
    // Weak-inversion limit 1/(n·U_T) = 29.755 /V at n = 1.3 (references §6): unreachable above.
    expect(icFromGmId(29.8, 1.3, UT300)).toBeUndefined();
    expect(icFromGmId(29.7, 1.3, UT300)).toBeGreaterThan(0);
  });

  it('snaps to the grid (nearest, or up) and to 3 significant digits without one, as fixes do', () => {
    expect(quantizeSize(1.234e-6, 10e-9, 'nearest')).toBe(1.23e-6);
    expect(quantizeSize(1.231e-6, 10e-9, 'up')).toBe(1.24e-6);
    expect(quantizeSize(1.24e-6, 10e-9, 'up')).toBe(1.24e-6);
    expect(quantizeSize(12.3456e-6, undefined, 'nearest')).toBe(12.3e-6);
    expect(quantizeSize(12.3412e-6, undefined, 'up')).toBe(12.4e-6);
  });
});

/** Input-side roles of the template kinds (ref, refc, in, bal, and the Wilson's diode). */
const isInputSide = (role: string): boolean => ['ref', 'refc', 'in', 'bal'].includes(role);

const KINDS: [TemplateKind, number][] = [['simple', 1.2], ['cascode', 2.2], ['wide-swing', 1.4], ['wilson', 2.4], ['wilson-balanced', 2.4]];
const AUTO_W = sz(10e-6, 1e-6, 1, 'rail', { w: true });

function sizedReport(spec: ResolvedSpec, outputIndex = 0): { devices: DeviceReport[]; spec: ResolvedSpec; sized: ReturnType<typeof applyDesignTargets>['sized'] } {
  const r = applyDesignTargets(spec);
  const rep = measureMirror({ spec: r.spec, mirror: r.spec.mirrors[0]!, outputIndex });
  expect(rep.converged).toBe(true);
  return { devices: rep.devices, spec: r.spec, sized: r.sized };
}

describe('auto sizing, square law', () => {
  for (const [kind, vout] of KINDS) {
    it(`${kind}: every computed W reproduces VOV = sqrt(2·ID/(kp·W/L)) within 1 %`, () => {
      // Square law without length modulation (λ = 0): VOV = sqrt(2·ID/(kp·m·W/L)) (Razavi §2,
      // from memory). Temperature 360 K: kp(T) = kp·(T/Tnom)^bex enters the sizing.
      const spec = makeSpec([mirror(kind, { vout, size: AUTO_W, design: { kind: 'vov', value: 0.25 }, require: { ratio: 2 } })],
        { grid: 10e-9, temperature: 360, nmos: { lambda: 0 } });
      const { devices, sized } = sizedReport(spec);
      const kpT = 134e-6 * Math.pow(360 / 300.15, -1.5);
      expect(sized.length).toBe(devices.length);
      for (const s of sized) {
        const d = devices.find((x) => x.name === s.device)!;
        expect(s.w! / 10e-9).toBeCloseTo(Math.round(s.w! / 10e-9), 6);  // on the grid
        const vov = Math.sqrt((2 * s.id!) / (kpT * d.m * s.w! / d.l!));
        expect(Math.abs(vov / 0.25 - 1), `${s.device} formula`).toBeLessThan(0.01);
        // …and the engine sees the same overdrive at the solved point.
        expect(Math.abs(d.vov! / 0.25 - 1), `${s.device} solved`).toBeLessThan(0.01);
      }
    });
  }

  it('gm/ID target: gm/ID = 2/VOV at the solved point, with length modulation', () => {
    // Square law: gm/ID = 2/VOV, and the (1 + λ·VDS) factor cancels (Razavi §2, from memory).
    // The rule of one unit cell per matched pair (common practice in layout): the input-side
    // device meets the target; its output-side twin copies its W/L per finger, so its gm/ID
    // differs by its own length modulation: VOV ∝ 1/√(1 + λ·VDS), a few λ·ΔVDS/2 (within 3 %).
    for (const [kind, vout] of KINDS) {
      const spec = makeSpec([mirror(kind, { vout, size: AUTO_W, design: { kind: 'gmid', value: 12 } })], { grid: 10e-9, nmos: { lref: 1e-6 } });
      const { devices, sized } = sizedReport(spec);
      for (const s of sized) {
        const d = devices.find((x) => x.name === s.device)!;
        const twin = sized.find((t) => t !== s && t.w === s.w && t.device !== undefined && isInputSide(t.role));
        const copy = !isInputSide(s.role) && twin !== undefined;
        expect(Math.abs(d.gmId! / 12 - 1), `${kind} ${s.device}`).toBeLessThan(copy ? 0.03 : 0.01);
        expect(Math.abs(2 / d.vov! / 12 - 1)).toBeLessThan(copy ? 0.03 : 0.01);
      }
    }
  });

  it('matched pairs share one unit cell: out copies ref, outc copies refc (wide-swing, design target)', () => {
    // Without require.ratio the output branch's devices are the input branch's unit devices
    // (common practice in layout): equal W and L per finger, the ratio carried by m alone.
    const spec = makeSpec([mirror('wide-swing', { vout: 1.4, size: AUTO_W, design: { kind: 'gmid', value: 14 } })], { grid: 10e-9, nmos: { lref: 1e-6 } });
    const { devices } = sizedReport(spec);
    const byName = (n: string) => devices.find((x) => x.name === n)!;
    expect(byName('out').w).toBe(byName('ref').w);
    expect(byName('outc').w).toBe(byName('refc').w);
    expect(byName('out').l).toBe(byName('ref').l);
    // …and the input side still meets the target it was sized for (1 %).
    expect(Math.abs(byName('ref').gmId! / 14 - 1)).toBeLessThan(0.01);
    expect(Math.abs(byName('refc').gmId! / 14 - 1)).toBeLessThan(0.01);
  });

  it('IC target: IC = ID/(2·n·β·U_T²) as design §3 reports it for square-law devices', () => {
    const spec = makeSpec([mirror('cascode', { vout: 2.2, size: AUTO_W, design: { kind: 'ic', value: 5 } })], { grid: 10e-9 });
    const { devices, sized } = sizedReport(spec);
    const ut = (BOLTZMANN * 300.15) / ELEMENTARY_CHARGE;
    for (const s of sized) {
      const d = devices.find((x) => x.name === s.device)!;
      const beta = 134e-6 * d.m * d.w! / d.l!;
      expect(Math.abs(d.id! / (2 * 1.3 * beta * ut * ut) / 5 - 1)).toBeLessThan(0.01);
      expect(Math.abs(d.ic / 5 - 1)).toBeLessThan(0.01);
    }
  });

  it('with require.ratio the sizes also cancel the VDS mismatch of the pair', () => {
    // λ = 0.1 /V, VDS 0.9 V (diode) vs 1.2 V (output): a geometric 3 would give 3·1.12/1.09
    // (references §9 simple-mirror relation, from memory); the sized mirror hits 3 itself.
    const spec = makeSpec([mirror('simple', { vout: 1.2, size: AUTO_W, design: { kind: 'vov', value: 0.2 }, require: { ratio: 3 } })], { grid: 10e-9 });
    const r = applyDesignTargets(spec);
    const rep = measureMirror({ spec: r.spec, mirror: r.spec.mirrors[0]!, outputIndex: 0 });
    expect(Math.abs(rep.ratio! / 3 - 1)).toBeLessThan(0.002);
    expect(rep.ratioIdeal!).toBeLessThan(2.96);
  });

  it('without require.ratio the output copies the reference W/L per finger (m carries the ratio)', () => {
    const spec = makeSpec([mirror('cascode', { vout: 2.2, size: AUTO_W, design: { kind: 'vov', value: 0.2 }, devices: { out: { m: 4 }, outc: { m: 4 } } })], { grid: 10e-9 });
    const { devices, sized } = sizedReport(spec);
    const w = (role: string): number => sized.find((s) => s.role === role)!.w!;
    expect(w('out')).toBe(w('ref'));
    // The shared gate puts out at the reference's overdrive; the current follows m (×4) to
    // within the length-modulation error of the pair.
    const out = devices.find((d) => d.role === 'out')!;
    expect(Math.abs(out.vov! / 0.2 - 1)).toBeLessThan(0.01);
    expect(Math.abs(out.id! / (4 * 20e-6) - 1)).toBeLessThan(0.01);
  });

  it('a bias bank sizes each output for its own ratio; a resistor input is sized at its solved current', () => {
    const bank = mirror('cascode', {
      name: 'bank', vout: 0, size: AUTO_W, input: { resistor: 120e3 }, design: { kind: 'vov', value: 0.2 },
      outputs: [{ name: 'a', v: 2.0, require: { ratio: 1 } }, { name: 'b', v: 2.4, require: { ratio: 4 } }],
    });
    const spec = makeSpec([bank], { grid: 10e-9 });
    const r = applyDesignTargets(spec);
    const a = measureMirror({ spec: r.spec, mirror: r.spec.mirrors[0]!, outputIndex: 0 });
    const b = measureMirror({ spec: r.spec, mirror: r.spec.mirrors[0]!, outputIndex: 1 });
    expect(Math.abs(a.ratio! - 1)).toBeLessThan(0.003);
    expect(Math.abs(b.ratio! / 4 - 1)).toBeLessThan(0.003);
    for (const d of [...a.devices, ...b.devices]) expect(Math.abs(d.vov! / 0.2 - 1), d.name).toBeLessThan(0.01);
    expect(r.sized.map((s) => s.device).sort()).toEqual(['a.out', 'a.outc', 'b.out', 'b.outc', 'ref', 'refc']);
    // Resistor input: iin = (vdd − VGS_refc − VGS_ref)/R ≈ (3.3 − 2·(0.7 + 0.2) − body)/120 kΩ.
    expect(a.iin).toBeGreaterThan(10e-6);
    expect(a.iin).toBeLessThan(13e-6);
  });

  it('PMOS mirrors size the same way', () => {
    const spec = makeSpec([mirror('cascode', { type: 'pmos', vout: 1.0, size: AUTO_W, design: { kind: 'vov', value: 0.3 } })], { grid: 10e-9 });
    const { devices } = sizedReport(spec);
    for (const d of devices) expect(Math.abs(d.vov! / 0.3 - 1), d.name).toBeLessThan(0.01);
  });

  it('without lref, l: auto stays where it is and says why', () => {
    const spec = makeSpec([mirror('simple', { vout: 1.2, size: sz(10e-6, 1e-6, 1, 'rail', { w: true, l: true }), design: { kind: 'vov', value: 0.2 }, require: { rout: 10e6 } })], { grid: 10e-9 });
    const { sized } = applyDesignTargets(spec);
    expect(sized[0]!.l).toBeCloseTo(1e-6, 15);
    expect(sized[0]!.note).toMatch(/lref/);
  });

  it('W below wmin is raised to wmin, with a note', () => {
    const spec = makeSpec([mirror('simple', { vout: 1.2, input: 1e-6, size: AUTO_W, design: { kind: 'vov', value: 0.4 } })], { nmos: { wmin: 1e-6 } });
    const { sized } = applyDesignTargets(spec);
    for (const s of sized) { expect(s.w).toBe(1e-6); expect(s.note).toMatch(/wmin/); }
  });
});

describe('auto sizing, EKV', () => {
  const targets: DesignTarget[] = [{ kind: 'ic', value: 4 }, { kind: 'gmid', value: 15 }, { kind: 'vov', value: 0.15 }];
  for (const target of targets) {
    it(`${target.kind} = ${target.value}: every device of every kind lands on the target within 1 %`, () => {
      for (const [kind, vout] of KINDS) {
        const spec = makeSpec([mirror(kind, { vout, size: AUTO_W, design: target, require: { ratio: 2 } })], { model: 'ekv', grid: 10e-9, nmos: { lref: 1e-6 } });
        const { devices, sized } = sizedReport(spec);
        const ut = (BOLTZMANN * 300.15) / ELEMENTARY_CHARGE;
        for (const s of sized) {
          const d = devices.find((x) => x.name === s.device)!;
          const got = target.kind === 'ic' ? d.ic : target.kind === 'gmid' ? d.gmId : d.vov;
          expect(Math.abs(got! / target.value - 1), `${kind} ${s.device}`).toBeLessThan(0.01);
          if (target.kind === 'ic') {
            // IC = ID/IS, IS = 2·n·β·U_T² (references §6, EKV 1995 from memory); ID carries (1 + λ·VDS).
            const beta = 134e-6 * d.m * d.w! / d.l!;
            const lam = 0.1 * 1e-6 / d.l!;
            expect(Math.abs(d.id! / (1 + lam * d.vds!) / (2 * 1.3 * beta * ut * ut) / 4 - 1)).toBeLessThan(0.01);
          }
          if (target.kind === 'gmid') {
            // gm·n·U_T/ID = (1 − e^(−√IC))/√IC at the solved IC (references §6, C).
            expect(Math.abs(gmIdFromIc(d.ic, 1.3, ut) / 15 - 1)).toBeLessThan(0.01);
          }
        }
      }
    });
  }

  it('a gm/ID above the weak-inversion limit 1/(n·U_T) is unreachable and leaves W as given', () => {
    const spec = makeSpec([mirror('simple', { vout: 1.2, size: AUTO_W, design: { kind: 'gmid', value: 35 } })], { model: 'ekv' });
    const { sized } = applyDesignTargets(spec);
    for (const s of sized) { expect(s.w).toBe(10e-6); expect(s.note).toMatch(/weak-inversion limit/); }
  });
});

describe('l: auto from require.rout', () => {
  it('simple mirror: the shortest grid L with 1/gds ≥ require.rout, as ro = (1/λ + VDS)/ID', () => {
    // Simple mirror Rout = ro (references §3, from memory); with λ = lambda·lref/L the exact
    // small-signal ro = (1 + λ·VDS)/(λ·ID) (the (1/λ + VDS)/ID convention of references §10).
    const spec = makeSpec([mirror('simple', { vout: 1.2, size: sz(10e-6, 1e-6, 1, 'rail', { w: true, l: true }), design: { kind: 'vov', value: 0.2 }, require: { ratio: 1, rout: 2e6 } })],
      { grid: 10e-9, nmos: { lref: 1e-6 } });
    const r = applyDesignTargets(spec);
    const rep = measureMirror({ spec: r.spec, mirror: r.spec.mirrors[0]!, outputIndex: 0 });
    expect(rep.rout).toBeGreaterThanOrEqual(2e6);
    const l = r.sized[0]!.l!;
    // Hand solution (require.ratio 1 makes the output carry exactly 20 µA):
    // λ = 1/(rout·ID − VDS), L = lambda·lref/λ, rounded up to the 10 nm grid.
    const lHand = (0.1 * 1e-6) * (2e6 * 20e-6 - 1.2);
    expect(Math.abs(l - lHand)).toBeLessThanOrEqual(10e-9 + 1e-15);
    // The common length holds for both devices, and the widths follow at the target.
    expect(r.sized.every((s) => s.l === l)).toBe(true);
    expect(Math.abs(rep.iout / 20e-6 - 1)).toBeLessThan(1e-3);  // up to W snapping
    for (const d of rep.devices) expect(Math.abs(d.vov! / 0.2 - 1)).toBeLessThan(0.01);
  });

  it('cascode: Rout is met and one grid step shorter would miss it', () => {
    const make = (l: number): ResolvedSpec => makeSpec([mirror('cascode', { vout: 2.2, size: sz(10e-6, l, 1, 'rail', { w: true, l: true }), design: { kind: 'gmid', value: 10 }, require: { rout: 200e6 } })],
      { grid: 10e-9, nmos: { lref: 1e-6 } });
    const r = applyDesignTargets(make(1e-6));
    const rep = measureMirror({ spec: r.spec, mirror: r.spec.mirrors[0]!, outputIndex: 0 });
    expect(rep.rout).toBeGreaterThanOrEqual(200e6);
    const l = r.sized[0]!.l!;
    // The same design with L fixed one grid step shorter (widths still at the target) misses it.
    const fixedL = applyDesignTargets(makeSpec([mirror('cascode', { vout: 2.2, size: sz(10e-6, l - 10e-9, 1, 'rail', { w: true }), design: { kind: 'gmid', value: 10 } })], { grid: 10e-9, nmos: { lref: 1e-6 } }));
    const rs = measureMirror({ spec: fixedL.spec, mirror: fixedL.spec.mirrors[0]!, outputIndex: 0 });
    expect(rs.rout).toBeLessThan(200e6);
    // Cascode Rout ≈ gm·ro² (references §3): at fixed gm/ID, gm is fixed and ro ≈ L/(lambda·lref·ID),
    // so Rout ∝ L² to first order (the VDS·λ terms of ro make it grow a little slower): the found
    // L is within 10 % of sqrt(200 MΩ / Rout(1 µm)) µm.
    const at1u = applyDesignTargets(makeSpec([mirror('cascode', { vout: 2.2, size: sz(10e-6, 1e-6, 1, 'rail', { w: true }), design: { kind: 'gmid', value: 10 } })], { grid: 10e-9, nmos: { lref: 1e-6 } }));
    const r1 = measureMirror({ spec: at1u.spec, mirror: at1u.spec.mirrors[0]!, outputIndex: 0 });
    expect(Math.abs(l / 1e-6 / Math.sqrt(200e6 / r1.rout) - 1)).toBeLessThan(0.1);
  });
});
