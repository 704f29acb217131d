/**
 * Composing and verifying fixes on the edited mirror's lines alone (src/core/spec/fragment.ts)
 * must offer exactly the fixes a whole-file re-read offers — same findings, same fixes, same
 * edits, same titles — on random faulty specs (block, flow, item-flow, banks, netlists, comments,
 * CRLF, anchors), on mutated copies of the project's specs, and on the fixtures. The whole-file
 * re-read is the reference: it is the plain definition (apply the edits, parse, solve, detect).
 */
import fc from 'fast-check';
import { describe, expect, it, vi } from 'vitest';
import { fromRead, parseSpec } from '../../src/core/spec/index';
import { YamlSourceMap } from '../../src/core/spec/source-map';
import { applyEdits } from '../../src/core/text/edits';
import { LineIndex } from '../../src/core/text/lines';
import { canonicalJson } from '../../src/core/canonical';
import { resolveText } from '../../src/core/resolve';
import { analyzeSpec } from '../../src/core/analysis/index';
import { runRules } from '../../src/core/rules/index';
import { MirrorFragments } from '../../src/core/spec/fragment';
import { HALDEN_HEADER } from '../../scripts/spec-texts';
import { arbFaultySpec } from './faulty-specs';
import { arbMutatedSpec, seedSpecs } from './inputs';

/** Both ways; undefined when the text has no resolved spec to run rules on. The spec is
 *  resolved as analyzeText resolves it (design targets sized), as the whole-file re-read does. */
function bothWays(text: string, file: string): { local: string; whole: string; fixes: number } | undefined {
  const { parsed } = resolveText(text, file);
  if (!parsed.spec) return undefined;
  const reports = analyzeSpec(parsed.spec);
  const local = runRules(parsed, reports);
  const whole = runRules(parsed, reports, { reread: 'whole-file' });
  return { local: JSON.stringify(local, null, 1), whole: JSON.stringify(whole, null, 1), fixes: local.reduce((n, f) => n + (f.fixes?.length ?? 0), 0) };
}

describe('local re-reading of edited mirrors', () => {
  it('offers the same fixes as a whole-file re-read on random faulty specs', () => {
    let fixes = 0;
    let specs = 0;
    fc.assert(fc.property(arbFaultySpec, (text) => {
      const r = bothWays(text, 'random.bias.yaml');
      if (!r) return;
      specs++;
      fixes += r.fixes;
      expect(r.local).toBe(r.whole);
    }), { numRuns: 120, seed: 4242 });
    // The generator must reach the fixes, or the comparison says nothing.
    expect(specs).toBeGreaterThan(100);
    expect(fixes).toBeGreaterThan(150);
  });

  it('offers the same fixes however busy the machine is (a found counterexample: CRLF, a shared param)', () => {
    // Newton's wall-clock budget once decided whether a verifying solve converged, so a loaded
    // machine dropped or changed the `lu` area fix; small circuits are now bounded by iterations.
    const text = [
    "# generated Halden 180 spec (faults on purpose)",
    "format: 1",
    "process:",
    "  grid: 10n        # fixes snap to 10 nm",
    "  nmos: { kp: 280u, vt0: 0.45, lambda: 0.08, lref: 1u, gamma: 0.45, phi: 0.85, avt: 4e-9, abeta: 1e-8, lmin: 0.18u, wmin: 0.22u }",
    "  pmos: { kp: 70u, vt0: 0.48, lambda: 0.1, lref: 1u, gamma: 0.4, phi: 0.8, avt: 5e-9, abeta: 1e-8, lmin: 0.18u, wmin: 0.22u }",
    "supplies: { vdd: 1.8 }",
    "limits:",
    "  margin: 100m",
    "  error: 1%",
    "params: { wu: 2u, lu: 1u }",
    "mirrors:",
    "  - name: m0",
    "    kind: wilson-balanced",
    "    type: nmos",
    "    input: 40u",
    "    size: { w: 0.2u, l: lu }",
    "    output: { v: 1.10 }",
    "    require: { rout: 1M, sigma: 0.3% }",
    "  - name: m1   # note 1",
    "    kind: wide-swing",
    "    type: nmos",
    "    input: 5u   # note 1",
    "    size:",
    "      w: 8u   # note 1",
    "      l: lu",
    "    devices:",
    "      out:",
    "        m: 3   # note 1",
    "    vbias: 0.9",
    "    output: { v: 0.43 }",
    "    require: { ratio: 3, rout: 1M, sigma: 0.3% }",
    "# end",
    "",
    ].join('\r\n');
    const { parsed } = resolveText(text, 'random.bias.yaml');
    const reports = analyzeSpec(parsed.spec!);
    const calm = JSON.stringify(runRules(parsed, reports, { reread: 'whole-file', now: () => 0 }));
    let t = 0;
    const busy = vi.spyOn(Date, 'now').mockImplementation(() => (t += 20));
    try {
      const opts = { now: () => 0 };
      expect(JSON.stringify(runRules(parsed, reports, opts))).toBe(calm);
      expect(JSON.stringify(runRules(parsed, reports, { ...opts, reread: 'whole-file' }))).toBe(calm);
    } finally {
      busy.mockRestore();
    }
    expect(calm).toMatch(/param `lu`, also read by `m0`/);
  });

  it('offers the same fixes on mutated copies of the project specs', () => {
    const seeds = seedSpecs();
    let compared = 0;
    fc.assert(fc.property(arbMutatedSpec(seeds), (input) => {
      const r = bothWays(input.text, input.file);
      if (!r) return;
      compared++;
      expect(r.local).toBe(r.whole);
    }), { numRuns: 200, seed: 99 });
    // Most mutations break the spec (that is their job); enough of them leave it readable.
    expect(compared).toBeGreaterThan(25);
  });

  it('one whole-file re-check answers every finding with the same edit (the EKV model fix)', () => {
    // Three mirrors in weak inversion: the square law is trusted below IC = 1 (info), and the same
    // `model: ekv` edit answers all three. With two re-checks allowed (a finding starts its fixes
    // only while re-checks are left), all three get it only if the first re-check is shared.
    const m = (i: number) => `  - { name: w${i}, kind: simple, type: nmos, input: 1u, size: { w: 40u, l: 4u }, output: { v: 0.5 } }`;
    const text = `${HALDEN_HEADER}\n${[0, 1, 2].map(m).join('\n')}\n`;
    const parsed = parseSpec(text, 'weak.bias.yaml');
    const findings = runRules(parsed, analyzeSpec(parsed.spec!), { maxRechecks: 2 });
    const weak = findings.filter((f) => f.code === 'square-law-weak-inversion');
    expect(weak).toHaveLength(3);
    for (const f of weak) expect(f.fixes?.[0]?.edits[0]?.newText).toBe('ekv');
  });

  it('is used where it applies: a plain spec qualifies, a spec with an alias does not', () => {
    const seeds = seedSpecs();
    const example = parseSpec(seeds[1].text, seeds[1].name);
    const frags = MirrorFragments.of(example)!;
    // the `tail` bank's first output's `m: 4` token lies inside mirror 2 (after the example's
    // `master` and `dist`)
    const at = example.source.value(['mirrors', 2, 'outputs', 0, 'devices', 'out', 'm'])!;
    expect(frags.holds(2, [{ range: at, newText: '5' }])).toBe(true);
    expect(frags.holds(3, [{ range: at, newText: '5' }])).toBe(false);
    const text = seeds[1].text;
    const lines = text.split('\n');
    const edited = lines.map((l, i) => (i === at.start.line ? l.slice(0, at.start.character) + '5' + l.slice(at.end.character) : l)).join('\n');
    const frag = frags.read(edited, 2)!;
    expect((frag.data as { outputs: { devices: { out: { m: number } } }[] }).outputs[0].devices.out.m).toBe(5);
    const aliased = parseSpec(text.replace('wu: 4u', 'wu: &u 4u\n  wv: *u'), 'a.bias.yaml');
    expect(aliased.spec).toBeDefined();
    expect(MirrorFragments.of(aliased)!.holds(2, [{ range: at, newText: '5' }])).toBe(false);
  });

  it('reads an edit outside the mirrors alone exactly as the whole edited text reads', () => {
    // The EKV fix edits the process: the lines before `mirrors:` are read alone and the original
    // items put back (MirrorFragments.readOutside). Wherever that answers, the data, the resolved
    // spec and the findings' severities equal a whole read of the edited text; hostile insertions
    // (anchors, aliases, tags, a second `mirrors`, directives, open flows and quotes, tabs, bad
    // indentation) must make it decline or read the same.
    const item = (i: number) => `  - { name: m${i}, kind: simple, type: nmos, input: ${i + 2}u, size: { w: 4u, l: 1u }, output: { v: 0.6 } }`;
    const text = `${HALDEN_HEADER}\n${[0, 1, 2].map(item).join('\n')}\n`;
    const parsed = parseSpec(text, 'outside.bias.yaml');
    const frags = MirrorFragments.of(parsed)!;
    const lines = LineIndex.of(text);
    const keyLine = text.split('\n').indexOf('mirrors:');
    const snippets = ['ekv', 'model: ekv\n  ', '\n', '  ', '&a ', '*a', '!!str ', 'mirrors: []\n', 'mirrors:\n', 'process: 1\n',
      '%YAML 1.1\n---\n', '[', '{', '"', "'", '#', '\t', 'x: 1\n', '  y: 2\n', ': ', '- ', '<<: {}\n', '\r', 'limits: { margin: 50m }\n', ''];
    let read = 0;
    fc.assert(fc.property(fc.integer({ min: 0, max: keyLine - 1 }), fc.integer({ min: 0, max: 200 }), fc.integer({ min: 0, max: 12 }),
      fc.constantFrom(...snippets), (line, ch, len, newText) => {
        const start = lines.offset({ line, character: ch });
        const range = lines.range(start, Math.min(start + len, lines.offset({ line: keyLine, character: 0 }) - 1));
        const edits = [{ range, newText }];
        const edited = applyEdits(text, edits);
        const outside = frags.readOutside(edited, edits);
        if (!outside) return;
        read++;
        const alone = fromRead(edited, outside.read, { source: outside.source, findings: parsed.source as YamlSourceMap }, false);
        const whole = parseSpec(edited, 'outside.bias.yaml');
        expect(canonicalJson(alone.data ?? null)).toBe(canonicalJson(whole.data ?? null));
        expect(canonicalJson(alone.spec ?? null)).toBe(canonicalJson(whole.spec ?? null));
        expect(alone.findings.map((f) => `${f.severity}:${f.code}`).sort()).toEqual(whole.findings.map((f) => `${f.severity}:${f.code}`).sort());
        // Where it reads, the mirrors' places in the edited text are right (moved by the added lines).
        const name = alone.source.value(['mirrors', 2, 'name'])!;
        expect(alone.source.text(name)).toBe('m2');
        expect(name).toEqual(whole.source.value(['mirrors', 2, 'name']));
      }), { numRuns: 400, seed: 7 });
    expect(read).toBeGreaterThan(60);
  });
});
