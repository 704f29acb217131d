/**
 * Bias-network trees (design §9.3), one home for the panel and the report: model.ts reads the
 * report into nodes and labelled edges, layout.ts places them with ELK, draw.ts makes the one SVG
 * element tree that the report serialises (here) and the panel builds as DOM.
 */
import type { FileReport } from '../types';
import type { LayoutEngine } from '../schematic/layout';
import { svgText } from '../schematic/svg';
import { networkTrees } from './model';
import { layoutTree, type LaidTree, type TextMeasure } from './layout';
import { drawNetworkTree } from './draw';

export { networkTrees, mirrorGroups, type NetworkTree, type TreeEdge, type TreeNode } from './model';
export { layoutTree, graphOf, estimateText, TREE_TEXT, type LaidTree, type TextMeasure } from './layout';
export { drawNetworkTree, NETWORK_TREE_CSS } from './draw';

/** Every network of the report laid out (a tree ELK cannot place is left out). */
export async function networkTreesOf(engine: LayoutEngine, report: FileReport, measure?: TextMeasure): Promise<LaidTree[]> {
  const out: LaidTree[] = [];
  for (const tree of networkTrees(report)) {
    try { out.push(await layoutTree(engine, tree, measure)); } catch { /* drawn without it */ }
  }
  return out;
}

/** The tree as SVG text for the static report (no script: plain groups, no buttons). */
export function networkTreeSvg(laid: LaidTree): string {
  return svgText(drawNetworkTree(laid, false));
}
