/** Engineering display: prefixes step by 10³ (SI Brochure 9th ed. Table 7, CGPM 2022 Res. 3). */
import { describe, expect, test } from 'vitest';
import { formatSI } from '../../src/core/units/format';

describe('formatSI', () => {
  test.each<[number, string, number | undefined, string]>([
    [1.2e-5, 'A', undefined, '12 µA'],
    [1.8, 'V', undefined, '1.8 V'],
    [120e3, 'Ω', undefined, '120 kΩ'],
    [2.1e7, 'Ω', undefined, '21 MΩ'],
    [0.1, 'V', undefined, '100 mV'],
    [4.0123e-5, 'A', 4, '40.12 µA'],
    [999.96e-6, 'A', 3, '1 mA'],          // rounding carries into the next prefix
    [-2.5e-3, 'V', undefined, '-2.5 mV'],
    [0, 'A', undefined, '0 A'],
    [1e-30, 'A', undefined, '1 qA'],
    [1e30, 'A', undefined, '1 QA'],
    [1e-33, 'A', undefined, '0.001 qA'],  // below quecto stays in quecto
    [0.5, '', undefined, '500m'],
    [4, '', undefined, '4'],
  ])('%d %s (%s digits) → %s', (v, unit, digits, text) => {
    expect(formatSI(v, unit, digits)).toBe(text);
  });

  test('non-finite values', () => {
    expect(formatSI(Number.NaN, 'A')).toBe('NaN A');
    expect(formatSI(Infinity, 'Ω')).toBe('∞ Ω');
    expect(formatSI(-Infinity, 'Ω')).toBe('-∞ Ω');
  });
});
