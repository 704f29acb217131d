/**
 * Number formatting for the panel: the core's one formatting module (src/core/text/format.ts,
 * shared with hover, CodeLens and the CLI), with what only tables and axes need on top: a figure
 * that could not be measured (NaN) shows as "—", and one prefix per plot axis.
 */
import {
  formatPercent as corePercent, formatPlain, formatSI as coreFormatSI, formatSignedPercent as coreSignedPercent,
} from '../src/core/text/format';

/** SI prefixes by power of 1000 for axis labels (SI Brochure, 9th ed.), yocto to yotta. */
const PREFIXES: Record<number, string> = {
  [-8]: 'y', [-7]: 'z', [-6]: 'a', [-5]: 'f', [-4]: 'p', [-3]: 'n', [-2]: 'µ', [-1]: 'm',
  0: '', 1: 'k', 2: 'M', 3: 'G', 4: 'T', 5: 'P', 6: 'E', 7: 'Z', 8: 'Y',
};
const MIN_POWER = -8;
const MAX_POWER = 8;

const dash = (value: number, text: () => string): string => (Number.isNaN(value) ? '—' : text());

/** `value` with an engineering prefix: (1.2e-5, 'A') → "12 µA". */
export function formatSI(value: number, unit: string, digits = 3): string {
  return dash(value, () => coreFormatSI(value, unit, digits));
}

/** A relative value as a percentage: 0.0025 → "0.25 %". */
export function formatPercent(value: number, digits = 3): string {
  return dash(value, () => corePercent(value, digits));
}

/** A signed relative value: 0.0025 → "+0.25 %". */
export function formatSignedPercent(value: number, digits = 3): string {
  return dash(value, () => coreSignedPercent(value, digits));
}

/** A plain number (ratio, IC, gm/ID) without prefix: 4.0123 → "4.01". */
export function formatNumber(value: number, digits = 3): string {
  return dash(value, () => formatPlain(value, digits));
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
