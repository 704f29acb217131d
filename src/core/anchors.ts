/**
 * Anchors tie source positions to reports: a mirror's name, each output of a bank, each device
 * key written in the spec. Hover, CodeLens and the panel's "reveal" use them, so the front ends
 * never need the YAML tree.
 *
 * A mirror's anchors read only its own item (every range is under `mirrors[i]`) and the names its
 * reports give it and its devices, so the editor keeps them across keystrokes (`MirrorAnchors`,
 * in the document's AnalysisCache): keyed by the mirror's index, its item as written (by digest) and those
 * names, with lines counted from the item's first line, and moved to where it now starts.
 */
import type { Anchor, DeviceReport, MirrorReport, ResolvedMirror, SpecPath } from './types';
import type { ParsedSpec } from './spec/index';
import { MirrorFragments } from './spec/fragment';
import { indexOf } from './mirror-at';
import { SweptMap } from './swept-map';

/** Each mirror's anchors by key (above); what an analysis did not use is dropped after it. */
export class MirrorAnchors {
  /** Anchors with lines counted from the item's first line, and as last placed (at `first`):
   *  read back at the same line, they are those objects again (values nothing changes). */
  private readonly known = new SweptMap<string, { anchors: Anchor[]; placed?: { first: number; anchors: Anchor[] } }>();

  begin(): void {
    this.known.begin();
  }

  sweep(): void {
    this.known.sweep();
  }

  get size(): number {
    return this.known.size;
  }

  /** The anchors kept under `key`, placed at the item's first line `first`. */
  get(key: string, first: number): Anchor[] | undefined {
    const e = this.known.get(key);
    if (!e) return undefined;
    if (e.placed?.first !== first) e.placed = { first, anchors: e.anchors.map((a) => moved(a, first)) };
    return e.placed.anchors;
  }

  set(key: string, anchors: Anchor[]): void {
    this.known.set(key, { anchors });
  }
}

export function buildAnchors(parsed: ParsedSpec, reports: MirrorReport[], store?: MirrorAnchors): Anchor[] {
  const spec = parsed.spec;
  if (!spec) return [];
  const anchors: Anchor[] = [];
  // Maps and sets, not searches: a 3 000-mirror file has ~12 000 anchors. With a store (the
  // editor), an output's report is found by its path object first (the report's path is its
  // output's), by path text only when that misses.
  let byPath: Map<string, MirrorReport> | undefined;
  const byRef = store ? new Map(reports.map((r) => [r.path, r])) : undefined;
  const reportAt = (path: SpecPath): MirrorReport | undefined => byRef?.get(path) ?? (byPath ??= new Map(reports.map((r) => [pathKey(r.path), r]))).get(pathKey(path));
  const firstByMirror = new Map<string, MirrorReport>();
  for (const r of reports) if (!firstByMirror.has(r.mirror)) firstByMirror.set(r.mirror, r);
  const frags = store ? MirrorFragments.of(parsed) : undefined;
  spec.mirrors.forEach((mirror) => {
    const first = firstByMirror.get(mirror.name);
    if (!first) return;
    const outputs = mirror.kind === 'netlist' ? [] : mirror.outputs.map((out) => ({ path: out.path, report: reportAt(out.path) }));
    const i = indexOf(mirror);
    const span = frags?.lineSpan(i);
    const key = span && frags!.itemKey(i, namesKey(mirror, first, outputs));
    const kept = key === undefined ? undefined : store!.get(key, span!.first);
    if (kept) {
      anchors.push(...kept);
      return;
    }
    const own = mirrorAnchors(parsed, mirror, i, first, outputs);
    anchors.push(...own);
    // Kept only when every range lies inside the item (lines counted from its first line).
    if (key !== undefined && own.every((a) => a.range.start.line >= span!.first && a.range.end.line <= span!.last)) {
      store!.set(key, own.map((a) => moved(a, -span!.first)));
    }
  });
  return anchors;
}

/** The anchor `lines` lines further down. */
function moved(a: Anchor, lines: number): Anchor {
  return { ...a, range: { start: { line: a.range.start.line + lines, character: a.range.start.character }, end: { line: a.range.end.line + lines, character: a.range.end.character } } };
}

/**
 * What a mirror's anchors read of its reports, as text: its kind, and each report's name and its
 * devices' names and roles (`named`). Kept with the mirror object (a value) and the reports'
 * names and device lists it was written from: a report read back from the solved units shares
 * its device list, so an unchanged mirror's text is not written again, and its key is the same
 * string (`MirrorFragments.itemKey`).
 */
function namesKey(mirror: ResolvedMirror, first: MirrorReport, outputs: { path: SpecPath; report?: MirrorReport }[]): string {
  const memo = namesKeys.get(mirror);
  const same = (r: MirrorReport | undefined, k: number): boolean => {
    const was = memo!.reports[k];
    return r === undefined ? was === undefined : was !== undefined && was.name === r.name && was.devices === r.devices;
  };
  if (memo && memo.reports.length === outputs.length + 1 && same(first, 0) && outputs.every((o, k) => same(o.report, k + 1))) return memo.text;
  const text = JSON.stringify([mirror.kind, named(first), outputs.map((o) => [o.path, o.report && named(o.report)])]);
  namesKeys.set(mirror, { reports: [first, ...outputs.map((o) => o.report)].map((r) => r && { name: r.name, devices: r.devices }), text });
  return text;
}
const namesKeys = new WeakMap<ResolvedMirror, { reports: ({ name: string; devices: readonly DeviceReport[] } | undefined)[]; text: string }>();

/** What a mirror's anchors read of a report: its name and its devices' names and roles (a
 *  report read back from the solved units shares its device list: written once). */
function named(r: MirrorReport): string {
  let devices = deviceNames.get(r.devices);
  if (devices === undefined) {
    devices = JSON.stringify(r.devices.map((d) => [d.name, d.role]));
    deviceNames.set(r.devices, devices);
  }
  return `${JSON.stringify(r.name)}:${devices}`;
}
const deviceNames = new WeakMap<readonly DeviceReport[], string>();

/** One mirror's anchors: its name, each bank output's, each device key written. */
function mirrorAnchors(parsed: ParsedSpec, mirror: ResolvedMirror, index: number, first: MirrorReport, outputs: { path: SpecPath; report?: MirrorReport }[]): Anchor[] {
  const anchors: Anchor[] = [];
  const devicePaths = new Set<string>();
  const mirrorPath: SpecPath = ['mirrors', index];
  const nameRange = parsed.source.value([...mirrorPath, 'name']);
  anchors.push({ kind: 'mirror', path: mirrorPath, range: nameRange ?? parsed.source.rangeFor(mirrorPath), report: first.name });
  addDeviceAnchors(parsed, anchors, devicePaths, [...mirrorPath, 'devices'], first, mirror.kind === 'netlist');
  for (const { path, report } of outputs) {
    if (!report || path.length === 2) continue;
    const range = parsed.source.value([...path, 'name']) ?? parsed.source.rangeFor(path);
    anchors.push({ kind: 'output', path, range, report: report.name });
    addDeviceAnchors(parsed, anchors, devicePaths, [...path, 'devices'], report, false);
  }
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
