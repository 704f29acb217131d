/**
 * The 24 SI prefixes (SI Brochure, 9th ed., 2019, Table 7, with ronna/quetta/ronto/quecto added
 * by the 27th CGPM, 2022, Resolution 3). Micro is accepted as `u`, U+00B5 (micro sign) and
 * U+03BC (Greek small mu), because all three occur in designers' files.
 */
export interface SiPrefix {
  /** The symbol as written in a value. */
  symbol: string;
  /** Power of ten. */
  exponent: number;
  name: string;
}

export const MICRO_SIGN = '\u00B5';
const GREEK_MU = '\u03BC';

export const SI_PREFIXES: readonly SiPrefix[] = [
  { symbol: 'Q', exponent: 30, name: 'quetta' },
  { symbol: 'R', exponent: 27, name: 'ronna' },
  { symbol: 'Y', exponent: 24, name: 'yotta' },
  { symbol: 'Z', exponent: 21, name: 'zetta' },
  { symbol: 'E', exponent: 18, name: 'exa' },
  { symbol: 'P', exponent: 15, name: 'peta' },
  { symbol: 'T', exponent: 12, name: 'tera' },
  { symbol: 'G', exponent: 9, name: 'giga' },
  { symbol: 'M', exponent: 6, name: 'mega' },
  { symbol: 'k', exponent: 3, name: 'kilo' },
  { symbol: 'h', exponent: 2, name: 'hecto' },
  { symbol: 'da', exponent: 1, name: 'deca' },
  { symbol: 'd', exponent: -1, name: 'deci' },
  { symbol: 'c', exponent: -2, name: 'centi' },
  { symbol: 'm', exponent: -3, name: 'milli' },
  { symbol: MICRO_SIGN, exponent: -6, name: 'micro' },
  { symbol: GREEK_MU, exponent: -6, name: 'micro' },
  { symbol: 'u', exponent: -6, name: 'micro' },
  { symbol: 'n', exponent: -9, name: 'nano' },
  { symbol: 'p', exponent: -12, name: 'pico' },
  { symbol: 'f', exponent: -15, name: 'femto' },
  { symbol: 'a', exponent: -18, name: 'atto' },
  { symbol: 'z', exponent: -21, name: 'zepto' },
  { symbol: 'y', exponent: -24, name: 'yocto' },
  { symbol: 'r', exponent: -27, name: 'ronto' },
  { symbol: 'q', exponent: -30, name: 'quecto' },
];

const BY_SYMBOL = new Map(SI_PREFIXES.map((p) => [p.symbol, p.exponent]));

/** Power of ten of a prefix symbol, or undefined when `symbol` is not exactly one prefix. */
export function prefixExponent(symbol: string): number | undefined {
  return BY_SYMBOL.get(symbol);
}

/** Prefix symbols, two-letter `da` first so that a longest match is tried first. */
export const PREFIX_SYMBOLS: readonly string[] = [...BY_SYMBOL.keys()].sort((a, b) => b.length - a.length);
