/**
 * Findings of bias networks (docs/findings.md): `supply-budget` (the spec draws more than
 * `limits.supplyCurrent`), `link-saturation` (the fed mirror's input voltage pushes the feeding
 * output out of saturation; fixes on either side — a wider fed mirror, a wider feeding mirror, a
 * standard cascode upstream made wide-swing — each verified by analysing the edited text, so by
 * re-solving the whole network), `chain-error` (a leaf's compounded error beyond
 * `limits.error`, naming the stage that contributes most).
 */
import type { FileReport, Finding, Fix, MirrorReport, NetworkReport, ResolvedMirror, ResolvedSpec, TemplateMirror } from '../types';
import type { ParsedSpec } from '../spec/index';
import { formatSI, formatSignedPercent } from '../text/format';
import { mirrorAt } from '../mirror-at';
import { allDevices, sizeOf, type DeviceRef } from '../sizing/devices';
import { planSizeEdits } from '../rules/size-edits';
import { quantizeSize } from '../sizing/quantize';
import { key } from './joint';
import { applyEdits } from '../text/edits';
import { quotedLike, replaceValueEdit } from '../spec/edit';

/** Analyse an edited text (no corners, no fixes): the verification of a link fix. */
export type Reanalyze = (text: string) => FileReport;

/** `known`: the findings the analysis made so far (an error among them is no news after a fix). */
export function networkFindings(parsed: ParsedSpec, spec: ResolvedSpec, reports: MirrorReport[], networks: NetworkReport[], known: Finding[], reanalyze?: Reanalyze): Finding[] {
  const out: Finding[] = [];
  const budget = supplyBudget(parsed, spec, reports, networks);
  if (budget) { out.push(budget); known = [...known, budget]; }
  if (networks.length === 0) return out;
  const byKey = new Map(reports.map((r) => [key(r.mirrorIndex, r.outputIndex), r] as const));
  const at = (i: number): TemplateMirror | undefined => { const m = mirrorAt(spec, i); return m && m.kind !== 'netlist' ? m : undefined; };
  for (const r of reports) {
    const m = at(r.mirrorIndex);
    if (!m) continue;
    // The link into m: is the feeding output saturated at m's input voltage?
    if (r.outputIndex === 0 && m.input.kind === 'link') {
      const up = byKey.get(key(m.input.mirror, m.input.output));
      if (up && up.headroom !== undefined && up.headroom < spec.limits.margin && r.converged) {
        out.push(linkSaturation(parsed, spec, m, up, known, reanalyze));
      }
    }
    if (r.network !== undefined && r.feeds === undefined && r.chainError !== undefined && Math.abs(r.chainError) > spec.limits.error) {
      out.push(chainError(parsed, spec, r, byKey));
    }
  }
  return out;
}

/** A: what one unlinked mirror draws between the rails (its input and every output). */
function unlinkedDraw(reports: MirrorReport[], networks: NetworkReport[]): number {
  const inNetwork = new Set(networks.flatMap((n) => n.members));
  let sum = 0;
  const inputs = new Set<number>();
  for (const r of reports) {
    if (inNetwork.has(r.mirror) || !r.converged) continue;
    if (!inputs.has(r.mirrorIndex)) { inputs.add(r.mirrorIndex); sum += Math.abs(r.iin ?? 0); }
    sum += Math.abs(r.iout);
  }
  return sum;
}

function supplyBudget(parsed: ParsedSpec, spec: ResolvedSpec, reports: MirrorReport[], networks: NetworkReport[]): Finding | undefined {
  const limit = spec.limits.supplyCurrent;
  if (limit === undefined) return undefined;
  const nets = networks.reduce((s, n) => s + n.supplyCurrent.vdd, 0);
  const total = nets + unlinkedDraw(reports, networks);
  if (!(total > limit)) return undefined;
  const largest = [...networks].sort((a, b) => b.supplyCurrent.vdd - a.supplyCurrent.vdd)[0];
  const where = largest ? `; the largest network, \`${largest.root}\`, draws ${formatSI(largest.supplyCurrent.vdd, 'A')}` : '';
  const path = ['limits', 'supplyCurrent'];
  return {
    severity: 'error', code: 'supply-budget', path, range: parsed.source.value(path) ?? parsed.source.rangeFor(path),
    message: `the spec draws ${formatSI(total, 'A')} from the supply, over the budget of ${formatSI(limit, 'A')} (${formatSI((spec.supplies.vdd - spec.supplies.vss) * total, 'W')})${where}`,
  };
}

function chainError(parsed: ParsedSpec, spec: ResolvedSpec, leaf: MirrorReport, byKey: Map<string, MirrorReport>): Finding {
  // The stages on the path: each feeding output from the root down, then the leaf itself.
  const stages: MirrorReport[] = [leaf];
  for (let m = mirrorAt(spec, leaf.mirrorIndex); m && m.kind !== 'netlist' && m.input.kind === 'link';) {
    const up = byKey.get(key(m.input.mirror, m.input.output));
    if (!up) break;
    stages.unshift(up);
    m = mirrorAt(spec, m.input.mirror);
  }
  const worst = stages.reduce((a, b) => (Math.abs(b.error ?? 0) > Math.abs(a.error ?? 0) ? b : a));
  const path = leaf.path;
  const range = parsed.source.value([...path, 'name']) ?? parsed.source.rangeFor(path);
  const list = stages.map((s) => `${s.name} ${formatSignedPercent(s.error ?? NaN)}`).join(', ');
  return {
    severity: 'warning', code: 'chain-error', path, range,
    message: `${leaf.name}: ${formatSI(leaf.iout, 'A')} is ${formatSignedPercent(leaf.chainError!)} off the intended ${formatSI(leaf.intended!, 'A')} (limit ±${formatSignedPercent(spec.limits.error).replace(/^[+]/, '')}); the stages: ${list}; \`${worst.name}\` contributes most`,
  };
}

/** Every device of mirror `i` widened by `k` (same ratios): lower VGS and VDSsat at its current. */
function widen(parsed: ParsedSpec, spec: ResolvedSpec, i: number, k: number): { edits: Fix['edits']; w: string } | undefined {
  const refs: DeviceRef[] = allDevices(spec, i);
  const changes = refs.flatMap((ref) => {
    const s = sizeOf(spec, ref);
    return s ? [{ ref, key: 'w' as const, value: quantizeSize(s.w * k, spec.process.grid, 'up') }] : [];
  });
  const plan = planSizeEdits(parsed, spec, changes, parsed.json === true);
  if (!plan || plan.edits.length === 0) return undefined;
  return { edits: plan.edits, w: plan.notes.map((n) => `${n.key} ${n.from ?? ''}→${n.to}`).join(', ') };
}

function linkSaturation(parsed: ParsedSpec, spec: ResolvedSpec, fed: TemplateMirror, up: MirrorReport, known: Finding[], reanalyze?: Reanalyze): Finding {
  const path = [...fed.path, 'input', 'from'];
  const range = parsed.source.value(path) ?? parsed.source.rangeFor(path);
  const need = spec.limits.margin - up.headroom!;
  const upMirror = mirrorAt(spec, up.mirrorIndex);
  const f: Finding = {
    severity: 'error', code: 'link-saturation', path, range,
    message: `${fed.name}: its input node sits at ${formatSI(up.linkV!, 'V')}, ${formatSI(Math.abs(up.headroom!), 'V')} ${up.headroom! >= 0 ? 'inside' : 'beyond'} the compliance limit ${formatSI(up.compliance, 'V')} of \`${up.name}\` (limits.margin ${formatSI(spec.limits.margin, 'V')}): lower ${fed.name}'s input VGS or ${up.name}'s VDSsat by ${formatSI(need, 'V')}${cascodeAdvice(upMirror)}`,
  };
  if (!reanalyze || parsed.withheld) return f;
  const fixes: Fix[] = [];
  // Either side widened with its ratios kept (×2, else ×4: a square-law overdrive falls by 29 %,
  // 50 %), then the edited text analysed again — the whole network re-solved. Accepted when this
  // link is saturated and no error appears that the original did not have.
  const errorsOf = (r: { findings: Finding[] }) => new Set(r.findings.filter((x) => x.severity === 'error').map((x) => `${x.code}@${x.path.join('/')}`));
  const before = errorsOf({ findings: known });
  const sides = [
    { mirror: fed.path[1] as number, title: (w: string) => `Widen ${fed.name} for a lower input VGS (${w})` },
    { mirror: up.mirrorIndex, title: (w: string) => `Widen ${up.mirror} for a lower VDSsat of ${up.name} (${w})` },
  ];
  for (const side of sides) {
    for (const k of [2, 4]) {
      const plan = widen(parsed, spec, side.mirror, k);
      const edited = plan ? applySafe(parsed.text, plan.edits) : undefined;
      if (!plan || edited === undefined) continue;
      const after = reanalyze(edited);
      if (!after.parsed) continue;
      const still = after.findings.some((x) => x.code === 'link-saturation' && x.path.join('/') === path.join('/'));
      const fresh = [...errorsOf(after)].filter((e) => !before.has(e) && !e.startsWith('link-saturation@') && !e.startsWith('ratio-error@'));
      if (!still && fresh.length === 0) { fixes.push({ title: `${side.title(plan.w)}, verified by re-solving the network`, edits: plan.edits }); break; }
    }
  }
  // The upstream kind changed where that lowers its compliance limit: a standard cascode's
  // output needs VT + 2·VDSsat, a wide-swing cascode's 2·VDSsat with the same output resistance.
  const kindPath = ['mirrors', up.mirrorIndex, 'kind'];
  const kindRange = upMirror?.kind === 'cascode' && isMos(upMirror) ? parsed.source.value(kindPath) : undefined;
  const kindEdit = kindRange ? replaceValueEdit(parsed, kindPath, quotedLike(parsed.source.text(kindRange), 'wide-swing')) : undefined;
  const edited = kindEdit ? applySafe(parsed.text, [kindEdit]) : undefined;
  if (kindEdit && edited !== undefined) {
    const after = reanalyze(edited);
    const still = after.findings.some((x) => x.code === 'link-saturation' && x.path.join('/') === path.join('/'));
    const fresh = [...errorsOf(after)].filter((e) => !before.has(e) && !e.startsWith('link-saturation@') && !e.startsWith('ratio-error@'));
    if (after.parsed && !still && fresh.length === 0) {
      fixes.push({ title: `Make ${up.mirror} a wide-swing cascode (\`kind: wide-swing\`: its output needs 2·VDSsat, not VT + 2·VDSsat), verified by re-solving the network`, edits: [kindEdit] });
    }
  }
  if (fixes.length > 0) { fixes[0]!.preferred = true; f.fixes = fixes; }
  return f;
}

/** MOS only: the wide-swing kind has no bipolar form (kinds/wide-swing.ts). */
const isMos = (m: ResolvedMirror): boolean => m.type === 'nmos' || m.type === 'pmos';

/** The cascode remedy in words: a standard cascode upstream can be made wide-swing; a simple or
 *  wide-swing output is not helped by cascoding, which adds at least a VDSsat at the link node. */
function cascodeAdvice(up: ResolvedMirror | undefined): string {
  if (!up || !isMos(up)) return '';
  if (up.kind === 'cascode') return `, or make ${up.name} a wide-swing cascode (2·VDSsat instead of VT + 2·VDSsat)`;
  if (up.kind === 'simple' || up.kind === 'wide-swing') return ` (a cascode on ${up.name} would not help: it needs at least one VDSsat more at the link node)`;
  return '';
}

function applySafe(text: string, edits: Fix['edits']): string | undefined {
  try { return applyEdits(text, edits); } catch { return undefined; }
}
