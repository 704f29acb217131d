/** The schematic's element tree as an SVG string, for the static report (reads without JS). */
import type { Schematic } from './model';
import { drawSchematic, type SvgElement } from './draw';

const ESC: Record<string, string> = { '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;' };
const esc = (s: string): string => s.replace(/[&<>"]/g, (c) => ESC[c] ?? c);

/** Any element tree as SVG text (the network tree's too). */
export function svgText(e: SvgElement): string {
  const attrs = Object.entries(e.attrs).map(([k, v]) => ` ${k}="${esc(v)}"`).join('');
  const kids = e.children.map((c) => (typeof c === 'string' ? esc(c) : svgText(c))).join('');
  return `<${e.tag}${attrs}>${kids}</${e.tag}>`;
}

export function schematicSvg(s: Schematic): string {
  return svgText(drawSchematic(s));
}
