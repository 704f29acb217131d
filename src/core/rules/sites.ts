/**
 * Where a report and its devices live, for the rules and the variation findings alike: in the
 * resolved spec (mirror, output, sizes, requirements) and in the source (which token a size comes
 * from, which range a finding points at). A size can be written at three levels — an output's
 * own `devices:` in a bias bank, the mirror's `devices:` per role, and the mirror's `size:` unit
 * device — and the nearest one wins, exactly as the spec elaborates it.
 */
import type {
  CornerSpec, DeviceReport, DeviceSize, MirrorOutput, MirrorReport, Range, Requirements, ResolvedMirror,
  ResolvedSpec, SpecPath,
} from '../types';
import { KINDS } from '../kinds/index';
import { sinksCurrent } from '../device-types';
import type { ParsedSpec } from '../spec/index';
import type { DeviceRef, SizeKey } from '../sizing/devices';
import { mirrorAt } from '../mirror-at';

export type { DeviceRef, SizeKey };

/** One report in its context. */
export interface Site {
  report: MirrorReport;
  mirrorIndex: number;
  outputIndex: number;
  mirror: ResolvedMirror;
  output?: MirrorOutput;
  vout: number;
  range?: [number, number];
  require: Requirements;
  /** The report's path: ['mirrors', i] or ['mirrors', i, 'outputs', j]. */
  path: SpecPath;
}

export function siteOf(spec: ResolvedSpec, report: MirrorReport): Site | undefined {
  const p = report.path;
  const { mirrorIndex, outputIndex } = report;
  const mirror = mirrorAt(spec, mirrorIndex);
  if (!mirror) return undefined;
  if (mirror.kind === 'netlist') {
    return { report, mirrorIndex, outputIndex: 0, mirror, vout: mirror.output.v, range: mirror.output.range, require: mirror.require, path: p };
  }
  const output = mirror.outputs[outputIndex];
  if (!output) return undefined;
  return { report, mirrorIndex, outputIndex, mirror, output, vout: output.output.v, range: output.output.range, require: output.require, path: p };
}

/** The device a DeviceReport describes. Bank output devices are named `<output>.<role>`. */
export function refOf(site: Site, d: DeviceReport): DeviceRef {
  const m = site.mirror;
  if (m.kind === 'netlist') return { mirror: site.mirrorIndex, role: d.name };
  if (!KINDS[m.kind].outputRoles.includes(d.role)) return { mirror: site.mirrorIndex, role: d.role };
  const dot = d.name.lastIndexOf('.');
  if (dot > 0) {
    const j = m.outputs.findIndex((o) => o.name === d.name.slice(0, dot));
    if (j >= 0) return { mirror: site.mirrorIndex, role: d.role, output: j };
  }
  return { mirror: site.mirrorIndex, role: d.role, output: site.outputIndex };
}

/** Where a device-only value goes: the output's `devices.<role>` in a bank, else the mirror's. */
export function overridePath(spec: ResolvedSpec, ref: DeviceRef): SpecPath {
  const m = mirrorAt(spec, ref.mirror);
  if (m && m.kind !== 'netlist' && ref.output !== undefined) {
    const out = m.outputs[ref.output];
    if (out && out.path.length > 2) return [...out.path, 'devices', ref.role];
  }
  return ['mirrors', ref.mirror, 'devices', ref.role];
}

/** Candidate source paths of a size value, nearest first. */
function sourceCandidates(spec: ResolvedSpec, ref: DeviceRef, key: SizeKey): SpecPath[] {
  const m = mirrorAt(spec, ref.mirror);
  if (!m) return [];
  if (m.kind === 'netlist') return [['mirrors', ref.mirror, 'devices', ref.role, key]];
  const own = overridePath(spec, ref);
  const paths: SpecPath[] = [[...own, key]];
  const mirrorLevel: SpecPath = ['mirrors', ref.mirror, 'devices', ref.role, key];
  if (own.length !== 4) paths.push(mirrorLevel);
  paths.push(['mirrors', ref.mirror, 'size', key]);
  return paths;
}

export interface SizeToken { path: SpecPath; range: Range; text: string }

/** The token a device's size value is written in, or undefined (a default, or `auto`). */
export function sizeToken(parsed: ParsedSpec, spec: ResolvedSpec, ref: DeviceRef, key: SizeKey): SizeToken | undefined {
  for (const path of sourceCandidates(spec, ref, key)) {
    const range = parsed.source.value(path);
    if (range) return { path, range, text: parsed.source.text(range) };
  }
  return undefined;
}

/** True when a token belongs to this device alone (not the shared `size:`). */
function isDeviceLevel(token: SizeToken): boolean {
  return token.path[2] === 'devices' || token.path[2] === 'outputs';
}

export function isAutoSized(spec: ResolvedSpec, mirrorIndex: number): boolean {
  const m = mirrorAt(spec, mirrorIndex);
  if (!m || m.kind === 'netlist') return false;
  const auto = (d: DeviceSize) => !!(d.auto && (d.auto.w || d.auto.l));
  return Object.values(m.devices).some(auto) || m.outputs.some((o) => Object.values(o.devices).some(auto));
}

/**
 * The one range a finding about a device points at (design §6: the value that must change, else
 * its key): its own size token (first of `keys` that is written at device level — the keys the
 * finding's fix would change; none for a finding without a size fix), else its key under
 * `devices:` (the output's own in a bank, else the mirror's), else the output's or mirror's name.
 * Hover and the panel's reveal go to the device's key instead (anchors.ts): they show the device,
 * not a value to change.
 */
export function deviceRange(parsed: ParsedSpec, spec: ResolvedSpec, ref: DeviceRef, keys: SizeKey[]): { path: SpecPath; range: Range } {
  for (const key of keys) {
    const tok = sizeToken(parsed, spec, ref, key);
    if (tok && isDeviceLevel(tok)) return { path: tok.path, range: tok.range };
  }
  const own = overridePath(spec, ref);
  const keyRange = parsed.source.key(own);
  if (keyRange) return { path: own, range: keyRange };
  if (own.length !== 4) {
    const mirrorLevel: SpecPath = ['mirrors', ref.mirror, 'devices', ref.role];
    const r = parsed.source.key(mirrorLevel);
    if (r) return { path: mirrorLevel, range: r };
    // A bank output's device with nothing of its own: the output's name.
    const outputName: SpecPath = [...own.slice(0, 4), 'name'];
    const n = parsed.source.value(outputName);
    if (n) return { path: outputName, range: n };
  }
  return mirrorRange(parsed, ref.mirror);
}

/** The mirror's `name` value (else its item). */
export function mirrorRange(parsed: ParsedSpec, mirrorIndex: number): { path: SpecPath; range: Range } {
  const path: SpecPath = ['mirrors', mirrorIndex, 'name'];
  const r = parsed.source.value(path);
  if (r) return { path, range: r };
  return { path: ['mirrors', mirrorIndex], range: parsed.source.rangeFor(['mirrors', mirrorIndex]) };
}

/** A value's range, else its key's, else the nearest ancestor's. */
export function valueRange(parsed: ParsedSpec, path: SpecPath): { path: SpecPath; range: Range } {
  return { path, range: parsed.source.rangeFor(path) };
}

/** The mirror's `kind` value (else its name). */
export function kindRange(parsed: ParsedSpec, mirrorIndex: number): { path: SpecPath; range: Range } {
  const path: SpecPath = ['mirrors', mirrorIndex, 'kind'];
  const r = parsed.source.value(path);
  return r ? { path, range: r } : mirrorRange(parsed, mirrorIndex);
}

/** The output's name (bank output) or the mirror's name: the fallback anchor. */
export function nameRange(parsed: ParsedSpec, site: Site): Range {
  const own = parsed.source.value([...site.path, 'name']);
  return own ?? parsed.source.value(['mirrors', site.mirrorIndex, 'name']) ?? parsed.source.rangeFor(site.path);
}

/** A requirement's value, else the name. */
export function requireRange(parsed: ParsedSpec, site: Site, key: keyof Requirements): Range {
  return parsed.source.value([...site.path, 'require', key]) ?? nameRange(parsed, site);
}

/** The corner's key under `corners:`, for `related`. */
export function cornerRange(parsed: ParsedSpec, corner: CornerSpec): Range {
  return parsed.source.key(corner.path) ?? parsed.source.rangeFor(corner.path);
}

/** The output-voltage limit the mirror must still work at (absolute V), from require.compliance
 *  and the far end of output.range: NMOS the lowest of them, PMOS the highest. */
export function complianceLimit(site: Site): number | undefined {
  const nmos = sinksCurrent(site.mirror.type);
  const candidates: number[] = [];
  if (site.require.compliance !== undefined) candidates.push(site.require.compliance);
  if (site.range) candidates.push(nmos ? site.range[0] : site.range[1]);
  if (candidates.length === 0) return undefined;
  return nmos ? Math.min(...candidates) : Math.max(...candidates);
}

/** Whether a compliance value fails the limit (NMOS: must reach down to it, PMOS: up to it). */
export function complianceFails(site: Site, compliance: number, limit: number): boolean {
  if (!Number.isFinite(compliance)) return true;
  return sinksCurrent(site.mirror.type) ? compliance > limit : compliance < limit;
}
