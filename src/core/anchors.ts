/**
 * Anchors tie source positions to reports: a mirror's name, each output of a bank, each device
 * key written in the spec. Hover, CodeLens and the panel's "reveal" use them, so the front ends
 * never need the YAML tree.
 */
import type { Anchor, MirrorReport, SpecPath } from './types';
import type { ParsedSpec } from './spec/index';
import { indexOf } from './mirror-at';

export function buildAnchors(parsed: ParsedSpec, reports: MirrorReport[]): Anchor[] {
  const spec = parsed.spec;
  if (!spec) return [];
  const anchors: Anchor[] = [];
  // Maps and sets, not searches: a 3 000-mirror file has ~12 000 anchors.
  const byPath = new Map(reports.map((r) => [pathKey(r.path), r]));
  const firstByMirror = new Map<string, MirrorReport>();
  for (const r of reports) if (!firstByMirror.has(r.mirror)) firstByMirror.set(r.mirror, r);
  const devicePaths = new Set<string>();
  spec.mirrors.forEach((mirror) => {
    const mirrorPath: SpecPath = ['mirrors', indexOf(mirror)];
    const first = firstByMirror.get(mirror.name);
    if (!first) return;
    const nameRange = parsed.source.value([...mirrorPath, 'name']);
    anchors.push({ kind: 'mirror', path: mirrorPath, range: nameRange ?? parsed.source.rangeFor(mirrorPath), report: first.name });
    addDeviceAnchors(parsed, anchors, devicePaths, [...mirrorPath, 'devices'], first, mirror.kind === 'netlist');
    if (mirror.kind === 'netlist') return;
    mirror.outputs.forEach((out) => {
      const report = byPath.get(pathKey(out.path));
      if (!report || out.path.length === 2) return;
      const range = parsed.source.value([...out.path, 'name']) ?? parsed.source.rangeFor(out.path);
      anchors.push({ kind: 'output', path: out.path, range, report: report.name });
      addDeviceAnchors(parsed, anchors, devicePaths, [...out.path, 'devices'], report, false);
    });
  });
  return anchors;
}

/** One anchor per device key written under `devices:` (inherited devices have no key). A bank
 *  output's report lists the shared reference and its own devices (`<output>.<role>`). */
function addDeviceAnchors(parsed: ParsedSpec, anchors: Anchor[], seen: Set<string>, devicesPath: SpecPath, report: MirrorReport, byName: boolean): void {
  for (const device of report.devices) {
    const key = byName ? device.name : device.role;
    const path = [...devicesPath, key];
    const id = pathKey(path);
    if (seen.has(id)) continue;
    const range = parsed.source.key(path);
    if (range) {
      seen.add(id);
      anchors.push({ kind: 'device', path, range, report: report.name, device: device.name });
    }
  }
}

function pathKey(path: SpecPath): string {
  return path.join('/');
}
