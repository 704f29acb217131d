/**
 * Writing a new value in the style of the token it replaces, so a fix reads like the designer's
 * own edit: `2u` becomes `3.4u`, `2 µm` becomes `3.4 µm`, `0.9` stays a plain number, `900m`
 * keeps its prefix style. Expressions and parameter names are replaced by a compact SI number
 * (`3.4u`): a fix replaces the value token only.
 */

/** How a numeric token was written. */
export interface TokenStyle {
  /** Surrounding quotes of the token (YAML or JSON string), or ''. */
  quote: '' | '"' | "'";
  /** true: SI prefix letters (`3.4u`); false: a plain decimal number (`3.4e-6`, `0.9`). */
  prefixed: boolean;
  /** The micro sign the author uses: 'u', 'µ' (U+00B5) or 'μ' (U+03BC). */
  micro: string;
  /** Space between the number and the prefix/unit (`10 µA`). */
  space: boolean;
  /** The unit symbol after the prefix, when the author writes one (`um` → 'm'). */
  unit: string;
  /** Exponent of the author's prefix (`0.15u` → −6), kept when the new value reads well in it. */
  exponent?: number;
}

const PREFIX_EXPONENT: Record<string, number> = {
  Q: 30, R: 27, Y: 24, Z: 21, E: 18, P: 15, T: 12, G: 9, M: 6, k: 3,
  '': 0, m: -3, u: -6, 'µ': -6, 'μ': -6, n: -9, p: -12, f: -15, a: -18, z: -21, y: -24, r: -27, q: -30,
};
/** Prefixes a fix writes (the common engineering ones). */
const WRITE_PREFIX: Record<number, string> = { 12: 'T', 9: 'G', 6: 'M', 3: 'k', 0: '', [-3]: 'm', [-6]: 'u', [-9]: 'n', [-12]: 'p', [-15]: 'f' };

const NUMBER = /^([+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?)(\s*)(.*)$/u;

/**
 * Read the style of `token` (the raw source text of a value). `unitSymbol` is the field's unit
 * ('m' for a length, 'V', 'A', 'Ω', '' for a count), used to tell `um` (micro + metre) from `u`.
 */
export function readStyle(token: string, unitSymbol: string): TokenStyle {
  let body = token.trim();
  let quote: TokenStyle['quote'] = '';
  const q = body[0];
  if ((q === '"' || q === "'") && body.endsWith(q) && body.length >= 2) {
    quote = q;
    body = body.slice(1, -1).trim();
  }
  const m = NUMBER.exec(body);
  // Anything but a number with letters after it (an expression, a parameter) gets compact SI.
  if (!m || !/^[A-Za-zµμΩ°%]*$/u.test(m[3])) return { quote, prefixed: true, micro: 'u', space: false, unit: '' };
  const suffix = m[3];
  if (suffix === '') return { quote, prefixed: false, micro: 'u', space: false, unit: '' };
  let prefix = suffix;
  let unit = '';
  if (unitSymbol && suffix.endsWith(unitSymbol) && suffix.length > unitSymbol.length &&
      PREFIX_EXPONENT[suffix.slice(0, -unitSymbol.length)] !== undefined) {
    prefix = suffix.slice(0, -unitSymbol.length);
    unit = unitSymbol;
  } else if (unitSymbol && suffix === unitSymbol && PREFIX_EXPONENT[suffix] === undefined) {
    prefix = '';
    unit = unitSymbol;
  } else if (PREFIX_EXPONENT[suffix] === undefined) {
    // A unit spelled another way (`ohm`, `V`, `A`): keep it after the prefix.
    const p = suffix[0];
    if (PREFIX_EXPONENT[p] !== undefined && suffix.length > 1) { prefix = p; unit = suffix.slice(1); } else { prefix = ''; unit = suffix; }
  }
  const micro = prefix === 'µ' || prefix === 'μ' ? prefix : 'u';
  const exponent = PREFIX_EXPONENT[prefix];
  return { quote, prefixed: true, micro, space: m[2].length > 0, unit, ...(WRITE_PREFIX[exponent] !== undefined ? { exponent } : {}) };
}

/** Shortest decimal text of `value` with at most `maxDigits` significant digits that reads back within 1e-9 relative. */
export function shortDecimal(value: number, maxDigits = 12): string {
  for (let p = 1; p <= maxDigits; p++) {
    const text = trimNumber(value.toPrecision(p));
    const back = Number(text);
    if (Math.abs(back - value) <= 1e-9 * Math.abs(value)) return text;
  }
  return trimNumber(value.toPrecision(maxDigits));
}

/** A plain, compact number: no trailing zeros; exponent form for very small or large values. */
function trimNumber(text: string): string {
  const n = Number(text);
  const abs = Math.abs(n);
  if (n !== 0 && (abs < 1e-3 || abs >= 1e6)) {
    const [mant, exp] = n.toExponential().split('e');
    return `${mant}e${Number(exp)}`;
  }
  return String(n);
}

/** `value` written in `style`; `unitless` values (counts, ratios) never get a prefix. */
export function writeLike(value: number, style: TokenStyle, unitless = false): string {
  let text: string;
  if (unitless || !style.prefixed) {
    text = shortDecimal(value);
  } else {
    const eng = value === 0 ? 0 : Math.floor(Math.log10(Math.abs(value)) / 3) * 3;
    // Keep the author's prefix (`0.15u` → `0.18u`, not `180n`) while the number stays readable.
    const kept = style.exponent !== undefined && Math.abs(value) / Math.pow(10, style.exponent) >= 0.1 &&
      Math.abs(value) / Math.pow(10, style.exponent) < 1000 ? style.exponent : undefined;
    const clamped = kept ?? Math.max(-15, Math.min(12, eng));
    let prefix = WRITE_PREFIX[clamped] ?? '';
    if (prefix === 'u') prefix = style.micro;
    const mant = shortDecimal(value / Math.pow(10, clamped));
    const sep = style.space && (prefix !== '' || style.unit !== '') ? ' ' : '';
    text = `${mant}${sep}${prefix}${style.unit}`;
  }
  return style.quote ? `${style.quote}${text}${style.quote}` : text;
}

/** Default style for an inserted value: compact SI without a unit (`3.4u`), quoted in JSON. */
export function insertedStyle(json: boolean): TokenStyle {
  return { quote: json ? '"' : '', prefixed: true, micro: 'u', space: false, unit: '' };
}
