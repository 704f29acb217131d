/**
 * The network tree in the static HTML report (design §9.3): an SVG drawn from the same ELK
 * layout as the panel's (src/core/network-tree/, one home), readable and printable without
 * JavaScript. On the fixture of the panel's own tree test (test/workbench/fixtures/
 * network.bias.yaml: a reference bank feeding two pmos mirrors, one feeding an nmos tail, one
 * link pushed out of saturation). Check values: the report's own figures (names, currents,
 * headroom) read back out of the drawing; the layout's boxes must not overlap (ELK's layered
 * placement with labels as boxes — common practice for a legible tree).
 */
import ELK from 'elkjs/lib/elk.bundled.js';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { analyzeText } from '../../src/core/analyze';
import { estimateText, graphOf, networkTreesOf, type LaidTree } from '../../src/core/network-tree';
import { renderHtmlReport } from '../../src/core/report/html';
import { renderStaticReport } from '../../src/core/report/static-html';
import { formatSI } from '../../src/core/text/format';
import type { FileReport } from '../../src/core/types';

const SPEC = join(__dirname, '..', 'workbench', 'fixtures', 'network.bias.yaml');
let report: FileReport;
let trees: LaidTree[];
let page: string;
beforeAll(async () => {
  report = analyzeText(readFileSync(SPEC, 'utf8'), SPEC);
  trees = await networkTreesOf(new ELK(), report);
  page = renderStaticReport(report, undefined, undefined, trees);
});

interface Box { x: number; y: number; width: number; height: number }
const overlap = (a: Box, b: Box): boolean => a.x < b.x + b.width && b.x < a.x + a.width && a.y < b.y + b.height && b.y < a.y + a.height;

describe('the network tree in the static report', () => {
  it('one laid-out tree per network, from the layout the panel uses (same graph for the same text measure)', () => {
    expect(trees).toHaveLength(report.networks!.length);
    const t = trees[0]!;
    // The graph ELK placed is graphOf(tree) — the function the panel lays out with its own font.
    const placed = new Map((t.graph.children ?? []).map((c) => [c.id, c] as const));
    for (const c of graphOf(t.tree, estimateText).children ?? []) expect(placed.get(c.id)!.width).toBe(c.width);
  });
  it('no two node or label boxes overlap', () => {
    const g = trees[0]!.graph;
    const boxes: Box[] = [
      ...(g.children ?? []).map((c) => ({ x: c.x!, y: c.y!, width: c.width!, height: c.height! })),
      ...(g.edges ?? []).flatMap((e) => (e.labels ?? []).map((l) => ({ x: l.x!, y: l.y!, width: l.width!, height: l.height! }))),
    ];
    expect(boxes).toHaveLength(8 + 7);   // 4 mirrors + 4 leaf outputs; 7 edges
    for (let i = 0; i < boxes.length; i++) for (let j = i + 1; j < boxes.length; j++) expect(overlap(boxes[i]!, boxes[j]!), `boxes ${i} and ${j}`).toBe(false);
  });
  it('the page carries the tree as inline SVG: every member, each edge\'s current, the troubled link in words', () => {
    const svg = page.slice(page.indexOf('<svg xmlns="http://www.w3.org/2000/svg" class="net-tree"'), page.indexOf('</svg>', page.indexOf('class="net-tree"')));
    expect(svg.length).toBeGreaterThan(0);
    for (const name of report.networks![0]!.members) expect(svg).toContain(`data-node="${name}"`);
    const pAmp = report.mirrors.find((m) => m.name === 'ref_bank.p_amp')!;
    expect(svg).toContain(`p_amp: ${formatSI(pAmp.iout, 'A')}`);
    const up = report.mirrors.find((m) => m.name === 'ref_bank.p_adc')!;
    expect(up.headroom!).toBeLessThan(0);
    expect(svg).toContain(`⚠ upstream out of saturation (headroom ${formatSI(up.headroom!, 'V')})`);
    expect(svg).toMatch(/class="net-link trouble" data-edge="e0_1"/);
    // Without script: no buttons, no tab stops.
    expect(svg).not.toContain('role="button"');
    expect(svg).not.toContain('tabindex');
  });
  it('the whole page prints it: the static body holds the figure and the tree\'s styles are inline', () => {
    const html = renderHtmlReport(report, { script: '' }, undefined, undefined, trees);
    const body = html.slice(html.indexOf('<div id="qpoint-static"'), html.indexOf('<main id="qpoint-root">'));
    expect(body).toContain('<figure class="network-figure" data-network="ref_bank">');
    expect(html).toMatch(/<style>[^]*svg\.net-tree \{[^]*<\/style>/);
  });
});
