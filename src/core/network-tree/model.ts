/**
 * What a network tree shows (design §9.3), before any layout — the panel's and the report's. One tree per
 * `FileReport.networks` entry: a node per member mirror, an edge per link (upstream mirror →
 * the mirror it feeds) and one per leaf output (mirror → a small node for the output's load),
 * each edge labelled with its current and chain error. A link in trouble (the upstream output
 * out of saturation at the solved node, too little headroom, or a finding at the `from` value)
 * and a leaf whose chain error exceeds `limits.error` carry words saying so. No numbers are
 * computed here beyond comparing the report's own figures with its limits.
 */
import type { FileReport, Finding, MirrorReport, NetworkReport, Range } from '../types';
import { formatPercent as percent, formatSI as si, formatSignedPercent as signedPercent } from '../text/format';

// A figure that could not be measured (NaN) reads "—", as in the panel's tables.
const dash = (v: number, text: () => string): string => (Number.isNaN(v) ? '—' : text());
const formatSI = (v: number, unit: string): string => dash(v, () => si(v, unit));
const formatPercent = (v: number): string => dash(v, () => percent(v));
const formatSignedPercent = (v: number): string => dash(v, () => signedPercent(v));

export interface TreeNode {
  id: string;
  /** Mirror name (a member) or report name (a leaf output's load). */
  title: string;
  subtitle: string;
  leaf: boolean;
  /** The report the panel selects on a click, and where the mirror is written. */
  select: string;
  reveal?: Range;
}

export interface TreeEdge {
  id: string;
  source: string;
  target: string;
  /** Current and chain error, e.g. `a: 20.1 µA · chain +0.31 %`. */
  label: string;
  /** A link between two mirrors, or a leaf output into its load. */
  kind: 'link' | 'leaf';
  /** Why this link or leaf is in trouble, in words; absent when it is not. */
  trouble?: string;
}

export interface NetworkTree {
  root: string;
  /** One line: members, supply current, power, worst leaf. */
  caption: string;
  nodes: TreeNode[];
  edges: TreeEdge[];
}

function mirrorReveal(report: FileReport, index: number): Range | undefined {
  return report.anchors.find((a) => a.kind === 'mirror' && a.path.length === 2 && a.path[1] === index)?.range;
}

function edgeLabel(r: MirrorReport): string {
  const name = r.output !== undefined ? `${r.output}: ` : '';
  const chain = r.chainError !== undefined ? ` · chain ${formatSignedPercent(r.chainError)}` : '';
  return `${name}${formatSI(r.iout, 'A')}${chain}`;
}

/** Error and warning findings written at a mirror's `input.from`. */
function linkFindings(report: FileReport, fedIndex: number): Finding[] {
  return report.findings.filter((f) => f.severity !== 'info' && f.path[0] === 'mirrors' && f.path[1] === fedIndex && f.path[2] === 'input');
}

function linkTrouble(report: FileReport, up: MirrorReport, fedIndex: number | undefined): string | undefined {
  const margin = report.limits?.margin;
  if (up.headroom !== undefined && up.headroom < 0) return `upstream out of saturation (headroom ${formatSI(up.headroom, 'V')})`;
  if (up.headroom !== undefined && margin !== undefined && up.headroom < margin) return `low headroom (${formatSI(up.headroom, 'V')} < ${formatSI(margin, 'V')})`;
  const f = fedIndex !== undefined ? linkFindings(report, fedIndex)[0] : undefined;
  return f ? `${f.severity}: ${f.code}` : undefined;
}

function leafTrouble(report: FileReport, r: MirrorReport): string | undefined {
  const limit = report.limits?.error;
  if (!r.converged) return 'did not converge';
  if (r.chainError !== undefined && limit !== undefined && Math.abs(r.chainError) > limit) return `chain error over ${formatPercent(limit)}`;
  return undefined;
}

export function networkTree(report: FileReport, net: NetworkReport): NetworkTree {
  const nodes: TreeNode[] = [];
  const edges: TreeEdge[] = [];
  const members = new Set(net.members);
  const outputsOf = (mirror: string) => report.mirrors.filter((m) => m.mirror === mirror);
  const indexOf = new Map<string, number>();
  for (const name of members) {
    const first = outputsOf(name)[0];
    if (!first) continue;
    indexOf.set(name, first.mirrorIndex);
    const node: TreeNode = { id: `m${first.mirrorIndex}`, title: name, subtitle: `${first.kind} ${first.type}`, leaf: false, select: first.name };
    const reveal = mirrorReveal(report, first.mirrorIndex);
    if (reveal) node.reveal = reveal;
    nodes.push(node);
  }
  for (const name of members) {
    const from = indexOf.get(name);
    if (from === undefined) continue;
    for (const r of outputsOf(name)) {
      const fed = r.feeds !== undefined ? indexOf.get(r.feeds) : undefined;
      let target: string;
      let trouble: string | undefined;
      const kind = fed !== undefined ? 'link' : 'leaf';
      if (fed !== undefined) {
        target = `m${fed}`;
        trouble = linkTrouble(report, r, fed);
      } else {
        target = `o${r.mirrorIndex}_${r.outputIndex}`;
        const leaf: TreeNode = { id: target, title: r.output ?? 'output', subtitle: `Vout ${formatSI(r.vout, 'V')}`, leaf: true, select: r.name };
        const reveal = report.anchors.find((a) => a.kind === 'output' && a.report === r.name)?.range ?? mirrorReveal(report, r.mirrorIndex);
        if (reveal) leaf.reveal = reveal;
        nodes.push(leaf);
        trouble = leafTrouble(report, r);
      }
      const edge: TreeEdge = { id: `e${r.mirrorIndex}_${r.outputIndex}`, source: `m${from}`, target, label: edgeLabel(r), kind };
      if (trouble) edge.trouble = trouble;
      edges.push(edge);
    }
  }
  const supply = formatSI(net.supplyCurrent.vdd, 'A');
  const worst = net.worstLeaf !== undefined ? report.mirrors.find((m) => m.name === net.worstLeaf) : undefined;
  const worstText = worst?.chainError !== undefined ? ` · worst leaf ${worst.name} (chain ${formatSignedPercent(worst.chainError)})` : '';
  const caption = `Network of ${net.root}: ${net.members.length} mirrors · supply ${supply} · ${formatSI(net.power, 'W')}${worstText}${net.converged ? '' : ' · did not converge'}`;
  return { root: net.root, caption, nodes, edges };
}

export function networkTrees(report: FileReport): NetworkTree[] {
  return (report.networks ?? []).map((n) => networkTree(report, n));
}

/** The mirror list's groups: each network's members (root first, in the network's order), then
 *  the mirrors in no network, in file order (a mirror set aside for its errors is solved in no
 *  network, so it sits there, where it is written). Without networks: one unnamed group. */
export function mirrorGroups(report: FileReport): { network?: string; mirrors: string[] }[] {
  const nets = report.networks ?? [];
  if (nets.length === 0) return [{ mirrors: [...new Set(report.mirrors.map((m) => m.mirror))] }];
  const grouped = new Set(nets.flatMap((n) => n.members));
  const groups: { network?: string; mirrors: string[] }[] = nets.map((n) => ({ network: n.root, mirrors: [...n.members] }));
  const rest = [...new Set(report.mirrors.map((m) => m.mirror))].filter((m) => !grouped.has(m));
  if (rest.length > 0 || (report.withheld?.length ?? 0) > 0) groups.push({ mirrors: rest });
  return groups;
}
