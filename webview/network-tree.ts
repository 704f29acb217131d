/**
 * The panel's bias-network trees (design §9.3): the pure tree of network-model.ts placed by ELK's
 * layered algorithm (elkjs, bundled here; edge labels are laid out as boxes of their own, so
 * they never overlap a node or another label) and drawn as DOM SVG, styled by classes only (the
 * CSP allows no inline style). A mirror is a button: a click (or Enter) selects it and reveals it
 * in the spec. A link in trouble is drawn dashed in the error colour and says why in words.
 * Layouts are cached per report, so a re-render draws at once.
 */
import ELK from 'elkjs/lib/elk.bundled.js';
import type { ElkExtendedEdge, ElkNode } from 'elkjs/lib/elk-api';
import type { FileReport, Range } from '../src/core/types';
import { h } from './components';
import { networkTrees, type NetworkTree, type TreeNode } from './network-model';

const SVG_NS = 'http://www.w3.org/2000/svg';
/** Text metrics of the drawing (px): the stylesheet sets the same font size on `.net-tree`. */
const FONT_PX = 12;
const LINE = 16;
const PAD_X = 8;
const PAD_Y = 5;

let elk: InstanceType<typeof ELK> | undefined;
const cache = new WeakMap<FileReport, Map<string, Promise<ElkNode | undefined>>>();

let measurer: CanvasRenderingContext2D | null | undefined;
/** Width of `text` in the drawing's font (a canvas measures what the SVG will render). */
function textWidth(text: string, bold: boolean): number {
  measurer ??= document.createElement('canvas').getContext('2d');
  if (!measurer) return text.length * FONT_PX * 0.7;
  measurer.font = `${bold ? '600 ' : ''}${FONT_PX}px ${getComputedStyle(document.body).fontFamily || 'sans-serif'}`;
  return measurer.measureText(text).width;
}

/** The box around `lines`; `bold[i]` for a line drawn in the bold weight (titles, trouble). */
function box(lines: readonly string[], bold: readonly boolean[]): { width: number; height: number } {
  return { width: Math.ceil(Math.max(...lines.map((l, i) => textWidth(l, bold[i] ?? false)))) + 2 * PAD_X, height: lines.length * LINE + 2 * PAD_Y };
}

function edgeLines(e: NetworkTree['edges'][number]): string[] {
  return e.trouble ? [e.label, `⚠ ${e.trouble}`] : [e.label];
}

function graphOf(tree: NetworkTree): ElkNode {
  return {
    id: `net-${tree.root}`,
    layoutOptions: {
      'elk.algorithm': 'layered',
      'elk.direction': 'RIGHT',
      'elk.edgeRouting': 'ORTHOGONAL',
      'elk.layered.spacing.nodeNodeBetweenLayers': '36',
      'elk.spacing.nodeNode': '14',
      'elk.spacing.edgeLabel': '4',
      'elk.spacing.edgeNode': '12',
      'elk.padding': '[top=8,left=8,bottom=8,right=8]',
    },
    children: tree.nodes.map((n) => ({ id: n.id, ...box([n.title, n.subtitle], [true, false]) })),
    edges: tree.edges.map((e): ElkExtendedEdge => ({
      id: e.id, sources: [e.source], targets: [e.target],
      labels: [{ id: `${e.id}-label`, text: edgeLines(e).join('\n'), ...box(edgeLines(e), [false, true]), layoutOptions: { 'elk.edgeLabels.placement': 'CENTER' } }],
    })),
  };
}

function layout(report: FileReport, tree: NetworkTree): Promise<ElkNode | undefined> {
  elk ??= new ELK();
  let byRoot = cache.get(report);
  if (!byRoot) cache.set(report, (byRoot = new Map()));
  let p = byRoot.get(tree.root);
  if (!p) byRoot.set(tree.root, (p = elk.layout(graphOf(tree)).catch(() => undefined)));
  return p;
}

type Attrs = Record<string, string | number | undefined>;
function svg(tag: string, attrs: Attrs, ...children: (Node | string)[]): SVGElement {
  const el = document.createElementNS(SVG_NS, tag) as SVGElement;
  for (const [k, v] of Object.entries(attrs)) if (v !== undefined) el.setAttribute(k, String(v));
  el.append(...children);
  return el;
}

function textBlock(lines: readonly string[], x: number, y: number, cls: string[]): SVGElement {
  return svg('text', { x: x + PAD_X, y: y + PAD_Y }, ...lines.map((l, i) =>
    svg('tspan', { x: x + PAD_X, dy: i === 0 ? LINE - 4 : LINE, class: cls[i] ?? cls[cls.length - 1] }, l)));
}

function draw(tree: NetworkTree, g: ElkNode, onNode: (n: TreeNode) => void): SVGElement {
  const width = Math.ceil(g.width ?? 0);
  const height = Math.ceil(g.height ?? 0);
  const root = svg('svg', { class: 'net-tree', width, height, viewBox: `0 0 ${width} ${height}`, role: 'group', 'aria-label': tree.caption });
  const marker = `arrow-${tree.root.replace(/[^A-Za-z0-9_-]/g, '_')}`;
  root.append(svg('defs', {}, svg('marker', { id: marker, viewBox: '0 0 8 8', refX: 8, refY: 4, markerWidth: 7, markerHeight: 7, orient: 'auto-start-reverse' },
    svg('path', { d: 'M0,0 L8,4 L0,8 z', class: 'net-arrow' }))));
  const byId = new Map(tree.edges.map((e) => [e.id, e] as const));
  for (const e of g.edges ?? []) {
    const info = byId.get(e.id);
    // A link in trouble in the error colour; a leaf over its limit in the warning colour.
    const mark = info?.trouble === undefined ? '' : info.kind === 'link' ? ' trouble' : ' over';
    const group = svg('g', { class: `net-link${mark}`, 'data-edge': e.id });
    for (const s of e.sections ?? []) {
      const pts = [s.startPoint, ...(s.bendPoints ?? []), s.endPoint];
      group.append(svg('path', { class: 'net-edge', d: pts.map((p, i) => `${i === 0 ? 'M' : 'L'}${p.x},${p.y}`).join(' '), 'marker-end': `url(#${marker})` }));
    }
    for (const l of e.labels ?? []) {
      const x = l.x ?? 0;
      const y = l.y ?? 0;
      group.append(svg('rect', { class: 'net-label-box', x, y, width: l.width ?? 0, height: l.height ?? 0, rx: 3 }),
        textBlock(info ? edgeLines(info) : [l.text ?? ''], x, y, ['net-label', info?.kind === 'leaf' ? 'net-over' : 'net-trouble']));
    }
    if (info?.trouble) group.append(svg('title', {}, `${info.kind === 'link' ? 'Link in trouble' : 'Leaf'}: ${info.trouble}`));
    root.append(group);
  }
  const nodes = new Map(tree.nodes.map((n) => [n.id, n] as const));
  for (const c of g.children ?? []) {
    const n = nodes.get(c.id);
    if (!n) continue;
    const x = c.x ?? 0;
    const y = c.y ?? 0;
    const node = svg('g', {
      class: n.leaf ? 'net-node leaf' : 'net-node', 'data-node': n.title, 'data-select': n.select,
      tabindex: 0, role: 'button', 'aria-label': n.leaf ? `Show output ${n.select}` : `Show mirror ${n.title} in the spec`,
    },
    svg('rect', { x, y, width: c.width ?? 0, height: c.height ?? 0, rx: n.leaf ? 10 : 3 }),
    textBlock([n.title, n.subtitle], x, y, ['net-title', 'net-sub']));
    node.addEventListener('click', () => onNode(n));
    node.addEventListener('keydown', (ev) => {
      const k = (ev as KeyboardEvent).key;
      if (k === 'Enter' || k === ' ') { ev.preventDefault(); onNode(n); }
    });
    root.append(node);
  }
  return root;
}

/** One figure per network of the report, each filled when its layout is done. */
export function networkFigures(report: FileReport, onNode: (select: string, reveal?: Range) => void): HTMLElement[] {
  return networkTrees(report).map((tree) => {
    const fig = h('figure', { class: 'network-figure', 'data-network': tree.root, 'aria-busy': 'true' });
    void layout(report, tree).then((g) => {
      fig.removeAttribute('aria-busy');
      if (!g) {
        fig.replaceChildren(h('figcaption', {}, `${tree.caption} (the tree could not be laid out)`));
        return;
      }
      const drawing = draw(tree, g, (n) => onNode(n.select, n.reveal));
      fig.replaceChildren(h('div', { class: 'scroll-x' }, drawing), h('figcaption', {}, tree.caption));
      fig.dataset.ready = 'true';
    });
    return fig;
  });
}
