/**
 * A laid-out network tree as one SVG element tree (the schematic's `SvgElement`): the report
 * serialises it, the panel builds it as DOM and makes each mirror a button. Styled by classes
 * only (NETWORK_TREE_CSS; the panel's CSP allows no inline style). A link in trouble is drawn
 * dashed in the error colour and says why in words; a leaf over its limit in the warning colour.
 */
import type { SvgElement } from '../schematic/draw';
import { edgeLines, TREE_TEXT, type LaidTree } from './layout';

const el = (tag: string, attrs: Record<string, string | number | undefined>, ...children: (SvgElement | string)[]): SvgElement => ({
  tag, children,
  attrs: Object.fromEntries(Object.entries(attrs).filter(([, v]) => v !== undefined).map(([k, v]) => [k, String(v)])),
});

function textBlock(lines: readonly string[], x: number, y: number, cls: string[]): SvgElement {
  const { padX, padY, line } = TREE_TEXT;
  return el('text', { x: x + padX, y: y + padY }, ...lines.map((l, i) =>
    el('tspan', { x: x + padX, dy: i === 0 ? line - 4 : line, class: cls[i] ?? cls[cls.length - 1] }, l)));
}

/** `interactive`: mirror nodes are buttons in the tab order (the panel); without, plain groups
 *  (the static report, which has no script). */
export function drawNetworkTree({ tree, graph: g }: LaidTree, interactive: boolean): SvgElement {
  const width = Math.ceil(g.width ?? 0);
  const height = Math.ceil(g.height ?? 0);
  const marker = `arrow-${tree.root.replace(/[^A-Za-z0-9_-]/g, '_')}`;
  const parts: SvgElement[] = [el('defs', {}, el('marker', { id: marker, viewBox: '0 0 8 8', refX: 8, refY: 4, markerWidth: 7, markerHeight: 7, orient: 'auto-start-reverse' },
    el('path', { d: 'M0,0 L8,4 L0,8 z', class: 'net-arrow' })))];
  const byId = new Map(tree.edges.map((e) => [e.id, e] as const));
  for (const e of g.edges ?? []) {
    const info = byId.get(e.id);
    const mark = info?.trouble === undefined ? '' : info.kind === 'link' ? ' trouble' : ' over';
    const kids: SvgElement[] = [];
    for (const s of e.sections ?? []) {
      const pts = [s.startPoint, ...(s.bendPoints ?? []), s.endPoint];
      kids.push(el('path', { class: 'net-edge', d: pts.map((p, i) => `${i === 0 ? 'M' : 'L'}${p.x},${p.y}`).join(' '), 'marker-end': `url(#${marker})` }));
    }
    for (const l of e.labels ?? []) {
      const x = l.x ?? 0, y = l.y ?? 0;
      kids.push(el('rect', { class: 'net-label-box', x, y, width: l.width ?? 0, height: l.height ?? 0, rx: 3 }),
        textBlock(info ? edgeLines(info) : [l.text ?? ''], x, y, ['net-label', info?.kind === 'leaf' ? 'net-over' : 'net-trouble']));
    }
    if (info?.trouble) kids.push(el('title', {}, `${info.kind === 'link' ? 'Link in trouble' : 'Leaf'}: ${info.trouble}`));
    parts.push(el('g', { class: `net-link${mark}`, 'data-edge': e.id }, ...kids));
  }
  const nodes = new Map(tree.nodes.map((n) => [n.id, n] as const));
  for (const c of g.children ?? []) {
    const n = nodes.get(c.id);
    if (!n) continue;
    const x = c.x ?? 0, y = c.y ?? 0;
    parts.push(el('g', {
      class: n.leaf ? 'net-node leaf' : 'net-node', 'data-id': n.id, 'data-node': n.title, 'data-select': n.select,
      ...(interactive ? { tabindex: 0, role: 'button', 'aria-label': n.leaf ? `Show output ${n.select}` : `Show mirror ${n.title} in the spec` } : {}),
    },
    el('rect', { x, y, width: c.width ?? 0, height: c.height ?? 0, rx: n.leaf ? 10 : 3 }),
    textBlock([n.title, n.subtitle], x, y, ['net-title', 'net-sub'])));
  }
  return el('svg', { xmlns: 'http://www.w3.org/2000/svg', class: 'net-tree', width, height, viewBox: `0 0 ${width} ${height}`, role: 'group', 'aria-label': tree.caption }, ...parts);
}

/** The tree's styles in the theme's colours (the panel adopts them, the report inlines them). */
export const NETWORK_TREE_CSS = `
svg.net-tree { font-size: ${TREE_TEXT.size}px; font-family: var(--vscode-font-family); overflow: visible; }
svg.net-tree text { fill: var(--vscode-foreground); }
.net-node rect { fill: var(--vscode-editor-background); stroke: var(--vscode-foreground); stroke-width: 1; }
.net-node.leaf rect { stroke: var(--vscode-descriptionForeground); stroke-dasharray: 2 2; }
.net-node[role="button"] { cursor: pointer; }
.net-node[role="button"]:hover rect { fill: var(--vscode-list-hoverBackground); }
.net-node:focus { outline: none; }
.net-node:focus rect { stroke: var(--vscode-focusBorder); stroke-width: 2; }
.net-title { font-weight: 600; }
svg.net-tree .net-sub { fill: var(--vscode-descriptionForeground); }
.net-edge { fill: none; stroke: var(--vscode-charts-lines, var(--vscode-foreground)); stroke-width: 1.2; }
.net-arrow { fill: var(--vscode-charts-lines, var(--vscode-foreground)); }
.net-label-box { fill: var(--vscode-editor-background); stroke: var(--vscode-panel-border, transparent); }
.net-link.trouble .net-edge { stroke: var(--vscode-errorForeground); stroke-dasharray: 6 3; stroke-width: 2; }
.net-link.trouble .net-label-box { stroke: var(--vscode-errorForeground); }
svg.net-tree .net-trouble { fill: var(--vscode-errorForeground); font-weight: 600; }
.net-link.over .net-edge { stroke: var(--vscode-editorWarning-foreground); stroke-dasharray: 2 3; stroke-width: 2; }
.net-link.over .net-label-box { stroke: var(--vscode-editorWarning-foreground); }
svg.net-tree .net-over { fill: var(--vscode-editorWarning-foreground); font-weight: 600; }
@media print { svg.net-tree { break-inside: avoid; } }
`;
