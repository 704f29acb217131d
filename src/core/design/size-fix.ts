/**
 * `computed-size` findings: where a mirror says `auto`, tell the designer what qpoint computed
 * and offer a fix that writes those numbers into the file in place of `auto` (freezing the
 * design). One finding per `auto` token: a token shared by several devices (`size: auto`, or a
 * `w: auto` in `size:`) is replaced by the value most of them got, and the devices that got
 * something else receive their own override under `devices.<role>`. The fix is checked by
 * re-parsing: it is offered only when every device then reads exactly the computed size.
 *
 * Also `design-unreachable`: a target no size can meet (gm/ID above the weak-inversion limit),
 * a width raised to wmin, or a require.rout that lengthening cannot reach.
 */
import type { Finding, ResolvedSpec, SpecPath, TemplateMirror, TextEdit } from '../types';
import { parseSpec, type ParsedSpec } from '../spec/index';
import { insertKeyEdits, replaceValueEdit } from '../spec/edit';
import { formatSI } from '../text/format';
import type { SizedDevice } from './auto-size';
import { applyEdits, editsBetween } from '../text/edits';
import { mirrorAt } from '../mirror-at';

type Dim = 'w' | 'l';
interface Use { s: SizedDevice; dim: Dim; value: number }
interface Token { path: SpecPath; whole: boolean; uses: Use[] }

const same = (a: number, b: number): boolean => Math.abs(a - b) <= 1e-9 * Math.max(Math.abs(a), Math.abs(b));

/** A length as a designer writes it: `6.85u`, `350n`. */
function lengthText(v: number): string {
  const [scale, prefix] = v >= 1e-6 ? [1e-6, 'u'] : [1e-9, 'n'];
  return `${Number((v / scale).toPrecision(6))}${prefix}`;
}

function isAutoText(t: string): boolean {
  return t.trim().replace(/^(['"])(.*)\1$/, '$2').trim() === 'auto';
}

/** The source token a device's auto dimension comes from: the nearest level that sets it. */
function autoToken(parsed: ParsedSpec, s: SizedDevice, dim: Dim): { path: SpecPath; whole: boolean } | undefined {
  const role = s.role;
  const candidates: { path: SpecPath; whole: boolean }[] = [{ path: [...s.path, dim], whole: false }];
  const mirrorLevel: SpecPath = ['mirrors', s.mirror, 'devices', role, dim];
  if (s.path.length > 4) candidates.push({ path: mirrorLevel, whole: false });
  candidates.push({ path: ['mirrors', s.mirror, 'size', dim], whole: false }, { path: ['mirrors', s.mirror, 'size'], whole: true });
  for (const c of candidates) {
    const r = parsed.source.value(c.path);
    if (!r) continue;
    const t = parsed.source.text(r);
    // `size:` that is a mapping is not the token; its `w`/`l` were candidates before it.
    if (c.whole && !isAutoText(t)) continue;
    return isAutoText(t) ? c : undefined;
  }
  return undefined;
}

function majority(values: number[]): number {
  let best = values[0]!, bestCount = 0;
  for (const v of values) {
    const n = values.filter((x) => same(x, v)).length;
    if (n > bestCount) { best = v; bestCount = n; }
  }
  return best;
}

function sizeIn(spec: ResolvedSpec, s: SizedDevice): { w: number; l: number; auto?: { w?: boolean; l?: boolean } } | undefined {
  const m = mirrorAt(spec, s.mirror);
  if (!m || m.kind === 'netlist') return undefined;
  return s.output !== undefined ? m.outputs[s.output]?.devices[s.role] : (m as TemplateMirror).devices[s.role];
}

function describeTarget(s: SizedDevice): string {
  const t = s.target;
  if (!t) return 'the design target';
  if (t.kind === 'vov') return `vov ${formatSI(t.value, 'V')}`;
  if (t.kind === 'gmid') return `gm/ID ${Number(t.value.toPrecision(3))} /V`;
  return `IC ${Number(t.value.toPrecision(3))}`;
}

/** computed-size (info, with the freezing fix) and design-unreachable (warning) findings. */
export function computedSizeFindings(parsed: ParsedSpec, sized: SizedDevice[], file?: string): Finding[] {
  const tokens = new Map<string, Token>();
  for (const s of sized) {
    for (const dim of ['w', 'l'] as const) {
      const value = s[dim];
      if (value === undefined) continue;
      const tok = autoToken(parsed, s, dim);
      if (!tok) continue;
      const id = tok.path.join('\u0000');
      const t = tokens.get(id) ?? { ...tok, uses: [] };
      t.uses.push({ s, dim, value });
      tokens.set(id, t);
    }
  }
  const findings: Finding[] = [];
  for (const t of tokens.values()) {
    const range = parsed.source.value(t.path) ?? parsed.source.rangeFor(t.path);
    const list = describeUses(t.uses);
    const f: Finding = {
      severity: 'info', code: 'computed-size', path: t.path, range,
      message: `\`auto\` computed for ${describeTarget(t.uses[0]!.s)}: ${list}; write the values in to freeze the design`,
    };
    const fix = freezeFix(parsed, t, file);
    if (fix) f.fixes = [{ title: `Write the computed size${t.uses.length > 1 ? 's' : ''} (${list})`, edits: fix, preferred: true }];
    findings.push(f);
  }
  findings.push(...unreachableFindings(parsed, sized));
  return findings;
}

/** "ref W/L 2.59 µm/860 nm, out W 10.3 µm": one entry per device, dimensions in W, L order. */
function describeUses(uses: Use[]): string {
  const byDevice = new Map<string, { w?: number; l?: number }>();
  for (const u of uses) {
    const name = u.s.device ?? u.s.role;
    const e = byDevice.get(name) ?? {};
    e[u.dim] = u.value;
    byDevice.set(name, e);
  }
  return [...byDevice].map(([name, e]) => {
    if (e.w !== undefined && e.l !== undefined) return `${name} W/L ${formatSI(e.w, 'm')}/${formatSI(e.l, 'm')}`;
    return e.w !== undefined ? `${name} W ${formatSI(e.w, 'm')}` : `${name} L ${formatSI(e.l!, 'm')}`;
  }).join(', ');
}

function freezeFix(parsed: ParsedSpec, t: Token, file?: string): TextEdit[] | undefined {
  const json = parsed.json ?? false;
  const byDim = (dim: Dim): Use[] => t.uses.filter((u) => u.dim === dim);
  const inserts: { path: SpecPath; key: Dim; text: string }[] = [];
  let replacement: string;
  const pick = (uses: Use[]): number | undefined => (uses.length ? majority(uses.map((u) => u.value)) : undefined);
  if (t.whole) {
    const w = pick(byDim('w')), l = pick(byDim('l'));
    if (w === undefined || l === undefined) return undefined;
    replacement = json ? `{ "w": "${lengthText(w)}", "l": "${lengthText(l)}" }` : `{ w: ${lengthText(w)}, l: ${lengthText(l)} }`;
    for (const u of t.uses) if (!same(u.value, u.dim === 'w' ? w : l)) inserts.push({ path: u.s.path, key: u.dim, text: lengthText(u.value) });
  } else {
    const v = pick(t.uses)!;
    replacement = lengthText(v);
    for (const u of t.uses) if (!same(u.value, v)) inserts.push({ path: u.s.path, key: u.dim, text: lengthText(u.value) });
  }
  // A mapping written over a scalar must not inherit the scalar's quotes ("auto" in JSON), so
  // the whole-size edit is built here; a length replaces its token like any value.
  const tokenRange = parsed.source.value(t.path);
  const first: TextEdit | undefined = t.whole
    ? (tokenRange ? { range: tokenRange, newText: replacement } : undefined)
    : replaceValueEdit(parsed, t.path, replacement);
  if (!first) return undefined;
  let text: string;
  try {
    text = applyEdits(parsed.text, [first]);
    for (const ins of inserts) {
      const p = parseSpec(text, file, parsed.tables ? { tables: parsed.tables } : {});
      const edits = insertKeyEdits(p, ins.path, ins.key, ins.text);
      if (edits.length === 0) return undefined;
      text = applyEdits(text, edits);
    }
  } catch {
    return undefined;
  }
  // Verify: the file now reads exactly the computed sizes, no longer `auto`, for every user.
  const after = parseSpec(text, file, parsed.tables ? { tables: parsed.tables } : {});
  if (!after.spec) return undefined;
  for (const u of t.uses) {
    const size = sizeIn(after.spec, u.s);
    if (!size || size.auto?.[u.dim] || !same(size[u.dim], u.value)) return undefined;
  }
  const edits = editsBetween(parsed.text, text);
  return edits.length ? edits : undefined;
}

function unreachableFindings(parsed: ParsedSpec, sized: SizedDevice[]): Finding[] {
  const out: Finding[] = [];
  const seen = new Set<string>();
  for (const s of sized) {
    if (!s.note) continue;
    for (const note of s.note.split('; ')) {
      const key = `${s.mirror}:${note}`;
      if (seen.has(key)) continue;
      seen.add(key);
      const lengthNote = /rout|lref/i.test(note);
      const path: SpecPath = lengthNote
        ? [...(s.output !== undefined ? s.path.slice(0, -2) : ['mirrors', s.mirror]), 'require', 'rout']
        : ['mirrors', s.mirror, 'design', s.target?.kind ?? 'vov'];
      const devices = sized.filter((x) => x.mirror === s.mirror && x.note?.includes(note)).map((x) => x.device ?? x.role);
      out.push({
        severity: 'warning', code: 'design-unreachable', path,
        range: parsed.source.value(path) ?? parsed.source.rangeFor(path),
        message: `${devices.join(', ')}: ${note}`,
      });
    }
  }
  return out;
}
