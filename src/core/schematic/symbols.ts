/**
 * Symbol geometry: each symbol's box and where its pins sit on it (on the box's edge, so the
 * layout routes wires to them), in px. The drawing of each symbol is in draw.ts.
 */
import type { PinSide } from './circuit';
import type { Point, SymbolKind } from './model';

export interface SymbolShape {
  w: number;
  h: number;
  pins: Partial<Record<PinSide, Point>>;
}

const TRANSISTOR: SymbolShape = { w: 36, h: 56, pins: { top: { x: 26, y: 0 }, ctl: { x: 0, y: 28 }, bottom: { x: 26, y: 56 } } };
const TWO_PIN: SymbolShape = { w: 24, h: 48, pins: { top: { x: 12, y: 0 }, bottom: { x: 12, y: 48 } } };

export const SYMBOLS: Record<SymbolKind, SymbolShape> = {
  nmos: TRANSISTOR,
  pmos: TRANSISTOR,
  npn: TRANSISTOR,
  pnp: TRANSISTOR,
  isrc: TWO_PIN,
  res: TWO_PIN,
  // A node held at a voltage: an open terminal on a stem, above its node or below it.
  'held-top': { w: 12, h: 26, pins: { bottom: { x: 6, y: 26 } } },
  'held-bottom': { w: 12, h: 26, pins: { top: { x: 6, y: 0 } } },
  // A link to another mirror of the network (this input fed by it, this output feeding it):
  // a tag on a stem, above its node or below it.
  'link-top': { w: 14, h: 26, pins: { bottom: { x: 7, y: 26 } } },
  'link-bottom': { w: 14, h: 26, pins: { top: { x: 7, y: 0 } } },
  // A rail above the part it feeds (pin at the bottom) or below it (pin at the top).
  'rail-top': { w: 20, h: 14, pins: { bottom: { x: 10, y: 14 } } },
  'rail-bottom': { w: 20, h: 14, pins: { top: { x: 10, y: 0 } } },
};

/** Text metrics of the drawing's monospace labels (draw.ts sets that font). */
export const TEXT = { size: 11, line: 13, char: 6.8, gap: 6 };

/** A label's box for its lines. */
export function textBox(lines: readonly string[]): { w: number; h: number } {
  return { w: Math.ceil(Math.max(0, ...lines.map((l) => [...l].length)) * TEXT.char) + 2, h: lines.length * TEXT.line + 2 };
}
