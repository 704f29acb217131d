/**
 * Go to definition, find references, rename and hover across `input: { from: PATH }` links
 * (design §9.1, §9.3), on a real spec through the core's link sites and analysis. The hover's
 * figures are the report's own (the network solve is checked against hand-written netlists in
 * test/network/links.test.ts); here they must reach the text unchanged.
 */
import { describe, expect, it } from 'vitest';
import { linkSites } from '../../src/core/network/link-sites';
import { analyzeText } from '../../src/core/analyze';
import { applyEdits } from '../../src/core/text/edits';
import { formatSI, formatSignedPercent } from '../../src/core/text/format';
import type { Position } from '../../src/core/types';
import { definitionAt, linkHoverAt, prepareRenameAt, referencesAt, renameAt } from '../../src/extension/linkNav';
import { lensPlacements, linkDevice } from '../../src/extension/present';
import { header, textOf } from '../network/helpers';

/** Root NMOS bank → PMOS `dist` fed by `root.a` (a quoted path) → NMOS leaf `tail` fed by `dist`. */
const NET = header([
  '  - name: root',
  '    kind: simple',
  '    type: nmos',
  '    input: 10u',
  '    size: { w: 4u, l: 1u }',
  '    outputs:',
  '      - name: a',
  '        devices: { out: { m: 2 } }',
  '      - name: b',
  '        output: { v: 1.0 }',
  '  - name: dist',
  '    kind: simple',
  '    type: pmos',
  '    input: { from: "root.a" }',
  '    size: { w: 16u, l: 1u }',
  '  - name: tail',
  '    kind: simple',
  '    type: nmos',
  '    input: { from: dist }',
  '    size: { w: 4u, l: 1u }',
  '    output: { v: 0.6 }',
]);

const lines = NET.split('\n');
/** The position of the `nth` occurrence of `needle` on the first line holding `line`, plus `dx`. */
function at(line: string, needle: string, dx = 0): Position {
  const l = lines.findIndex((x) => x.includes(line));
  if (l < 0) throw new Error(`no line ${line}`);
  return { line: l, character: lines[l]!.indexOf(needle) + dx };
}

const sites = linkSites(NET);

describe('link sites', () => {
  it('finds every name and every from value, with the parts that name mirror and output', () => {
    expect(sites.names.map((n) => textOf(NET, n.range))).toEqual(['root', 'a', 'b', 'dist', 'tail']);
    expect(sites.links.map((l) => textOf(NET, l.range))).toEqual(['"root.a"', 'dist']);
    const [quoted, plain] = sites.links;
    expect(textOf(NET, quoted!.mirrorPart!)).toBe('root');
    expect(textOf(NET, quoted!.outputPart!)).toBe('a');
    expect(quoted!.target).toEqual({ mirror: 0, output: 0, outputName: 'a' });
    expect(textOf(NET, plain!.mirrorPart!)).toBe('dist');
    expect(plain!.outputPart).toBeUndefined();
  });
  it('answers in a file that does not read as a spec, without a crash', () => {
    expect(linkSites('mirrors: [')).toEqual({ names: [], links: [] });
    expect(linkSites('')).toEqual({ names: [], links: [] });
  });
});

describe('go to definition', () => {
  it('from `root.a` (on either part) goes to the output `a`', () => {
    const target = definitionAt(sites, at('from: "root.a"', 'root'));
    expect(target).toEqual(sites.names.find((n) => n.name === 'a')!.range);
    expect(definitionAt(sites, at('from: "root.a"', '.a', 1))).toEqual(target);
  });
  it('from `dist` (a single-output mirror) goes to the mirror\'s name', () => {
    const r = definitionAt(sites, at('from: dist', 'dist'))!;
    expect(r.start.line).toBe(at('- name: dist', 'dist').line);
    expect(textOf(NET, r)).toBe('dist');
  });
  it('elsewhere gives nothing', () => {
    expect(definitionAt(sites, at('type: pmos', 'pmos'))).toBeUndefined();
  });
});

describe('find references', () => {
  it("on an output's name lists the from values naming it", () => {
    const refs = referencesAt(sites, at('- name: a', ': a', 2), false);
    expect(refs.map((r) => textOf(NET, r))).toEqual(['"root.a"']);
    expect(referencesAt(sites, at('- name: b', ' b', 1), false)).toEqual([]);
  });
  it("on a mirror's name lists the links into any of its outputs, with the declaration when asked", () => {
    expect(referencesAt(sites, at('- name: root', 'root'), true).map((r) => textOf(NET, r))).toEqual(['root', '"root.a"']);
    expect(referencesAt(sites, at('- name: dist', 'dist'), false).map((r) => r.start.line)).toEqual([at('from: dist', 'dist').line]);
  });
  it('on a from value lists the other links to the same name', () => {
    expect(referencesAt(sites, at('from: dist', 'dist'), true).map((r) => textOf(NET, r))).toEqual(['dist', 'dist']);
  });
});

describe('rename', () => {
  const renamed = (pos: Position, name: string): string => {
    const r = renameAt(sites, pos, name);
    if (!r || 'error' in r) throw new Error(r ? r.error : 'no rename');
    return applyEdits(NET, r.edits);
  };
  it('renaming a mirror renames its links, and only those tokens', () => {
    const out = renamed(at('- name: root', 'root'), 'ref_bank');
    expect(out).toBe(NET.replace('- name: root', '- name: ref_bank').replace('"root.a"', '"ref_bank.a"'));
    expect(analyzeText(out, 'x.bias.yaml').findings.filter((f) => f.code.startsWith('link'))).toEqual([]);
  });
  it('renaming an output from its link renames the output and the link', () => {
    const out = renamed(at('from: "root.a"', '.a', 1), 'ota');
    expect(out).toBe(NET.replace('- name: a', '- name: ota').replace('"root.a"', '"root.ota"'));
  });
  it('a single-output mirror renamed from its link', () => {
    const out = renamed(at('from: dist', 'dist'), 'distribute');
    expect(out).toBe(NET.replace('- name: dist', '- name: distribute').replace('from: dist', 'from: distribute'));
  });
  it('prepare names the characters under the cursor (inside the quotes)', () => {
    const p = prepareRenameAt(sites, at('from: "root.a"', 'root'));
    expect(p && 'range' in p ? textOf(NET, p.range) : p).toBe('root');
    expect(prepareRenameAt(sites, at('type: pmos', 'pmos'))).toBeUndefined();
  });
  it.each([
    ['has.dot', 'a dot separates mirror and output'],
    ['two words', 'use letters, digits'],
    ['', 'use letters, digits'],
    ['9lives', 'starting with a letter'],
    ['tail', 'a mirror named `tail` already exists'],
  ])('refuses %j for a mirror with a clear message', (name, words) => {
    const r = renameAt(sites, at('- name: root', 'root'), name);
    expect(r && 'error' in r ? r.error : r).toContain(words);
  });
  it('refuses an output name the bank already has', () => {
    const r = renameAt(sites, at('- name: a', ': a', 2), 'b');
    expect(r && 'error' in r ? r.error : r).toBe('this bank already has an output named `b`');
  });
});

describe('hover on a from value and the network lens', () => {
  const file = analyzeText(NET, 'net.bias.yaml');
  const up = file.mirrors.find((m) => m.name === 'root.a')!;
  it('shows the current that arrives, the node voltage and the upstream margin from the report', () => {
    const md = linkHoverAt(file, sites, at('from: "root.a"', 'root'))!;
    expect(up.linkV).toBeDefined();
    expect(md).toContain(`| **current that arrives** | ${formatSI(up.iout, 'A')} |`);
    expect(md).toContain(`| **node voltage** | ${formatSI(up.linkV!, 'V')} |`);
    const d = linkDevice(up)!;
    expect(d.role).toBe('out');
    expect(md).toContain(`${formatSI(d.margin, 'V')} (saturation)`);
    expect(md).toContain('input of **dist**');
    expect(linkHoverAt(file, sites, at('type: pmos', 'pmos'))).toBeUndefined();
  });
  it("puts the network's supply current and its worst leaf on the root's name", () => {
    const net = file.networks![0]!;
    const lens = lensPlacements(file).find((l) => l.title.startsWith('network'))!;
    expect(lens.range.start.line).toBe(at('- name: root', 'root').line);
    const worst = file.mirrors.find((m) => m.name === net.worstLeaf)!;
    expect(lens.title).toContain(`supply ${formatSI(net.supplyCurrent.vdd, 'A')}`);
    expect(lens.title).toContain(`worst leaf ${worst.name}: chain error ${formatSignedPercent(worst.chainError!)}`);
  });
});
