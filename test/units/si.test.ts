/**
 * SI values: prefixes, units per field, percent, temperatures, signs.
 * Prefix table: SI Brochure, 9th ed. (BIPM 2019), Table 7, plus ronna R 10²⁷, quetta Q 10³⁰,
 * ronto r 10⁻²⁷, quecto q 10⁻³⁰ from the 27th CGPM (2022), Resolution 3
 * (bipm.org/en/-/2022-12-19-si-prefixes; docs/references.md §1, V).
 */
import { describe, expect, test } from 'vitest';
import { parseQuantity, readQuantity } from '../../src/core/units/si';
import type { Quantity } from '../../src/core/units/si';
import { SI_PREFIXES } from '../../src/core/units/prefixes';

function value(text: string, q: Quantity): number {
  const r = parseQuantity(text, q);
  if ('error' in r) throw new Error(`${text}: ${r.error}`);
  return r.value;
}

function error(text: string, q: Quantity): string {
  const r = parseQuantity(text, q);
  if ('value' in r) throw new Error(`${text} parsed as ${r.value}`);
  return r.error;
}

// [symbol, power of ten] — SI Brochure 9th ed. Table 7 + CGPM 2022 Res. 3.
const PREFIXES: [string, number][] = [
  ['Q', 30], ['R', 27], ['Y', 24], ['Z', 21], ['E', 18], ['P', 15], ['T', 12], ['G', 9], ['M', 6], ['k', 3],
  ['h', 2], ['da', 1], ['d', -1], ['c', -2], ['m', -3], ['\u00B5', -6], ['n', -9], ['p', -12], ['f', -15],
  ['a', -18], ['z', -21], ['y', -24], ['r', -27], ['q', -30],
];

describe('SI prefixes', () => {
  test('the table holds the 24 prefixes of the SI (plus the two other spellings of micro)', () => {
    expect(PREFIXES).toHaveLength(24);
    const distinct = new Set(SI_PREFIXES.map((p) => p.exponent));
    expect(distinct.size).toBe(24);
    expect(SI_PREFIXES).toHaveLength(26);
  });

  test.each(PREFIXES)('prefix %s alone is 10^%i (plain field)', (sym, exp) => {
    // Exactly the double nearest to the decimal value, e.g. 1.5e-6, not 1.5 × 1e-6.
    expect(value(`1.5${sym}`, 'plain')).toBe(Number(`1.5e${exp}`));
  });

  test.each(PREFIXES)('prefix %s with a unit symbol (current: %sA)', (sym, exp) => {
    expect(value(`2${sym}A`, 'current')).toBe(Number(`2e${exp}`));
  });

  test('micro: u, U+00B5 micro sign and U+03BC Greek mu are all 1e-6', () => {
    expect(value('10u', 'current')).toBe(1e-5);
    expect(value('10\u00B5', 'current')).toBe(1e-5);
    expect(value('10\u03BC', 'current')).toBe(1e-5);
    expect(value('10 \u00B5A', 'current')).toBe(1e-5);
    expect(value('10 \u03BCA', 'current')).toBe(1e-5);
    expect(value('2\u00B5m', 'length')).toBe(2e-6);
    expect(value('2um', 'length')).toBe(2e-6);
  });

  test('case matters: m milli vs M mega, p pico vs P peta, q quecto (not charge)', () => {
    expect(value('1m', 'plain')).toBe(1e-3);
    expect(value('1M', 'plain')).toBe(1e6);
    expect(value('20M', 'resistance')).toBe(2e7);
    expect(value('100m', 'voltage')).toBe(0.1);
    expect(value('1p', 'plain')).toBe(1e-12);
    expect(value('1P', 'plain')).toBe(1e15);
    expect(value('1q', 'plain')).toBe(1e-30);
    expect(value('1Q', 'plain')).toBe(1e30);
  });

  test('da (deca) is read before d (deci)', () => {
    expect(value('3da', 'plain')).toBe(30);
    expect(value('3d', 'plain')).toBe(0.3);
    expect(value('3dam', 'length')).toBe(30);
  });
});

describe('units per field', () => {
  test.each<[string, Quantity, number]>([
    ['10mV', 'voltage', 0.01],
    ['1.8V', 'voltage', 1.8],
    ['1.8 V', 'voltage', 1.8],
    ['100mA', 'current', 0.1],
    ['10uA', 'current', 1e-5],
    ['120k', 'resistance', 120e3],
    ['5 kΩ', 'resistance', 5e3],
    ['5 k\u2126', 'resistance', 5e3],          // U+2126 OHM SIGN
    ['5 k Ω', 'resistance', 5e3],
    ['1 ohm', 'resistance', 1],
    ['20 MOhm', 'resistance', 2e7],
    ['1m', 'length', 1e-3],                     // a lone prefix is the prefix, in every field
    ['1mm', 'length', 1e-3],
    ['0.18u', 'length', 0.18e-6],
    ['2 mS', 'conductance', 2e-3],
    ['2 mA/V', 'conductance', 2e-3],
    ['280u', 'transconductanceParam', 280e-6],
    ['280 µA/V²', 'transconductanceParam', 280e-6],
    ['280uA/V^2', 'transconductanceParam', 280e-6],
    ['0.08', 'inverseVoltage', 0.08],
    ['0.08 1/V', 'inverseVoltage', 0.08],
    ['0.08 V^-1', 'inverseVoltage', 0.08],
    ['12 S/A', 'inverseVoltage', 12],
    ['0.45 √V', 'sqrtVoltage', 0.45],
    ['0.45 V^0.5', 'sqrtVoltage', 0.45],
    ['-1m', 'voltagePerKelvin', -1e-3],
    ['-1 mV/K', 'voltagePerKelvin', -1e-3],
    ['4e-9', 'voltageLength', 4e-9],
    ['4 mV·µm', 'voltageLength', 4e-9],       // design §2: avt 4e-9 V·m = 4 mV·µm
    ['4 mV*um', 'voltageLength', 4e-9],
    ['4e-9 Vm', 'voltageLength', 4e-9],
    ['4e-9 V·m', 'voltageLength', 4e-9],
    ['1e-8', 'lengthUnit', 1e-8],
    ['1 %·µm', 'lengthUnit', 1e-8],            // design §2: abeta 1e-8 m = 1 %·µm
    ['10 nm', 'lengthUnit', 1e-8],
  ])('%s as %s = %d', (text, q, expected) => {
    expect(value(text, q)).toBeCloseTo(expected, 30);
    expect(Math.abs(value(text, q) - expected)).toBeLessThanOrEqual(Math.abs(expected) * 1e-15);
  });

  test('percent: 1% = 0.01, 0.3% = 0.003 (exact decimal shift)', () => {
    expect(value('1%', 'ratio')).toBe(0.01);
    expect(value('0.3%', 'ratio')).toBe(0.003);
    expect(value('0.3 %', 'ratio')).toBe(0.003);
    expect(value('4', 'ratio')).toBe(4);
  });

  test('signed values', () => {
    expect(value('+50m', 'voltage')).toBe(0.05);
    expect(value('-1m', 'voltage')).toBe(-0.001);
    expect(value('-10%', 'ratio')).toBe(-0.1);
    expect(value('+1.5e-3', 'plain')).toBe(0.0015);
    expect(value('.5u', 'length')).toBe(5e-7);
  });
});

describe('temperatures: kelvin = °C + 273.15 exactly (SI Brochure 9th ed. §2.3.1)', () => {
  test.each<[string, number]>([
    ['27 C', 300.15], ['27 °C', 300.15], ['27°C', 300.15], ['27 ℃', 300.15], ['27 degC', 300.15],
    ['300 K', 300], ['0 C', 273.15], ['-40 C', 233.15], ['125 C', 398.15], ['27', 300.15],
  ])('%s → %d K', (text, k) => {
    expect(value(text, 'temperature')).toBe(k);
  });

  test('no prefixes on temperatures', () => {
    expect(error('27 mK', 'temperature')).toContain('without a prefix');
  });
});

describe('a unit that does not fit says what the field wants', () => {
  test.each<[string, Quantity, string]>([
    ['10uA', 'length', 'expected a length (m); got a current `10uA`'],
    ['1.8V', 'current', 'expected a current (A); got a voltage `1.8V`'],
    ['5 kΩ', 'voltage', 'expected a voltage (V); got a resistance `5 kΩ`'],
    ['27 C', 'voltage', 'expected a voltage (V); got a temperature `27 C`'],
    ['2 um', 'current', 'expected a current (A); got a length `2 um`'],
    ['5 A', 'plain', 'expected a plain number (no unit); got a current `5 A`'],
  ])('%s in %s', (text, q, message) => {
    expect(error(text, q)).toBe(message);
  });

  test('unknown units, with hints for the common slips', () => {
    expect(error('10KΩ', 'resistance')).toContain('kilo is a lowercase `k`: write `kΩ`');
    expect(error('10UA', 'current')).toContain('micro is `u` or `µ`');
    expect(error('1meg', 'resistance')).toContain('mega is `M`');
    expect(error('10 mv', 'voltage')).toContain('did you mean `mV`?');
    expect(error('3 furlongs', 'length')).toContain('`furlongs` in `3 furlongs` is not a unit qpoint knows');
  });

  test('text that is not a literal is left for the expression reader', () => {
    expect(readQuantity('2*wu', 'length')).toEqual({ ok: false, reason: 'not-literal' });
    expect(readQuantity('wu', 'length')).toEqual({ ok: false, reason: 'not-literal' });
    expect(readQuantity('2u/3', 'length')).toEqual({ ok: false, reason: 'not-literal' });
    expect(readQuantity('  ', 'length')).toEqual({ ok: false, reason: 'empty' });
  });
});
