import { describe, expect, it } from 'vitest';
import { measureMirror } from '../../src/core/analysis/index';
import { applyCorner, runCorners } from '../../src/core/variation/corners';
import type { CornerSpec, ResolvedSpec } from '../../src/core/types';
import { everyKind, heldDevice, makeSpec, mirror, netlistMirror, NMOS_D, PMOS_D, sz } from './builders';

const SS: CornerSpec = {
  name: 'ss', path: ['corners', 'ss'], temperature: 398.15, vdd: 3.0,
  nmos: { vt0: { add: 0.05 }, kp: { scale: -0.1 } },
  pmos: { vt0: { add: 0.05 }, kp: { scale: -0.1 } },
};
const FF: CornerSpec = {
  name: 'ff', path: ['corners', 'ff'], temperature: 233.15, vdd: 3.6,
  nmos: { vt0: { add: -0.05 }, kp: { scale: 0.1 }, lambda: { scale: 0.2 } },
  pmos: { vt0: { add: -0.04 }, kp: { scale: 0.08 } },
};

/** The corner written out by hand: what a designer would type as a separate process. */
function handSpec(base: ResolvedSpec, which: 'ss' | 'ff'): ResolvedSpec {
  const p = base.process;
  const nmos = which === 'ss'
    ? { ...NMOS_D, vt0: 0.75, kp: 134e-6 * 0.9 }
    : { ...NMOS_D, vt0: 0.65, kp: 134e-6 * 1.1, lambda: 0.12 };
  const pmos = which === 'ss'
    ? { ...PMOS_D, vt0: 0.85, kp: 38e-6 * 0.9 }
    : { ...PMOS_D, vt0: 0.76, kp: 38e-6 * 1.08 };
  return {
    ...base,
    process: { ...p, temperature: which === 'ss' ? 398.15 : 233.15, nmos, pmos },
    supplies: { vdd: which === 'ss' ? 3.0 : 3.6, vss: 0 },
  };
}

describe('runCorners against hand-applied parameter sets', () => {
  for (const type of ['nmos', 'pmos'] as const) {
    it(`matches the engine on a hand-built corner spec for every ${type} kind`, () => {
      // PMOS outputs are absolute voltages below vdd: keep them where both supplies allow.
      const kinds = everyKind(type).map((m) => type === 'pmos'
        ? { ...m, outputs: m.outputs.map((o) => ({ ...o, output: { v: o.output.v - 0.3 } })) } : m);
      const spec = makeSpec(type === 'nmos' ? [...kinds, netlistMirror()] : kinds, { corners: [SS, FF] });
      spec.mirrors.forEach((m, i) => {
        const results = runCorners(spec, i, 0);
        expect(results.map((r) => r.name)).toEqual(['ss', 'ff']);
        (['ss', 'ff'] as const).forEach((which, k) => {
          const hand = handSpec(spec, which);
          const ref = measureMirror({ spec: hand, mirror: hand.mirrors[i]!, outputIndex: 0 });
          const r = results[k]!;
          expect(r.converged, `${m.kind} ${which}`).toBe(true);
          expect(ref.converged).toBe(true);
          // Same engine, same numbers: anything but float noise is a bug in applying the corner.
          for (const key of ['iin', 'iout', 'ratio', 'rout', 'compliance', 'sigma'] as const) {
            const a = r[key]!, b = ref[key]!;
            expect(Math.abs(a - b), `${m.kind} ${which} ${key}`).toBeLessThanOrEqual(1e-9 * Math.abs(b));
          }
          expect(r.error).toBeCloseTo(ref.error!, 12);
          const worst = ref.devices.reduce((w, d) => (d.margin < w.margin ? d : w));
          expect(r.minMargin).toBeCloseTo(worst.margin, 9);
          expect(r.minMarginDevice).toBe(worst.name);
        });
      });
    });
  }

  it('a bank output is measured at its own index', () => {
    const bank = mirror('cascode', {
      name: 'bank', vout: 0, size: sz(20e-6, 2e-6),
      outputs: [{ name: 'a', v: 2.0 }, { name: 'b', v: 2.4, devices: { out: { m: 2 }, outc: { m: 2 } } }],
    });
    const spec = makeSpec([bank], { corners: [SS] });
    const [a] = runCorners(spec, 0, 0);
    const [b] = runCorners(spec, 0, 1);
    // Output b has twice the multiplier: twice the current to the VDS correction (λ = 0.1/V).
    expect(b!.ratio / a!.ratio).toBeGreaterThan(1.98);
    expect(b!.ratio / a!.ratio).toBeLessThan(2.02);
  });
});

describe('applyCorner conventions', () => {
  it('keeps tnom, replaces temperature and supplies, and leaves the input spec untouched', () => {
    const spec = makeSpec(everyKind('nmos'), { corners: [SS] });
    const before = JSON.stringify(spec);
    const c = applyCorner(spec, SS);
    expect(JSON.stringify(spec)).toBe(before);
    expect(c.process.tnom).toBe(spec.process.tnom);
    expect(c.process.temperature).toBe(398.15);
    expect(c.supplies).toEqual({ vdd: 3.0, vss: 0 });
    expect(c.process.nmos.vt0).toBeCloseTo(0.75, 15);
    expect(c.process.nmos.kp).toBeCloseTo(134e-6 * 0.9, 18);
    // Parameters the corner does not name stay as they are.
    expect(c.process.nmos.lambda).toBe(NMOS_D.lambda);
    // A corner without temperature or supplies keeps the nominal ones.
    const bare = applyCorner(spec, { name: 'k', path: ['corners', 'k'], nmos: { kp: { scale: 0.05 } }, pmos: {} });
    expect(bare.process.temperature).toBe(spec.process.temperature);
    expect(bare.supplies).toEqual(spec.supplies);
  });

  it('+50 mV on PMOS vt0 raises |VT|: the diode VSG rises by 50 mV at the same current', () => {
    // Square law (Razavi §2, from memory): VSG = |VT| + sqrt(2·I/β); with λ = 0 and γ = 0 a
    // threshold shift moves the diode's VSG one for one.
    const spec = makeSpec([mirror('simple', { type: 'pmos', vout: 2.0, size: sz(40e-6, 2e-6) })],
      { pmos: { lambda: 0, gamma: 0 } });
    const up: CornerSpec = { name: 'hv', path: ['corners', 'hv'], nmos: {}, pmos: { vt0: { add: 0.05 } } };
    const nom = measureMirror({ spec, mirror: spec.mirrors[0]!, outputIndex: 0 });
    const cs = applyCorner(spec, up);
    const cor = measureMirror({ spec: cs, mirror: cs.mirrors[0]!, outputIndex: 0 });
    const vsg = (r: typeof nom): number => r.devices.find((d) => d.role === 'ref')!.vgs!;
    expect(vsg(cor) - vsg(nom)).toBeCloseTo(0.05, 6);
    // Hand value at the nominal point: 0.8 + sqrt(2·20 µA/(38 µA/V²·20)) = 1.029416 V.
    expect(vsg(nom)).toBeCloseTo(0.8 + Math.sqrt((2 * 20e-6) / (38e-6 * 20)), 6);
  });

  it('temperature corners follow kp(T) = kp·(T/Tnom)^bex (references §8 mobility table)', () => {
    // µ(T)/µ(300 K) for m = 1.5 (bex = −1.5): 1.45958 at 233.15 K, 0.76663 at 358.15 K,
    // 0.64952 at 400 K (computed from the power law; exponent range from Tsividis, from memory).
    // A device at fixed VGS with tcv = 0, λ = 0: ID ∝ kp, so the current ratio is the kp ratio.
    const table: [number, number][] = [[233.15, 1.45958], [358.15, 0.76663], [400, 0.64952]];
    const spec = makeSpec([heldDevice(1.0, 2.0)], { tnom: 300, nmos: { lambda: 0, tcv: 0, bex: -1.5 } });
    const nom = measureMirror({ spec, mirror: spec.mirrors[0]!, outputIndex: 0 });
    for (const [t, ratio] of table) {
      const cs = applyCorner(spec, { name: 't', path: ['corners', 't'], nmos: {}, pmos: {}, temperature: t });
      const r = measureMirror({ spec: cs, mirror: cs.mirrors[0]!, outputIndex: 0 });
      expect(r.iout / nom.iout).toBeCloseTo(ratio, 5);
    }
  });

  it('with dVT/dT = −2 mV/K the fixed-VGS current follows references §8', () => {
    // ID(T)/ID(300 K) at fixed VGS with VOV(300 K) = 0.2 V, m = 1.5, dVT/dT = −2 mV/K
    // (computed; dVT/dT typical value from Klaassen & Hes, from memory): 0.16040 at 233.15 K,
    // 1.91744 at 358.15 K, 2.59808 at 400 K.
    const table: [number, number][] = [[233.15, 0.16040], [358.15, 1.91744], [400, 2.59808]];
    const spec = makeSpec([heldDevice(0.9, 2.0)], { tnom: 300, nmos: { vt0: 0.7, lambda: 0, tcv: -2e-3, bex: -1.5 } });
    const nom = measureMirror({ spec, mirror: spec.mirrors[0]!, outputIndex: 0 });
    for (const [t, ratio] of table) {
      const cs = applyCorner(spec, { name: 't', path: ['corners', 't'], nmos: {}, pmos: {}, temperature: t });
      const r = measureMirror({ spec: cs, mirror: cs.mirrors[0]!, outputIndex: 0 });
      expect(r.iout / nom.iout).toBeCloseTo(ratio, 4);
    }
  });
});
