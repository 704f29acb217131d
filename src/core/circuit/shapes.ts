/**
 * Template circuits of one shape, built once per spec: two mirrors that differ only in their
 * name, place, input current and held output voltages wire the same circuit (a template names
 * nodes and devices by role, never by mirror), so the second takes the first's nodes, Jacobian
 * pattern and order, and elements copied with its own input current and held voltages —
 * what its own build would give, without the build (a bias network's members are mostly a few
 * shapes: a 1 000-mirror tree is two).
 *
 * Only for a mirror fed by a current (its own or a link's) with a valid value: its problems are
 * then its shape's. Every element a caller may change is a copy of its own (a Monte Carlo run
 * moves a device's parameters in place); the shape's own circuit is never handed out.
 */
import type { MirrorOutput, ResolvedSpec, TemplateMirror } from '../types';
import type { Circuit } from './circuit';
import { mosWith, type CircuitElement, type DeviceElement } from './elements/element';
import { copyDevice } from '../models/device';
import type { WiredTemplate } from './templates';

/** A shape's circuit as first built, and where its outputs are held. */
export interface Shape { c: Circuit; wired: WiredTemplate; outIdx: number[] }

/** A mirror seen in a spec, and its shape's circuit once a second mirror of that shape (or a
 *  second build of the same mirror) asked for it: a spec of all-different mirrors builds each
 *  once and copies nothing. */
interface Seen { m: TemplateMirror; shape?: Shape }

/** Per spec, the mirrors seen by a print of what tells them apart most often; a few per print (a
 *  spec of all-different mirrors compares each with a few, not with every other). */
const bySpec = new WeakMap<ResolvedSpec, Map<string, Seen[]>>();
const PER_PRINT = 4;

/** Whether two values are the same, field by field (numbers by Object.is: −0, NaN). */
function same(a: unknown, b: unknown): boolean {
  if (Object.is(a, b)) return true;
  if (typeof a !== 'object' || typeof b !== 'object' || a === null || b === null) return false;
  if (Array.isArray(a) !== Array.isArray(b)) return false;
  return sameFields(a as Record<string, unknown>, b as Record<string, unknown>, NONE);
}

const NONE: ReadonlySet<string> = new Set();
/** What a copy sets for itself (input current, held voltages) or the build does not read. */
const MIRROR_OWN: ReadonlySet<string> = new Set(['name', 'path', 'design', 'input', 'outputs']);
const OUTPUT_OWN: ReadonlySet<string> = new Set(['path', 'require', 'feeds', 'output']);
const HELD: ReadonlySet<string> = new Set(['v']);

/** Every field but those in `skip` the same (a field left undefined counts as absent). */
function sameFields(a: Record<string, unknown>, b: Record<string, unknown>, skip: ReadonlySet<string>): boolean {
  let na = 0, nb = 0;
  for (const k in a) {
    if (skip.has(k) || a[k] === undefined) continue;
    na++;
    if (!same(a[k], b[k])) return false;
  }
  for (const k in b) if (!skip.has(k) && b[k] !== undefined) nb++;
  return na === nb;
}

function sameOutput(a: MirrorOutput, b: MirrorOutput): boolean {
  return sameFields(a as unknown as Record<string, unknown>, b as unknown as Record<string, unknown>, OUTPUT_OWN)
    && sameFields(a.output as unknown as Record<string, unknown>, b.output as unknown as Record<string, unknown>, HELD);
}

/** Whether `b` wires the circuit `a` does: the same but for its name, place, input current and
 *  held output voltages. */
function sameShape(a: TemplateMirror, b: TemplateMirror): boolean {
  if (a.input.kind !== b.input.kind || a.outputs.length !== b.outputs.length) return false;
  for (let j = 0; j < a.outputs.length; j++) if (!sameOutput(a.outputs[j]!, b.outputs[j]!)) return false;
  return sameFields(a as unknown as Record<string, unknown>, b as unknown as Record<string, unknown>, MIRROR_OWN);
}

/** The shape of `m` built for output `outputIndex` (cascode gate held at `vbias`) in `spec`:
 *  `known` when one was built, `keep` to record the one built now when a mirror of its shape was
 *  seen before; undefined when `m`'s circuit is not shared (yet). `bank`: whether `m` names its devices by output (a path length tells,
 *  which the comparison leaves out). */
export function shapeOf(spec: ResolvedSpec, m: TemplateMirror, bank: boolean, outputIndex: number, vbias: number | undefined):
  { known: Shape } | { keep: (s: Shape) => void } | undefined {
  const input = m.input;
  if (input.kind !== 'current' && input.kind !== 'link') return undefined;
  if (!(input.i > 0) || !Number.isFinite(input.i)) return undefined;
  let prints = bySpec.get(spec);
  if (!prints) { prints = new Map(); bySpec.set(spec, prints); }
  const print = `${m.kind}|${m.type}|${bank ? 1 : 0}|${outputIndex}|${vbias === undefined ? '' : Object.is(vbias, -0) ? '-0' : vbias}`;
  const list = prints.get(print) ?? [];
  for (const seen of list) {
    if (!sameShape(seen.m, m)) continue;
    if (seen.shape) return { known: seen.shape };
    return { keep: (s) => { seen.shape = s; } };
  }
  if (list.length >= PER_PRINT) return undefined;
  if (list.length === 0) prints.set(print, list);
  list.push({ m });
  return undefined;
}

/** The shape's circuit for mirror `m`: its input current and held output voltages, elements of
 *  its own. */
export function shapedCircuit(s: Shape, m: TemplateMirror, outputIndex: number, vout: number): Circuit {
  const c = s.c;
  const fixedV = c.fixedV.slice();
  for (let j = 0; j < s.outIdx.length; j++) fixedV[s.outIdx[j]!] = j === outputIndex ? vout : m.outputs[j]!.output.v;
  const i = m.input.kind === 'current' || m.input.kind === 'link' ? m.input.i : NaN;
  const elements: CircuitElement[] = [];
  const devices: DeviceElement[] = [];
  for (const e of c.elements) {
    switch (e.kind) {
      case 'mos': {
        const x = mosWith(e, copyDevice(e.dev));
        elements.push(x); devices.push(x);
        break;
      }
      case 'bjt': {
        const x = Object.assign({}, e);
        x.dev = Object.assign({}, e.dev);
        elements.push(x); devices.push(x);
        break;
      }
      case 'current': elements.push({ kind: 'current', name: e.name, from: e.from, to: e.to, i }); break;
      case 'resistor': elements.push(Object.assign({}, e)); break;
      default: elements.push(e);
    }
  }
  // Field by field, as CircuitBuilder.build makes it (Object.assign gives a property store of its own).
  return {
    nodeNames: c.nodeNames, nFree: c.nFree, fixedV, elements, devices, jacobian: c.jacobian, ordering: c.ordering,
    hasCurrentSources: c.hasCurrentSources, outNode: c.outNode, outSign: c.outSign, vmid: c.vmid, vss: c.vss,
    problems: c.problems.slice(),
  };
}
