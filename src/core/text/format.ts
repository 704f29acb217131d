/**
 * How every figure and user string is written for people: SI prefixes, plain numbers,
 * percentages, the caution note, and user text made safe for a terminal. One module, imported by
 * the rules' messages, the text/HTML reports, the CLI, the editor's hover and CodeLens and the
 * panel, so one figure reads the same everywhere.
 *
 * Choices, held everywhere:
 * - The minus sign is ASCII `-` (U+002D): text output is grepped and pasted into other tools, and
 *   CSV and JSON are ASCII anyway; `+` marks a positive signed figure.
 * - Percentages: 3 significant digits, never finer than 0.0001 % (below that a ratio error is
 *   numerical noise): 0.0025 → "0.25 %", -1.23e-4 → "-0.0123 %", 5.85e-6 → "0.0006 %".
 *   Yields pass 4 digits (99.55 %), since their interest is in the last decimal.
 */
import { MICRO_SIGN } from '../units/prefixes';

const STEPS = ['q', 'r', 'y', 'z', 'a', 'f', 'p', 'n', MICRO_SIGN, 'm', '', 'k', 'M', 'G', 'T', 'P', 'E', 'Z', 'Y', 'R', 'Q'];
const UNITY = STEPS.indexOf('');

/** The caution every report, hover and panel carries (design §7). */
export const CAUTION =
  'First-order hand-analysis models: confirm with transistor-level simulation on the foundry\'s models and corners before committing a design.';

/** Round to `digits` significant digits and drop trailing zeros (and a trailing point). */
function trimmed(x: number, digits: number): string {
  const s = x.toPrecision(digits);
  if (s.includes('e')) return String(Number(s));
  return s.includes('.') ? s.replace(/0+$/, '').replace(/\.$/, '') : s;
}

function infinity(value: number): string {
  return `${value < 0 ? '-' : ''}∞`;
}

/**
 * Engineering display of values: 1.2e-5, 'A' → "12 µA". Prefixes step by 10³ from quecto to
 * quetta; `digits` significant digits (default 3), trailing zeros dropped.
 */
export function formatSI(value: number, unit: string, digits = 3): string {
  const d = Math.min(Math.max(Math.round(digits), 1), 21);
  const sep = unit ? ' ' : '';
  if (Number.isNaN(value)) return `NaN${sep}${unit}`;
  if (!Number.isFinite(value)) return `${infinity(value)}${sep}${unit}`;
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

/** A plain number (ratio, IC, gm/ID) without prefix: 4.0123 → "4.01"; large or tiny values in
 *  exponent form (2.5e-5) so a column never grows to twenty characters. */
export function formatPlain(x: number, digits = 3): string {
  if (Number.isNaN(x)) return 'NaN';
  if (!Number.isFinite(x)) return infinity(x);
  if (x === 0) return '0';
  const a = Math.abs(x);
  if (a >= 1e-3 && a < 1e6) return String(Number(x.toPrecision(digits)));
  const [m, e] = x.toExponential(digits - 1).split('e');
  return `${Number(m)}e${Number(e)}`;
}

/** Finest step a percentage shows: below 0.0001 % a ratio error is numerical noise. */
const PERCENT_DECIMALS = 4;

/** A relative value as a percentage: 0.0025 → "0.25 %", -1.23e-4 → "-0.0123 %". */
export function formatPercent(value: number, digits = 3): string {
  if (Number.isNaN(value)) return 'NaN %';
  if (!Number.isFinite(value)) return `${infinity(value)} %`;
  const percent = Number(Number((value * 100).toPrecision(digits)).toFixed(PERCENT_DECIMALS));
  if (percent === 0) return '0 %';
  const decimals = Math.max(0, digits - 1 - Math.floor(Math.log10(Math.abs(percent))));
  return `${Number(percent.toFixed(Math.min(decimals, 20)))} %`;
}

/** A relative value with its sign written out: 0.0025 → "+0.25 %", -0.0212 → "-2.12 %". */
export function formatSignedPercent(value: number, digits = 3): string {
  const text = formatPercent(value, digits);
  return value > 0 && text !== '0 %' ? `+${text}` : text;
}

/** A ratio in a message: four significant digits (3.996). */
export function formatRatio(x: number): string {
  return formatPlain(x, 4);
}

/** A scale factor in a fix title: ×2.5. */
export function formatFactor(k: number): string {
  return `×${formatPlain(k, 3)}`;
}

/** A spec name in a message, as code: `out`. */
export function code(name: string): string {
  return `\`${name}\``;
}

// C0 controls, DEL and the C1 controls (U+0080–U+009F, which some terminals read as CSI).
const CONTROL = /[\u0000-\u001F\u007F-\u009F]/g;

/**
 * A user string (a title, a name, a message quoting one) made safe for a terminal: every control
 * character is written as an escape (\e, \a, \r, \n, \t, else \u00XX), so a spec cannot set the
 * window title, write the clipboard (OSC 52) or overwrite a line of a CI log with ESC, BEL or CR.
 * JSON and SARIF escape them by their own syntax.
 */
export function escapeControls(s: string): string {
  return s.replace(CONTROL, (c) => {
    switch (c) {
      case '\u001B': return '\\e';
      case '\u0007': return '\\a';
      case '\r': return '\\r';
      case '\n': return '\\n';
      case '\t': return '\\t';
      default: return `\\u${c.charCodeAt(0).toString(16).toUpperCase().padStart(4, '0')}`;
    }
  });
}
