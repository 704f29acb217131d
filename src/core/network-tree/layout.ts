/**
 * The one layout of a network tree, for the panel and the report alike: ELK's layered algorithm
 * (the front end hands in elkjs, as for schematics), left to right, orthogonal edges, each edge
 * label a box of its own so that no label overlaps a node or another label. Only the text
 * measure differs: the panel measures its own font on a canvas, the report (no script, any
 * font) uses a generous per-character estimate.
 */
import type { ElkExtendedEdge, ElkNode } from 'elkjs/lib/elk-api';
import type { LayoutEngine } from '../schematic/layout';
import type { NetworkTree, TreeEdge } from './model';

/** Text metrics of the drawing (px); the stylesheet sets the same font size on `.net-tree`. */
export const TREE_TEXT = { size: 12, line: 16, padX: 8, padY: 5 };

/** Width (px) of `text` in the drawing's font, bold or not. */
export type TextMeasure = (text: string, bold: boolean) => number;

/** A sans-serif estimate that errs wide (0.62 em a character, 0.68 em bold): a box may be a
 *  little roomy, never too tight. */
export const estimateText: TextMeasure = (text, bold) => [...text].length * TREE_TEXT.size * (bold ? 0.68 : 0.62);

const OPTIONS: Record<string, string> = {
  'elk.algorithm': 'layered',
  'elk.direction': 'RIGHT',
  'elk.edgeRouting': 'ORTHOGONAL',
  'elk.layered.spacing.nodeNodeBetweenLayers': '36',
  'elk.spacing.nodeNode': '14',
  'elk.spacing.edgeLabel': '4',
  'elk.spacing.edgeNode': '12',
  'elk.padding': '[top=8,left=8,bottom=8,right=8]',
};

/** The lines of an edge's label: its figures, then its trouble in words. */
export function edgeLines(e: TreeEdge): string[] {
  return e.trouble ? [e.label, `⚠ ${e.trouble}`] : [e.label];
}

/** The box around `lines`; `bold[i]` for a line drawn in the bold weight (titles, trouble). */
function box(lines: readonly string[], bold: readonly boolean[], measure: TextMeasure): { width: number; height: number } {
  return {
    width: Math.ceil(Math.max(...lines.map((l, i) => measure(l, bold[i] ?? false)))) + 2 * TREE_TEXT.padX,
    height: lines.length * TREE_TEXT.line + 2 * TREE_TEXT.padY,
  };
}

export function graphOf(tree: NetworkTree, measure: TextMeasure): ElkNode {
  return {
    id: `net-${tree.root}`,
    layoutOptions: { ...OPTIONS },
    children: tree.nodes.map((n) => ({ id: n.id, ...box([n.title, n.subtitle], [true, false], measure) })),
    edges: tree.edges.map((e): ElkExtendedEdge => ({
      id: e.id, sources: [e.source], targets: [e.target],
      labels: [{ id: `${e.id}-label`, text: edgeLines(e).join('\n'), ...box(edgeLines(e), [false, true], measure), layoutOptions: { 'elk.edgeLabels.placement': 'CENTER' } }],
    })),
  };
}

/** A tree with its placed graph. */
export interface LaidTree { tree: NetworkTree; graph: ElkNode }

export async function layoutTree(engine: LayoutEngine, tree: NetworkTree, measure: TextMeasure = estimateText): Promise<LaidTree> {
  return { tree, graph: await engine.layout(graphOf(tree, measure)) };
}
