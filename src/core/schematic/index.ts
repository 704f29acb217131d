/**
 * Schematics of mirror outputs with their operating point: circuit.ts reads a report (and its
 * kind's template or netlist wiring) into parts on nets, layout.ts places them with ELK,
 * draw.ts turns the placed model into one SVG element tree that the report serialises
 * (svg.ts) and the panel builds as DOM.
 */
import { formatSI } from '../text/format';
import type { FileReport, MirrorReport } from '../types';
import { circuitOf, type SI } from './circuit';
import { layoutCircuit, type LayoutEngine } from './layout';
import type { Schematic } from './model';

export type { Schematic, SchematicLabel, SchematicPart, SchematicWire, SymbolKind, Box, Point } from './model';
export { drawSchematic, SCHEMATIC_CSS, type SvgElement } from './draw';
export { schematicSvg } from './svg';
export type { LayoutEngine } from './layout';

const si: SI = (v, unit, digits = 3) => (Number.isFinite(v) ? formatSI(v, unit, digits) : '—');

/** The schematic of one output; undefined when there is nothing to draw (no operating point). */
export async function schematicOf(engine: LayoutEngine, report: FileReport, m: MirrorReport): Promise<Schematic | undefined> {
  if (m.beyondRails || m.devices.length === 0) return undefined;
  return layoutCircuit(engine, m.name, circuitOf(report, m, si), si);
}

/** Every output's schematic, by output name. */
export async function schematicsOf(engine: LayoutEngine, report: FileReport): Promise<Map<string, Schematic>> {
  const out = new Map<string, Schematic>();
  for (const m of report.mirrors) {
    const s = await schematicOf(engine, report, m);
    if (s) out.set(m.name, s);
  }
  return out;
}
