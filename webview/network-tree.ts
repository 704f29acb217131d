/**
 * The panel's bias-network trees (design §9.3): the core's tree (src/core/network-tree/: the
 * model, the one ELK layout and the one SVG element tree, shared with the static report) laid out
 * with elkjs bundled here and this page's font measured on a canvas, built as DOM. A mirror is a
 * button: a click (or Enter) selects it and reveals it in the spec. Layouts are cached per
 * report, so a re-render draws at once.
 */
import ELK from 'elkjs/lib/elk.bundled.js';
import type { FileReport, Range } from '../src/core/types';
import { drawNetworkTree, layoutTree, networkTrees, TREE_TEXT, type LaidTree, type NetworkTree, type TextMeasure } from '../src/core/network-tree';
import { h } from './components';
import { buildSvg } from './schematic';

let elk: InstanceType<typeof ELK> | undefined;
const cache = new WeakMap<FileReport, Map<string, Promise<LaidTree | undefined>>>();

let measurer: CanvasRenderingContext2D | null | undefined;
/** Width of `text` in the drawing's font (a canvas measures what the SVG will render). */
const textWidth: TextMeasure = (text, bold) => {
  measurer ??= document.createElement('canvas').getContext('2d');
  if (!measurer) return text.length * TREE_TEXT.size * 0.7;
  measurer.font = `${bold ? '600 ' : ''}${TREE_TEXT.size}px ${getComputedStyle(document.body).fontFamily || 'sans-serif'}`;
  return measurer.measureText(text).width;
};

function layout(report: FileReport, tree: NetworkTree): Promise<LaidTree | undefined> {
  elk ??= new ELK();
  let byRoot = cache.get(report);
  if (!byRoot) cache.set(report, (byRoot = new Map()));
  let p = byRoot.get(tree.root);
  if (!p) byRoot.set(tree.root, (p = layoutTree(elk, tree, textWidth).catch(() => undefined)));
  return p;
}

/** The least scale a tree wider than the panel is drawn at (its 12 px text at 8 px); a wider
 *  tree scrolls at that scale. */
const LEAST_SCALE = 2 / 3;

/** A tree wider than the panel shrinks to the panel's width, down to LEAST_SCALE: a side panel
 *  then shows a bank's fed mirrors beside their links instead of past its edge. Set through the
 *  element's style object (the CSP refuses style attributes, not the CSSOM). */
function fitToPanel(svg: Element): void {
  if (!(svg instanceof SVGSVGElement)) return;
  const width = Number(svg.getAttribute('width')), height = Number(svg.getAttribute('height'));
  if (!(width > 0 && height > 0)) return;
  svg.classList.add('fits');
  svg.style.minWidth = `${Math.ceil(width * LEAST_SCALE)}px`;
  svg.style.aspectRatio = `${width} / ${height}`;
}

/** One figure per network of the report, each filled when its layout is done. */
export function networkFigures(report: FileReport, onNode: (select: string, reveal?: Range) => void): HTMLElement[] {
  return networkTrees(report).map((tree) => {
    const fig = h('figure', { class: 'network-figure', 'data-network': tree.root, 'aria-busy': 'true' });
    void layout(report, tree).then((laid) => {
      fig.removeAttribute('aria-busy');
      if (!laid) {
        fig.replaceChildren(h('figcaption', {}, `${tree.caption} (the tree could not be laid out)`));
        return;
      }
      const drawing = buildSvg(drawNetworkTree(laid, true));
      fitToPanel(drawing);
      const byId = new Map(tree.nodes.map((n) => [n.id, n] as const));
      for (const g of drawing.querySelectorAll<SVGGElement>('g.net-node')) {
        const n = byId.get(g.dataset.id ?? '');
        if (!n) continue;
        g.addEventListener('click', () => onNode(n.select, n.reveal));
        g.addEventListener('keydown', (ev) => {
          if (ev.key === 'Enter' || ev.key === ' ') { ev.preventDefault(); onNode(n.select, n.reveal); }
        });
      }
      fig.replaceChildren(h('div', { class: 'scroll-x' }, drawing), h('figcaption', {}, tree.caption));
      fig.dataset.ready = 'true';
    });
    return fig;
  });
}
