/**
 * The drawing model of one mirror output's schematic: symbols placed, wires routed orthogonally,
 * labels with their boxes. Plain JSON, no DOM: the core turns it into an SVG string for the
 * report (svg.ts) and the panel into DOM SVG, both through the one element tree of draw.ts.
 */

/** Symbols qpoint draws. Transistors hang between a top and a bottom pin with a control pin on
 *  the left: NMOS drain over source, PMOS source over drain (the mirror image), NPN collector
 *  over emitter, PNP emitter over collector. */
export type SymbolKind = 'nmos' | 'pmos' | 'npn' | 'pnp' | 'isrc' | 'res' | 'held-top' | 'held-bottom' | 'link-top' | 'link-bottom' | 'rail-top' | 'rail-bottom';

export interface Point { x: number; y: number }
export interface Box { x: number; y: number; w: number; h: number }

/** A label's role: how it is styled. */
export type LabelTone = 'device' | 'net' | 'source' | 'rail';

export interface SchematicLabel extends Box {
  lines: string[];
  tone: LabelTone;
  /** The device it names (panel: click and hover). */
  device?: string;
}

export interface SchematicPart {
  id: string;
  symbol: SymbolKind;
  /** The symbol's box (labels are separate). */
  box: Box;
  /** Device name for transistors (the report's DeviceReport.name). */
  device?: string;
  /** Short of margin (below limits.margin) or out of saturation: drawn marked, with words. */
  short?: 'margin' | 'region';
  /** The operating point in words, for hover. */
  tip?: string;
}

export interface SchematicWire { net: string; points: Point[] }

export interface Schematic {
  /** The output's name (MirrorReport.name). */
  name: string;
  width: number;
  height: number;
  parts: SchematicPart[];
  wires: SchematicWire[];
  /** Junction dots where three or more pins meet. */
  dots: Point[];
  labels: SchematicLabel[];
}
