/**
 * A network solved again with one member edited (src/core/network/edited.ts), the way a fix's
 * re-check solves it: from the analysis's kept joint circuit and solution instead of a build and a
 * cold Newton start. Check values: `solveNetworks` on the same edited spec (the group built and
 * solved from the topology guess, as every re-check did before). Both are converged solutions of
 * the same equations, so they agree to the solver's tolerances (SOLVER.relTol 1e-9 on each node
 * voltage, a KCL residual of 1e-9 of a node's current): each handed-on current within 1e-8
 * relative and each node voltage within 1e-8 V (common practice for a warm-started Newton
 * against a cold one).
 */
import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { parseSpec, type TableTexts } from '../../src/core/spec/index';
import { resolveText } from '../../src/core/resolve';
import { applyDesignTargets } from '../../src/core/design/auto-size';
import { provisionalLinks, solveNetworks } from '../../src/core/network/index';
import { solvedLocally, solveEditedNetworks } from '../../src/core/network/edited';
import { keptJoint } from '../../src/core/network/kept';
import { networkGroups } from '../../src/core/network/groups';
import { indexOf, mirrorAt } from '../../src/core/mirror-at';
import type { DeviceSize, ResolvedMirror, ResolvedSpec, TemplateMirror } from '../../src/core/types';
import { EXAMPLE_PATH, exampleTables } from '../example-tables';
import { header } from './helpers';

/** The spec as a re-check solves it: read, linked inputs at their intended currents, sized. */
function presolved(text: string, tables?: TableTexts): ResolvedSpec {
  const spec = parseSpec(text, 'case.bias.yaml', tables ? { tables } : {}).spec!;
  return applyDesignTargets(provisionalLinks(spec)).spec;
}

function withMirror(spec: ResolvedSpec, i: number, f: (m: TemplateMirror) => TemplateMirror): ResolvedSpec {
  return { ...spec, mirrors: spec.mirrors.map((m) => (indexOf(m) === i && m.kind !== 'netlist' ? f(m) : m)) };
}

/** Every device 7 % wider (a bipolar device: 2 more in parallel), as a sizing fix edits one mirror. */
function widened(m: TemplateMirror): TemplateMirror {
  const grow = (s: DeviceSize): DeviceSize => (s.area !== undefined || s.w === undefined ? { ...s, m: s.m + 2 } : { ...s, w: s.w * 1.07 });
  const all = (d: Record<string, DeviceSize>) => Object.fromEntries(Object.entries(d).map(([k, s]) => [k, grow(s)]));
  return { ...m, devices: all(m.devices), outputs: m.outputs.map((o) => ({ ...o, devices: all(o.devices) })) };
}

/** Every member's handed-on input current and linked output voltages, and every network's figures, alike. */
function expectSameSolution(got: ResolvedSpec, want: ResolvedSpec): void {
  expect(got.networks?.length).toBe(want.networks?.length);
  (want.networks ?? []).forEach((n, k) => {
    const h = got.networks![k]!;
    expect(h.members).toEqual(n.members);
    expect(h.converged).toBe(n.converged);
    expect(Math.abs(h.rootCurrent / n.rootCurrent - 1)).toBeLessThan(1e-8);
    for (const [o, w] of Object.entries(n.outputs)) {
      const x = h.outputs[o]!;
      expect(Math.abs(x.i / w.i - 1), `output ${o} current`).toBeLessThan(1e-8);
      if (w.v !== undefined) expect(Math.abs(x.v! - w.v), `output ${o} voltage`).toBeLessThan(1e-8);
    }
    for (const i of n.members) {
      const a = mirrorAt(got, i) as TemplateMirror, b = mirrorAt(want, i) as TemplateMirror;
      expect(a.input.kind).toBe(b.input.kind);
      if (a.input.kind === 'link' && b.input.kind === 'link') expect(Math.abs(a.input.i / b.input.i - 1)).toBeLessThan(1e-8);
      b.outputs.forEach((o, j) => expect(Math.abs(a.outputs[j]!.output.v - o.output.v)).toBeLessThan(1e-8));
    }
  });
}

/** A binary tree of simple mirrors, polarity alternating by level (scripts/spec-texts.ts's network, small). */
function tree(n: number): string {
  const lines: string[] = [];
  for (let i = 0; i < n; i++) {
    const type = Math.floor(Math.log2(i + 1)) % 2 === 0 ? 'nmos' : 'pmos';
    const size = type === 'nmos' ? '{ w: 8u, l: 4u }' : '{ w: 32u, l: 4u }';
    const input = i === 0 ? '10u' : `{ from: t${(i - 1) >> 1}.${i % 2 === 1 ? 'a' : 'b'} }`;
    const out = (k: number) => (2 * i + 1 + k < n ? `{ name: ${k === 0 ? 'a' : 'b'} }` : `{ name: ${k === 0 ? 'a' : 'b'}, output: { v: 0.9 } }`);
    lines.push(`  - { name: t${i}, kind: simple, type: ${type}, input: ${input}, size: ${size}, outputs: [${out(0)}, ${out(1)}] }`);
  }
  return header(lines);
}

describe('a network re-solved with one member edited equals the network built and solved cold', () => {
  const text = tree(15);
  const base = resolveText(text, 'case.bias.yaml').parsed.spec!;

  it('the tree solves as one network of 15 mirrors', () => {
    expect(base.networks?.length).toBe(1);
    expect(base.networks![0]!.members.length).toBe(15);
    expect(base.networks![0]!.converged).toBe(true);
  });

  for (const i of [0, 1, 5, 14]) {
    it(`t${i} resized in the text (its elements replaced in place)`, () => {
      const pre = presolved(text.replace(new RegExp(`(name: t${i}, .*?size: \\{ w: )(\\d+)u`), (_, a: string, w: string) => `${a}${Number(w) * 1.21}u`));
      expect((mirrorAt(pre, i) as TemplateMirror).devices.ref!.w).not.toBe((mirrorAt(base, i) as TemplateMirror).devices.ref!.w);
      expectSameSolution(solveEditedNetworks(pre, i, base), solveNetworks(pre, undefined, { chainSigma: false }));
    });

    it(`t${i} made a cascode in the text (the group wired again around it)`, () => {
      const pre = presolved(text.replace(`name: t${i}, kind: simple`, `name: t${i}, kind: cascode`));
      expect(mirrorAt(pre, i)!.kind).toBe('cascode');
      expectSameSolution(solveEditedNetworks(pre, i, base), solveNetworks(pre, undefined, { chainSigma: false }));
    });
  }

  it('an edit that does not change the circuit gives the same solution', () => {
    const pre = presolved(text);
    expectSameSolution(solveEditedNetworks(pre, 3, base), solveNetworks(pre, undefined, { chainSigma: false }));
  });
});

/** The example as the analysis resolves it (`base`), its networks solved and handed on (`pre`),
 *  and their groups. */
function exampleNetworks(): { base: ResolvedSpec; pre: ResolvedSpec; groups: ReturnType<typeof networkGroups> } {
  const tables = exampleTables();
  const text = readFileSync(EXAMPLE_PATH, 'utf8');
  const base = resolveText(text, 'sensor-afe.bias.yaml', { tables }).parsed.spec!;
  const pre = presolved(text, tables);
  return { base, pre, groups: networkGroups(pre) };
}

describe('every member of the example\'s networks edited in turn', () => {
  const { base, pre, groups } = exampleNetworks();

  it('the example has networks: a reference root with start-up, a wide-swing member (its vbias picked), bipolar ones', () => {
    expect(groups.length).toBeGreaterThan(1);
    const kinds = new Set(groups.flatMap((g) => g.members.map((m) => m.kind)));
    expect(kinds.has('wide-swing')).toBe(true);
    expect(groups.some((g) => g.root.input.kind === 'self')).toBe(true);
    expect(groups.some((g) => g.members.some((m) => m.type === 'npn' || m.type === 'pnp'))).toBe(true);
  });

  for (const g of groups) {
    for (const m of g.members) {
      it(`${m.name} widened`, () => {
        const edited = withMirror(pre, indexOf(m), widened);
        expectSameSolution(solveEditedNetworks(edited, indexOf(m), base), solveNetworks(edited, undefined, { chainSigma: false }));
      });
    }
  }

  it('a mirror in no network edited: every network as the analysis solved it', () => {
    const plain = pre.mirrors.find((m) => m.kind !== 'netlist' && !groups.some((g) => g.members.includes(m)))!;
    const edited = withMirror(pre, indexOf(plain), widened);
    expectSameSolution(solveEditedNetworks(edited, indexOf(plain), base), solveNetworks(edited, undefined, { chainSigma: false }));
  });
});

/** The handed-on mirror alike: every field the same, its input current within 1e-8 relative and
 *  each output voltage within 1e-8 V (the tolerances above). */
function expectSameMember(got: ResolvedMirror | undefined, want: ResolvedMirror | undefined): void {
  const a = got as TemplateMirror, b = want as TemplateMirror;
  const plain = (m: TemplateMirror) => ({ ...m, input: { ...m.input, i: 0 }, outputs: m.outputs.map((o) => ({ ...o, output: { ...o.output, v: 0 } })) });
  expect(plain(a)).toEqual(plain(b));
  if (a.input.kind === 'link' && b.input.kind === 'link') expect(Math.abs(a.input.i / b.input.i - 1), 'input current').toBeLessThan(1e-8);
  b.outputs.forEach((o, j) => expect(Math.abs(a.outputs[j]!.output.v - o.output.v), `output ${j} voltage`).toBeLessThan(1e-8));
}

describe('a re-check that reads the edited mirror alone: that mirror as the whole network hands it on, nothing else solved', () => {
  // Check values: the whole edited network built and solved cold (solveNetworks), as above; where
  // the edited mirror's subtree is solved alone (its feeder's output devices MOSFETs on a rail),
  // the same equations to the same tolerances.
  const { base, pre, groups } = exampleNetworks();

  for (const g of groups) {
    for (const m of g.members) {
      it(`${m.name} widened`, () => {
        const i = indexOf(m);
        const edited = withMirror(pre, i, widened);
        const alone = solveEditedNetworks(edited, i, base, { only: 'edited' });
        expectSameMember(mirrorAt(alone, i), mirrorAt(solveNetworks(edited, undefined, { chainSigma: false }), i));
        expect(alone.networks).toBeUndefined();
        // Every other member is left as the re-check gave it (linked inputs at their intended currents).
        for (const x of alone.mirrors) if (indexOf(x) !== i) expect(x).toBe(mirrorAt(edited, indexOf(x)));
      });
    }
  }

  const tree15 = tree(15);
  const treeBase = resolveText(tree15, 'case.bias.yaml').parsed.spec!;
  for (const i of [0, 1, 2, 5, 14]) {
    it(`t${i} of a tree resized, and made a cascode`, () => {
      const resized = presolved(tree15.replace(new RegExp(`(name: t${i}, .*?size: \\{ w: )(\\d+)u`), (_, a: string, w: string) => `${a}${Number(w) * 1.21}u`));
      const cascode = presolved(tree15.replace(`name: t${i}, kind: simple`, `name: t${i}, kind: cascode`));
      for (const edited of [resized, cascode]) {
        const want = mirrorAt(solveNetworks(edited, undefined, { chainSigma: false }), i);
        expectSameMember(mirrorAt(solveEditedNetworks(edited, i, treeBase, { only: 'edited' }), i), want);
        // Below the root, the subtree alone (its feeders' outputs are simple MOSFET outputs on a
        // rail), down to the mirrors it feeds (theirs are too).
        const local = solvedLocally(edited, networkGroups(edited)[0]!, keptJoint(treeBase.networks![0]!)!, i);
        if (i === 0) expect(local).toBeUndefined();
        else expectSameMember(local, want);
      }
    });
  }

  // t3, fed by t1, a cascode: its outputs' current comes through `outc`, whose source is no rail,
  // so the nodes it drives are read by its own equations and t1's subtree is solved down to the leaves.
  const cascodeBelow = tree15.replace('name: t3, kind: simple', 'name: t3, kind: cascode');
  const cascodeBase = resolveText(cascodeBelow, 'case.bias.yaml').parsed.spec!;
  for (const i of [1, 3]) {
    it(`t${i} resized above or at a cascode of a tree`, () => {
      const edited = presolved(cascodeBelow.replace(new RegExp(`(name: t${i}, .*?size: \\{ w: )(\\d+)u`), (_, a: string, w: string) => `${a}${Number(w) * 1.21}u`));
      const want = mirrorAt(solveNetworks(edited, undefined, { chainSigma: false }), i);
      expectSameMember(solvedLocally(edited, networkGroups(edited)[0]!, keptJoint(cascodeBase.networks![0]!)!, i), want);
      expectSameMember(mirrorAt(solveEditedNetworks(edited, i, cascodeBase, { only: 'edited' }), i), want);
    });
  }
});
