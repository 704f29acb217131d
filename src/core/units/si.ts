/**
 * Reading values with SI prefixes and unit symbols (design §2 "Values").
 *
 * A literal is a signed decimal number, optional whitespace, then an optional unit text. Rules:
 * - A unit text that is exactly one SI prefix is that prefix, whatever the field: `100m` is
 *   milli (0.1), `20M` is mega, `1m` in a length is 1 mm, `120k` is 120e3, `1q` is 1e-30.
 * - Otherwise the unit text is an optional prefix plus the field's unit symbol, checked against
 *   the field: `10mV` = 0.01 V, `1.8V`, `100mA` = 0.1 A, `5 kΩ`, `1 ohm`, `4 mV·µm` = 4e-9 V·m.
 *   Whitespace inside the unit text is ignored (`5 k Ω` = `5kΩ`).
 * - `%` means 1e-2 (`1%` = 0.01); `%·µm` is the relative-length form of Pelgrom's A_β.
 * - Temperatures take `K`, `C`, `°C`, `℃` or `degC`, no prefix; a bare number is °C. The result
 *   is in kelvin (°C + 273.15, exact by the definition of the kelvin).
 * - The result is exact to the nearest double: the prefix shifts the decimal exponent before
 *   the text is converted (`1.5u` → Number('1.5e-6')).
 */
import { prefixExponent, PREFIX_SYMBOLS } from './prefixes';
import { ZERO_CELSIUS } from '../defaults';

export type Quantity = 'current' | 'voltage' | 'length' | 'resistance' | 'conductance' | 'temperature'
  | 'ratio' | 'transconductanceParam' | 'inverseVoltage' | 'sqrtVoltage' | 'voltagePerKelvin'
  | 'voltageLength' | 'lengthUnit' | 'capacitance' | 'capacitancePerArea' | 'frequency' | 'noiseDensity'
  | 'plain';

/** How a quantity is named in messages: noun and the unit it takes. */
const QUANTITY_NAMES: Record<Quantity, { noun: string; unit: string }> = {
  current: { noun: 'a current', unit: 'A' },
  voltage: { noun: 'a voltage', unit: 'V' },
  length: { noun: 'a length', unit: 'm' },
  resistance: { noun: 'a resistance', unit: 'Ω' },
  conductance: { noun: 'a conductance', unit: 'S' },
  temperature: { noun: 'a temperature', unit: '°C or K' },
  ratio: { noun: 'a ratio', unit: 'plain number or %' },
  transconductanceParam: { noun: 'a transconductance parameter', unit: 'A/V²' },
  inverseVoltage: { noun: 'an inverse voltage', unit: '1/V' },
  sqrtVoltage: { noun: 'a square-root voltage', unit: '√V' },
  voltagePerKelvin: { noun: 'a temperature coefficient', unit: 'V/K' },
  voltageLength: { noun: 'a voltage × length', unit: 'V·m, e.g. 4 mV·µm' },
  lengthUnit: { noun: 'a relative length', unit: 'm, e.g. 1 %·µm' },
  capacitance: { noun: 'a capacitance', unit: 'F' },
  capacitancePerArea: { noun: 'a capacitance per area', unit: 'F/m²' },
  frequency: { noun: 'a frequency', unit: 'Hz' },
  noiseDensity: { noun: 'a noise density', unit: 'A/√Hz' },
  plain: { noun: 'a plain number', unit: 'no unit' },
};

/** `a length (m)` */
export function quantityLabel(q: Quantity): string {
  const n = QUANTITY_NAMES[q];
  return `${n.noun} (${n.unit})`;
}

interface UnitPart {
  /** Alternative spellings of this part. */
  symbols: readonly string[];
  /** An SI prefix may precede the symbol. */
  prefixed?: boolean;
  /** A product separator (·, ⋅, *, .) may precede this part. */
  separated?: boolean;
}

interface UnitForm {
  parts: readonly UnitPart[];
  /** Extra power of ten (e.g. -2 for %). */
  exponent?: number;
  /** Added after scaling (°C → K). */
  offset?: number;
}

const OHM = ['Ω', '\u2126', 'ohms', 'ohm', 'Ohms', 'Ohm'];
const SQUARED = ['/V²', '/V^2', '/V**2', '/V2'];

const FORMS: Record<Quantity, readonly UnitForm[]> = {
  current: [{ parts: [{ symbols: ['A'], prefixed: true }] }],
  voltage: [{ parts: [{ symbols: ['V'], prefixed: true }] }],
  length: [{ parts: [{ symbols: ['m'], prefixed: true }] }],
  resistance: [{ parts: [{ symbols: OHM, prefixed: true }] }],
  conductance: [
    { parts: [{ symbols: ['S'], prefixed: true }] },
    { parts: [{ symbols: ['A'], prefixed: true }, { symbols: ['/V'] }] },
  ],
  temperature: [
    { parts: [{ symbols: ['K'] }] },
    { parts: [{ symbols: ['°C', '℃', 'degC', 'C'] }], offset: ZERO_CELSIUS },
  ],
  ratio: [{ parts: [{ symbols: ['%'] }], exponent: -2 }],
  transconductanceParam: [{ parts: [{ symbols: ['A'], prefixed: true }, { symbols: SQUARED }] }],
  inverseVoltage: [
    { parts: [{ symbols: ['1/V', '/V', 'V^-1', 'V⁻¹', 'V**-1', 'V-1'] }] },
    { parts: [{ symbols: ['S'], prefixed: true }, { symbols: ['/A'] }] },
  ],
  sqrtVoltage: [{ parts: [{ symbols: ['√V', 'V^0.5', 'V^(1/2)', 'V^1/2', 'V**0.5', 'sqrt(V)', 'V½', 'V^½'] }] }],
  voltagePerKelvin: [{ parts: [{ symbols: ['V'], prefixed: true }, { symbols: ['/K', '/°C', '/℃', '/C'] }] }],
  voltageLength: [{ parts: [{ symbols: ['V'], prefixed: true }, { symbols: ['m'], prefixed: true, separated: true }] }],
  lengthUnit: [
    { parts: [{ symbols: ['m'], prefixed: true }] },
    { parts: [{ symbols: ['%'] }, { symbols: ['m'], prefixed: true, separated: true }], exponent: -2 },
  ],
  capacitance: [{ parts: [{ symbols: ['F'], prefixed: true }] }],
  capacitancePerArea: [{ parts: [{ symbols: ['F'], prefixed: true }, { symbols: ['/m²', '/m^2', '/m2'] }] }],
  frequency: [{ parts: [{ symbols: ['Hz'], prefixed: true }] }],
  noiseDensity: [{ parts: [{ symbols: ['A'], prefixed: true }, { symbols: ['/√Hz', '/sqrt(Hz)', '/rtHz'] }] }],
  plain: [],
};

/** Order in which a unit that does not fit the field is identified, for the message. */
const IDENTIFY_ORDER: readonly Quantity[] = ['current', 'voltage', 'resistance', 'conductance', 'temperature',
  'length', 'transconductanceParam', 'inverseVoltage', 'sqrtVoltage', 'voltagePerKelvin', 'voltageLength',
  'ratio', 'lengthUnit', 'capacitance', 'capacitancePerArea', 'frequency', 'noiseDensity'];

const SEPARATORS = ['·', '⋅', '*', '.'];
const NUMBER = /^[+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?/;
const UNIT_LETTERS = /^[A-Za-z\u00B5\u03BC\u03A9\u2126°℃%]+$/;

export type QuantityRead =
  | { ok: true; value: number }
  /** Does not read as number + unit: the caller may try it as an expression. */
  | { ok: false; reason: 'not-literal' }
  | { ok: false; reason: 'empty' }
  /** The unit belongs to another quantity (`got`). */
  | { ok: false; reason: 'wrong-unit'; unit: string; got: Quantity; fix?: string }
  | { ok: false; reason: 'unknown-unit'; unit: string; hint?: string; fix?: string };

/** Sum of prefix exponents when `unit` spells `form`, else undefined. Backtracks over prefixes. */
function matchForm(unit: string, form: UnitForm): number | undefined {
  const parts = form.parts;
  const step = (pos: number, k: number, exp: number): number | undefined => {
    if (k === parts.length) return pos === unit.length ? exp : undefined;
    const part = parts[k];
    const starts = [pos];
    if (part.separated) for (const s of SEPARATORS) if (unit.startsWith(s, pos)) starts.push(pos + s.length);
    for (const at of starts) {
      for (const pre of part.prefixed ? ['', ...PREFIX_SYMBOLS] : ['']) {
        if (!unit.startsWith(pre, at)) continue;
        for (const sym of part.symbols) {
          if (!unit.startsWith(sym, at + pre.length)) continue;
          const r = step(at + pre.length + sym.length, k + 1, exp + (pre ? prefixExponent(pre)! : 0));
          if (r !== undefined) return r;
        }
      }
    }
    return undefined;
  };
  return step(0, 0, 0);
}

function fits(unit: string, q: Quantity): { exponent: number; offset: number } | undefined {
  if (q !== 'temperature') {
    const p = prefixExponent(unit);
    if (p !== undefined) return { exponent: p, offset: 0 };
  }
  for (const form of FORMS[q]) {
    const e = matchForm(unit, form);
    if (e !== undefined) return { exponent: e + (form.exponent ?? 0), offset: form.offset ?? 0 };
  }
  return undefined;
}

/** Which quantity a unit text belongs to, if any. */
export function identifyUnit(unit: string): Quantity | undefined {
  const u = unit.replace(/\s+/g, '');
  for (const q of IDENTIFY_ORDER) if (FORMS[q].some((f) => matchForm(u, f) !== undefined)) return q;
  return undefined;
}

/** A hint for a common slip in a unit, and the unit it suggests (for the quick fix). */
function hintFor(unit: string, q: Quantity): { hint: string; alt?: string } | undefined {
  const tries: [string, string][] = [];
  if (unit.startsWith('K')) tries.push(['k' + unit.slice(1), 'kilo is a lowercase `k`']);
  if (unit.startsWith('U')) tries.push(['u' + unit.slice(1), 'micro is `u` or `µ`']);
  if (/^meg/i.test(unit)) tries.push(['M' + unit.slice(3), 'mega is `M` (and `m` is milli)']);
  for (const [alt, why] of tries) if (fits(alt, q)) return { hint: `${why}: write \`${alt}\``, alt };
  if (q === 'temperature') return { hint: 'a temperature takes °C or K, without a prefix' };
  for (const alt of [unit[0] + unit.slice(1).toUpperCase(), unit.toLowerCase(), unit.toUpperCase()]) {
    if (alt !== unit && fits(alt, q)) return { hint: `unit symbols are case-sensitive: did you mean \`${alt}\`?`, alt };
  }
  return undefined;
}

/** The prefix of a unit of another quantity (`uA` → `u`), when it fits q alone. */
function prefixOnly(unit: string, q: Quantity): string | undefined {
  if (q === 'temperature') return undefined;
  for (const pre of PREFIX_SYMBOLS) if (unit.length > pre.length && unit.startsWith(pre) && fits(pre, q)) return pre;
  return undefined;
}

/** Read a literal value for a field of quantity q. Temperatures come back in kelvin. */
export function readQuantity(text: string, q: Quantity): QuantityRead {
  const t = text.trim();
  if (t === '') return { ok: false, reason: 'empty' };
  const num = NUMBER.exec(t);
  if (!num) return { ok: false, reason: 'not-literal' };
  const unit = t.slice(num[0].length).replace(/\s+/g, '');
  const eAt = num[0].search(/[eE]/);
  const mantissa = eAt < 0 ? num[0] : num[0].slice(0, eAt);
  const exp10 = eAt < 0 ? 0 : Number(num[0].slice(eAt + 1));
  const fit = unit === '' ? { exponent: 0, offset: q === 'temperature' ? ZERO_CELSIUS : 0 } : fits(unit, q);
  if (fit) {
    const v = Number(`${mantissa}e${exp10 + fit.exponent}`);
    // °C → K: round the sum to 15 digits so that -40 C is 233.15 K, not 233.14999999999998.
    return { ok: true, value: fit.offset ? Number((v + fit.offset).toPrecision(15)) : v };
  }
  // `fix`: the literal with its unit corrected (`10uA` in a length → `10u`), for a quick fix.
  const got = identifyUnit(unit);
  if (got) {
    const pre = prefixOnly(unit, q);
    return pre !== undefined ? { ok: false, reason: 'wrong-unit', unit, got, fix: num[0] + pre } : { ok: false, reason: 'wrong-unit', unit, got };
  }
  if (UNIT_LETTERS.test(unit)) {
    const h = hintFor(unit, q);
    const r: QuantityRead = { ok: false, reason: 'unknown-unit', unit };
    if (h) r.hint = h.hint;
    if (h?.alt !== undefined) r.fix = t.slice(0, num[0].length) + (t.slice(num[0].length).match(/^\s*/)?.[0] ?? '') + h.alt;
    return r;
  }
  return { ok: false, reason: 'not-literal' };
}

/** One-line description of a failed read, without the field name. */
export function describeRead(read: Exclude<QuantityRead, { ok: true }>, q: Quantity, text: string): string {
  const want = quantityLabel(q);
  switch (read.reason) {
    case 'empty': return `expected ${want}; the value is empty`;
    case 'not-literal': return `expected ${want}; \`${text.trim()}\` is not a number with a unit`;
    case 'wrong-unit': return `expected ${want}; got ${QUANTITY_NAMES[read.got].noun} \`${text.trim()}\``;
    case 'unknown-unit':
      return `expected ${want}; \`${read.unit}\` in \`${text.trim()}\` is not a unit qpoint knows` +
        (read.hint ? ` (${read.hint})` : '');
  }
}

/** Parse a literal (number, SI prefix, unit checked against q). Temperatures in kelvin. */
export function parseQuantity(text: string, q: Quantity): { value: number } | { error: string } {
  const r = readQuantity(text, q);
  return r.ok ? { value: r.value } : { error: describeRead(r, q, text) };
}
