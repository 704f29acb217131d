/**
 * Number formatting for the panel. SI values go through the core's `formatSI` (one formatter for
 * hover, CLI and panel); this adds what only tables and axes need: percentages, plain numbers,
 * and one prefix per plot axis.
 */
import { formatSI as coreFormatSI } from '../src/core/units/format';

/** SI prefixes by power of 1000 for axis labels (SI Brochure, 9th ed.), yocto to yotta. */
const PREFIXES: Record<number, string> = {
  [-8]: 'y', [-7]: 'z', [-6]: 'a', [-5]: 'f', [-4]: 'p', [-3]: 'n', [-2]: 'µ', [-1]: 'm',
  0: '', 1: 'k', 2: 'M', 3: 'G', 4: 'T', 5: 'P', 6: 'E', 7: 'Z', 8: 'Y',
};
const MIN_POWER = -8;
const MAX_POWER = 8;

/** `value` with an engineering prefix: (1.2e-5, 'A') → "12 µA". A figure that could not be
 *  measured (NaN) shows as "—" in a table rather than "NaN A". */
export function formatSI(value: number, unit: string, digits = 3): string {
  return Number.isNaN(value) ? '—' : coreFormatSI(value, unit, digits);
}

/** Finest step a percentage shows: below 0.0001 % a ratio error is numerical noise. */
const PERCENT_DECIMALS = 4;

/** A relative value as a percentage: 0.0025 → "0.25 %", 5.85e-6 → "0.0006 %". */
export function formatPercent(value: number, digits = 3): string {
  if (!Number.isFinite(value)) return Number.isNaN(value) ? '—' : `${value < 0 ? '-' : ''}∞ %`;
  const percent = Number(roundSignificant(value * 100, digits).toFixed(PERCENT_DECIMALS));
  if (percent === 0) return '0 %';
  return `${trimNumber(percent, digits)} %`;
}

/** A plain number (ratio, IC, gm/ID) without prefix: 4.0123 → "4.01"; large or tiny values in
 *  exponent form so a column never grows to twenty characters. */
export function formatNumber(value: number, digits = 3): string {
  if (Number.isNaN(value)) return '—';
  if (!Number.isFinite(value)) return `${value < 0 ? '-' : ''}∞`;
  if (value === 0) return '0';
  const magnitude = Math.abs(value);
  if (magnitude >= 1e6 || magnitude < 1e-3) {
    const [m, e] = value.toExponential(digits - 1).split('e');
    return `${Number(m)}e${Number(e)}`;
  }
  return trimNumber(roundSignificant(value, digits), digits);
}

/** A signed relative value with an explicit sign: 0.0025 → "+0.25 %". */
export function formatSignedPercent(value: number, digits = 3): string {
  const text = formatPercent(value, digits);
  return value > 0 && Number.isFinite(value) && text !== '0 %' ? `+${text}` : text;
}

/** The prefix that suits a set of values for one plot axis: the factor to divide by and the
 *  prefixed unit for the axis label, from the largest magnitude present. */
export function axisScale(values: readonly number[], unit: string): { factor: number; unit: string } {
  let largest = 0;
  for (const v of values) if (Number.isFinite(v)) largest = Math.max(largest, Math.abs(v));
  if (largest === 0) return { factor: 1, unit };
  const power = Math.min(MAX_POWER, Math.max(MIN_POWER, Math.floor(Math.log10(largest) / 3)));
  return { factor: 1000 ** power, unit: `${PREFIXES[power]}${unit}` };
}

function roundSignificant(value: number, digits: number): number {
  return Number(value.toPrecision(digits));
}

/** Shortest text of a rounded number: no exponent form, no trailing zeros. */
function trimNumber(value: number, digits: number): string {
  const decimals = Math.max(0, digits - 1 - Math.floor(Math.log10(Math.abs(value))));
  return String(Number(value.toFixed(Math.min(decimals, 20))));
}
