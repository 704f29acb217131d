/**
 * output-beyond-reach: a Wilson whose output lies where its output stack cannot conduct gets the
 * cause in numbers, not the solver's log. The edges are the square law's VGS at a current,
 *   VGS = VT + √(2·I/(kp·W/L)),  VT = VT0 + γ·(√(2φF + VSB) − √(2φF)),  VDSsat = VGS − VT
 * (Razavi, Design of Analog CMOS Integrated Circuits, ch. 2; Sedra and Smith, Microelectronic
 * Circuits, the MOSFET chapter — from memory), computed here from the Halden 180 parameters of
 * helpers.ts (nmos kp 280 µ, VT0 0.45, γ 0.45, 2φF 0.85; pmos kp 70 µ, VT0 0.48, γ 0.4, 2φF 0.8).
 * Printed figures have three significant digits: each is held to its rounding (half a unit in
 * the last digit, 0.5 mV below 1 V, 5 mV above).
 */
import { describe, expect, it } from 'vitest';
import type { Finding } from '../../src/core/types';
import { resolveText } from '../../src/core/resolve';
import { analyzeSpec } from '../../src/core/analysis/index';
import { runRules } from '../../src/core/rules/index';
import { check, spec, textOf } from './helpers';

const wilson = (name: string, kind: string, type: string, input: string, size: string, v: string): string =>
  spec([`  - name: ${name}`, `    kind: ${kind}`, `    type: ${type}`, `    input: ${input}`, `    size: ${size}`, `    output: { v: ${v} }`]);

const vgs = (i: number, kp: number, wl: number, vt: number): number => vt + Math.sqrt((2 * i) / (kp * wl));
const vt = (vt0: number, gamma: number, phi: number, vsb: number): number => vt0 + gamma * (Math.sqrt(phi + vsb) - Math.sqrt(phi));

/** The figure printed after `before` (V or mV), in volts. */
function volts(message: string, before: string): number {
  const at = message.indexOf(before);
  expect(at, before).toBeGreaterThanOrEqual(0);
  const m = /^(-?[\d.]+) (m?)V/.exec(message.slice(at + before.length));
  expect(m, `a voltage after "${before}"`).not.toBeNull();
  return Number(m![1]) * (m![2] === 'm' ? 1e-3 : 1);
}

/** Held to the rounding of a three-digit figure. */
function near(printed: number, exact: number): void {
  expect(Math.abs(printed - exact)).toBeLessThanOrEqual(Math.abs(exact) >= 1 ? 5e-3 : 5e-4);
}

function reachOf(text: string): Finding | undefined {
  return check(text).findings.find((f) => f.code === 'output-beyond-reach');
}

describe('output-beyond-reach', () => {
  it('NMOS Wilson held below its diode node: the floor, the saturation edge, VT as the limit of any sizing, at output.v', () => {
    // 38 µA in 8.4 µm / 0.4 µm: VOV = √(2·38µ/(280µ·21)) = 113.7 mV, VGS = 563.7 mV; out
    // saturates from VGS + VOV = 677.4 mV; an output held at 0.43 V is below VT = 0.45 V itself.
    const text = wilson('wn', 'wilson', 'nmos', '38u', '{ w: 8.4u, l: 0.4u }', '0.43');
    const { findings } = check(text);
    expect(findings.map((f) => f.code)).toEqual(['output-beyond-reach']);
    const f = findings[0]!;
    expect(f.severity).toBe('error');
    expect(f.range).toEqual({ start: { line: 12, character: 17 }, end: { line: 12, character: 21 } });
    expect(textOf(text, f.range)).toBe('0.43');
    const floor = vgs(38e-6, 280e-6, 21, 0.45);
    const vov = floor - 0.45;
    expect(f.message).toMatch(/^wn: no operating point: the output at 430 mV is below /);
    near(volts(f.message, 'the output at 430 mV is below '), floor);
    near(volts(f.message, 'The output must be above '), floor);
    near(volts(f.message, 'for the stack to conduct and at least '), floor + vov);
    near(volts(f.message, 'at any width the stack conducts only above '), 0.45);
    expect(f.message).toMatch(/`diode`'s VGS at 38 µA/);
    // Its gate, VGS + VT(VSB = VGS) + VOV ≈ 1.25 V, fits the 1.8 V supply: nothing about the stack.
    expect(vgs(38e-6, 280e-6, 21, vt(0.45, 0.45, 0.85, floor)) + floor).toBeLessThan(1.8);
    expect(f.message).not.toMatch(/even then/);
    expect(f.fixes).toBeUndefined();
  });

  it('balanced Wilson: the same output stack, the same floor', () => {
    const f = reachOf(wilson('wb', 'wilson-balanced', 'nmos', '38u', '{ w: 8.4u, l: 0.4u }', '0.43'));
    expect(f).toBeDefined();
    near(volts(f!.message, 'the output at 430 mV is below '), vgs(38e-6, 280e-6, 21, 0.45));
  });

  it('PMOS Wilson held above vdd − VSG: edges measured down from vdd, and vdd − VT past any sizing', () => {
    // 9 µA in 9.9 µm / 0.9 µm: VSG = 0.48 + √(2·9µ/(70µ·11)) = 632.9 mV, the floor at
    // 1.8 − 0.633 = 1.167 V, saturation from 1.014 V; 1.42 V is above vdd − VT = 1.32 V.
    const f = reachOf(wilson('wp', 'wilson', 'pmos', '9u', '{ w: 9.9u, l: 0.9u }', '1.42'));
    expect(f).toBeDefined();
    const vsg = vgs(9e-6, 70e-6, 11, 0.48);
    near(volts(f!.message, 'the output at 1.42 V is above '), 1.8 - vsg);
    near(volts(f!.message, 'for the stack to conduct and at most '), 1.8 - vsg - (vsg - 0.48));
    near(volts(f!.message, 'at any width the stack conducts only below '), 1.8 - 0.48);
  });

  it('a stack that would not fit even with the output in reach says so, with body effect in `out`', () => {
    // 50 µA in 0.9 µm / 0.3 µm: VSG_diode = 0.48 + √(2·50µ/(70µ·3)) = 1.170 V, floor 630 mV;
    // out's source 1.170 V from its bulk: VT = 0.48 + 0.4·(√(0.8 + 1.170) − √0.8) = 683.7 mV,
    // its gate at 0.630 − 1.374 = −744 mV: the two VSG need 2.54 V of the 1.8 V supply.
    const f = reachOf(wilson('wq', 'wilson', 'pmos', '50u', '{ w: 0.9u, l: 0.3u }', '1.30'));
    expect(f).toBeDefined();
    const vsgDiode = vgs(50e-6, 70e-6, 3, 0.48);
    const vsgOut = vgs(50e-6, 70e-6, 3, vt(0.48, 0.4, 0.8, vsgDiode));
    near(volts(f!.message, 'the output at 1.3 V is above '), 1.8 - vsgDiode);
    // Saturation would need the output at 0.630 − 0.690 = −60 mV: past vss itself.
    near(volts(f!.message, 'for the stack to conduct and at most '), 1.8 - vsgDiode - (vsgDiode - 0.48));
    expect(f!.message).toMatch(/at most -\d+(\.\d+)? mV \(beyond vss\) for `out` to saturate/);
    near(volts(f!.message, "even then `out`'s gate (node `x`) would sit at "), 1.8 - vsgDiode - vsgOut);
    near(volts(f!.message, '`diode` + `out` needs '), vsgDiode + vsgOut);
  });

  it('an output in triode past the saturation edge whose solve ran off the rail: the edge, and moving there converges', () => {
    // 48 µA in 55.2 µm / 2.3 µm: VSG = 0.48 + √(2·48µ/(70µ·24)) = 719.0 mV, the floor at
    // 1.081 V, saturation from 1.081 − 0.239 = 841.9 mV. At 1.07 V out conducts, but with 11 mV
    // across it in triode it needs more VSG than the supply gives.
    const f = reachOf(wilson('wt', 'wilson', 'pmos', '48u', '{ w: 55.2u, l: 2.3u }', '1.07'));
    expect(f).toBeDefined();
    const vsg = vgs(48e-6, 70e-6, 24, 0.48);
    expect(f!.message).toMatch(/^wt: no operating point: the output at 1\.07 V is 2\d\d mV past /);
    near(volts(f!.message, 'mV past '), 1.8 - vsg - (vsg - 0.48));
    expect(f!.message).toMatch(/the solve ran node `x` to -\d+(\.\d+)? mV, beyond vss/);
    near(volts(f!.message, 'The output must be below '), 1.8 - vsg);
    // The advice holds: at the saturation edge the mirror solves, with `out` saturated.
    const moved = check(wilson('wt', 'wilson', 'pmos', '48u', '{ w: 55.2u, l: 2.3u }', '0.84')).findings;
    expect(moved.map((x) => x.code)).not.toContain('output-beyond-reach');
    expect(moved.map((x) => x.code)).not.toContain('not-saturated');
    expect(moved.map((x) => x.code)).not.toContain('stack-over-supply');
  });

  it('an output within reach never gets it: just past the floor (out in triode, solved) and well past it', () => {
    for (const v of ['0.58', '0.9']) {
      const { findings } = check(wilson('wn', 'wilson', 'nmos', '38u', '{ w: 8.4u, l: 0.4u }', v));
      expect(findings.map((f) => f.code), v).not.toContain('output-beyond-reach');
      expect(findings.map((f) => f.code), v).not.toContain('no-convergence');
    }
    // 0.58 V is 16 mV past the 564 mV floor: out conducts in triode, the finding is not-saturated.
    expect(check(wilson('wn', 'wilson', 'nmos', '38u', '{ w: 8.4u, l: 0.4u }', '0.58')).findings.map((f) => f.code)).toContain('not-saturated');
  });

  it('a stack over the supply that is not the output\'s doing stays stack-over-supply', () => {
    // The PMOS cascode of findings.test.ts: two VSG above 3.1 V at 40 µA in 1 µm / 1 µm.
    const text = spec(['  - name: pc', '    kind: cascode', '    type: pmos', '    input: 40u', '    size: { w: 1u, l: 1u }', '    output: { v: 0.3 }']);
    expect(check(text).findings.map((f) => f.code)).toEqual(['stack-over-supply']);
  });
});

describe('no-convergence wording', () => {
  it('says "did not converge" once, then what the solver tried', () => {
    // A simple mirror's report marked as not converged, as the solver notes it (circuit/newton.ts).
    const { parsed } = resolveText(spec(['  - name: s', '    kind: simple', '    type: nmos', '    input: 10u', '    size: { w: 2u, l: 1u }', '    output: { v: 0.9 }']), 'case.bias.yaml');
    const reports = analyzeSpec(parsed.spec!).map((r) => ({ ...r, converged: false, solveNote: 'tried Newton (200 iterations), then source stepping (stalled at 0.0 %: 200 iterations)' }));
    const f = runRules(parsed, reports).find((x) => x.code === 'no-convergence');
    expect(f?.message).toBe('s: no DC operating point (the solve did not converge: tried Newton (200 iterations), then source stepping (stalled at 0.0 %: 200 iterations)); its other figures are not checked');
    const other = runRules(parsed, reports.map((r) => ({ ...r, solveNote: 'not solved: device out: W = 0 m is not a positive length' }))).find((x) => x.code === 'no-convergence');
    expect(other?.message).toBe('s: no DC operating point (the solve did not converge: not solved: device out: W = 0 m is not a positive length); its other figures are not checked');
  });
});
