/**
 * Engineering display of values: 1.2e-5, 'A' → "12 µA". Prefixes step by 10³ from quecto to
 * quetta; `digits` significant digits (default 3), trailing zeros dropped.
 */
import { MICRO_SIGN } from './prefixes';

const STEPS = ['q', 'r', 'y', 'z', 'a', 'f', 'p', 'n', MICRO_SIGN, 'm', '', 'k', 'M', 'G', 'T', 'P', 'E', 'Z', 'Y', 'R', 'Q'];
const UNITY = STEPS.indexOf('');

/** Round to `digits` significant digits and drop trailing zeros (and a trailing point). */
function trimmed(x: number, digits: number): string {
  const s = x.toPrecision(digits);
  if (s.includes('e')) return String(Number(s));
  return s.includes('.') ? s.replace(/0+$/, '').replace(/\.$/, '') : s;
}

export function formatSI(value: number, unit: string, digits = 3): string {
  const d = Math.min(Math.max(Math.round(digits), 1), 21);
  const sep = unit ? ' ' : '';
  if (Number.isNaN(value)) return `NaN${sep}${unit}`;
  if (!Number.isFinite(value)) return `${value < 0 ? '-' : ''}∞${sep}${unit}`;
  if (value === 0) return `0${sep}${unit}`;
  const sign = value < 0 ? '-' : '';
  const a = Math.abs(value);
  let step = Math.floor(Math.log10(a) / 3);
  step = Math.min(Math.max(step, -UNITY), STEPS.length - 1 - UNITY);
  let mant = a / 10 ** (3 * step);
  // Rounding may carry into the next step (999.96 → 1000): move up one prefix.
  if (Number(mant.toPrecision(d)) >= 1000 && step < STEPS.length - 1 - UNITY) {
    step += 1;
    mant = a / 10 ** (3 * step);
  }
  const prefix = STEPS[step + UNITY];
  const text = trimmed(mant, d);
  const space = unit || prefix ? (unit ? ' ' : '') : '';
  return `${sign}${text}${space}${prefix}${unit}`;
}
