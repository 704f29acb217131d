/**
 * The selected output's schematic in the panel: laid out by the core (src/core/schematic/) with
 * elkjs bundled here, drawn as DOM SVG from the same element tree the report serialises, styled
 * by classes only (the CSP allows no inline style). A device is a button: clicking it (or Enter)
 * selects its row in the device table and reveals it in the spec; hovering shows its operating
 * point (the SVG title). Layouts are cached per report, so a re-render draws at once.
 */
import ELK from 'elkjs/lib/elk.bundled.js';
import { drawSchematic, schematicOf, type LayoutEngine, type Schematic, type SvgElement } from '../src/core/schematic';
import type { FileReport, MirrorReport } from '../src/core/types';
import { h } from './components';

const SVG_NS = 'http://www.w3.org/2000/svg';
let engine: LayoutEngine | undefined;
const cache = new WeakMap<FileReport, Map<string, Promise<Schematic | undefined>>>();
// The last drawing of each output: shown while a newer report's layout runs, so an edit in the
// spec does not blank the figure.
const lastDrawn = new Map<string, Element>();

function layout(report: FileReport, m: MirrorReport): Promise<Schematic | undefined> {
  engine ??= new ELK();
  let byName = cache.get(report);
  if (!byName) cache.set(report, (byName = new Map()));
  let s = byName.get(m.name);
  if (!s) byName.set(m.name, (s = schematicOf(engine, report, m).catch(() => undefined)));
  return s;
}

/** An element tree of the core (schematic, network tree) as DOM. */
export function buildSvg(e: SvgElement): Element {
  const node = document.createElementNS(SVG_NS, e.tag);
  for (const [k, v] of Object.entries(e.attrs)) if (k !== 'xmlns') node.setAttribute(k, v);
  for (const c of e.children) node.append(typeof c === 'string' ? document.createTextNode(c) : buildSvg(c));
  return node;
}

/** The figure that will hold the schematic of `m`; filled when its layout is done. */
export function schematicFigure(report: FileReport, m: MirrorReport, onDevice: (device: string) => void): HTMLElement {
  const fig = h('figure', { class: 'schematic-figure', 'data-schematic-of': m.name, 'aria-busy': 'true' });
  const previous = lastDrawn.get(m.name);
  if (previous) fig.append(previous.cloneNode(true));
  void layout(report, m).then((s) => {
    fig.removeAttribute('aria-busy');
    if (!s) { lastDrawn.delete(m.name); fig.remove(); return; }
    const svg = buildSvg(drawSchematic(s));
    for (const g of svg.querySelectorAll<SVGGElement>('.sch-device')) {
      const name = g.dataset.device ?? '';
      g.addEventListener('click', () => onDevice(name));
      g.addEventListener('keydown', (e) => {
        if (e.key === 'Enter' || e.key === ' ') { e.preventDefault(); onDevice(name); }
      });
    }
    lastDrawn.set(m.name, svg.cloneNode(true) as Element);
    fig.replaceChildren(h('div', { class: 'scroll-x' }, svg), h('figcaption', {}, `Schematic of ${m.name} at its operating point`));
  });
  return fig;
}

/** Marks `device`'s schematic symbol selected (the table row is marked by the caller). */
export function markSchematicDevice(root: ParentNode, mirror: string, device: string): void {
  const fig = root.querySelector(`[data-schematic-of="${CSS.escape(mirror)}"]`);
  for (const g of fig?.querySelectorAll('.sch-device') ?? []) g.classList.toggle('selected', (g as SVGGElement).dataset.device === device);
}
