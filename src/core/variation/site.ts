/**
 * Where a report sits in the spec and in the source, for variation findings: its mirror and
 * output, the requirements it is held to, and the narrowest ranges to point at.
 */
import type { CornerSpec, MirrorReport, Polarity, Range, Requirements, ResolvedMirror, ResolvedSpec, SpecPath } from '../types';
import type { ParsedSpec } from '../spec/index';
import { mirrorAt } from '../mirror-at';

export interface Site {
  report: MirrorReport;
  mirrorIndex: number;
  mirror: ResolvedMirror;
  /** The output's own path: ['mirrors', i] or ['mirrors', i, 'outputs', j]. */
  path: SpecPath;
  require: Requirements;
  type: Polarity;
  range?: [number, number];
}

export function siteOf(spec: ResolvedSpec, report: MirrorReport): Site | undefined {
  const p = report.path;
  const mirrorIndex = typeof p[1] === 'number' ? p[1] : -1;
  const mirror = mirrorAt(spec, mirrorIndex);
  if (!mirror) return undefined;
  if (mirror.kind === 'netlist') {
    return { report, mirrorIndex, mirror, path: p, require: mirror.require, type: mirror.type, range: mirror.output.range };
  }
  const j = p.length >= 4 && typeof p[3] === 'number' ? p[3] : 0;
  const o = mirror.outputs[j];
  if (!o) return undefined;
  return { report, mirrorIndex, mirror, path: p, require: o.require, type: mirror.type, range: o.output.range };
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

/** A device's key under `devices:` (the output's own in a bank, else the mirror's), else the name. */
export function deviceRange(parsed: ParsedSpec, site: Site, deviceName: string): Range {
  const d = site.report.devices.find((x) => x.name === deviceName);
  const role = d?.role ?? deviceName;
  const candidates: SpecPath[] = site.mirror.kind === 'netlist'
    ? [['mirrors', site.mirrorIndex, 'devices', deviceName]]
    : [[...site.path, 'devices', role], ['mirrors', site.mirrorIndex, 'devices', role]];
  for (const c of candidates) {
    const r = parsed.source.key(c);
    if (r) return r;
  }
  return nameRange(parsed, site);
}

/** The corner's key under `corners:`, for `related`. */
export function cornerRange(parsed: ParsedSpec, corner: CornerSpec): Range {
  return parsed.source.key(corner.path) ?? parsed.source.rangeFor(corner.path);
}

/** The output-voltage limit the mirror must still work at (absolute V), from require.compliance
 *  and the far end of output.range: NMOS the lowest of them, PMOS the highest. */
export function complianceLimit(site: Site): number | undefined {
  const candidates: number[] = [];
  if (site.require.compliance !== undefined) candidates.push(site.require.compliance);
  if (site.range) candidates.push(site.type === 'nmos' ? site.range[0] : site.range[1]);
  if (candidates.length === 0) return undefined;
  return site.type === 'nmos' ? Math.min(...candidates) : Math.max(...candidates);
}

/** Whether a compliance value fails the limit (NMOS: must reach down to it, PMOS: up to it). */
export function complianceFails(site: Site, compliance: number, limit: number): boolean {
  if (!Number.isFinite(compliance)) return true;
  return site.type === 'nmos' ? compliance > limit : compliance < limit;
}
