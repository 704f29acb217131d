/** Engineering display: prefixes step by 10³ (SI Brochure 9th ed. Table 7, CGPM 2022 Res. 3);
 *  the percent is 0.01 (SI Brochure 9th ed. §5.4.7). */
import { describe, expect, it, test } from 'vitest';
import { escapeControls, formatPercent, formatPlain, formatSI, formatSignedPercent } from '../../src/core/text/format';

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

describe('number display', () => {
  it('prints ratios and IC without SI prefixes', () => {
    expect(formatPlain(1.0390935, 4)).toBe('1.039');
    expect(formatPlain(42.95)).toBe('43');
    expect(formatPlain(0.05)).toBe('0.05');
    expect(formatPlain(2.5e-5)).toBe('2.5e-5');
    expect(formatPlain(Infinity)).toBe('∞');
  });

  it('prints relative values in percent, 1 % = 0.01 (SI Brochure §5.4.7)', () => {
    expect(formatSignedPercent(0.0025)).toBe('+0.25 %');
    expect(formatSignedPercent(-0.0391)).toBe('-3.91 %');
    expect(formatPercent(0.003)).toBe('0.3 %');
  });
});

describe('escapeControls (ECMA-48 5th ed. §5: ESC, BEL, CR are control functions, not text)', () => {
  it('writes each control character as an escape and leaves other text alone', () => {
    expect(escapeControls('\u001b]0;title\u0007')).toBe('\\e]0;title\\a');
    expect(escapeControls('a\u001b[2K\rFAKE')).toBe('a\\e[2K\\rFAKE');
    expect(escapeControls('tab\there\nline')).toBe('tab\\there\\nline');
    expect(escapeControls('\u0085\u009b\u007f\u0000')).toBe('\\u0085\\u009B\\u007F\\u0000');
    expect(escapeControls('µA · Ω — 10 °C')).toBe('µA · Ω — 10 °C');
  });
});

