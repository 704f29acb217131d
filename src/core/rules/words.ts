/** Numbers in messages: SI prefixes, three significant digits, signed percentages. */
import { formatSI } from '../units/format';

export const volts = (v: number): string => formatSI(v, 'V');
export const amps = (v: number): string => formatSI(v, 'A');
export const ohms = (v: number): string => formatSI(v, 'Ω');
export const metres = (v: number): string => formatSI(v, 'm');

/** 0.0123 → "1.23 %". */
export function percent(x: number, digits = 3): string {
  return `${trim((x * 100).toPrecision(digits))} %`;
}

/** -0.0212 → "−2.12 %", 0.004 → "+0.4 %". */
export function signedPercent(x: number, digits = 3): string {
  if (x === 0) return '0 %';
  const body = trim((Math.abs(x) * 100).toPrecision(digits));
  return `${x < 0 ? '−' : '+'}${body} %`;
}

/** A signed voltage: margins are often negative. */
export function signedVolts(v: number): string {
  return v < 0 ? `−${formatSI(-v, 'V')}` : formatSI(v, 'V');
}

export function ratioText(x: number): string {
  return trim(x.toPrecision(4));
}

export function factor(k: number): string {
  return `×${trim(k.toPrecision(3))}`;
}

export function code(name: string): string {
  return `\`${name}\``;
}

function trim(s: string): string {
  if (s.includes('e')) return String(Number(s));
  return s.includes('.') ? s.replace(/0+$/, '').replace(/\.$/, '') : s;
}
