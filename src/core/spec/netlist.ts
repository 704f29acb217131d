/**
 * `kind: netlist` → NetlistMirror. Node names are identifiers; `vdd`, `vss`, `gnd` and `0` are the
 * rails (any letter case), resolved to `vdd` / `vss`. A device's bulk defaults to its type's rail.
 */
import type { DeviceType, NetlistCurrentSource, NetlistDevice, NetlistMirror, NetlistResistor, NetlistVoltageSource,
  SpecPath, Supplies } from '../types';
import { DEVICE_TYPES, isBipolarType } from '../device-types';
import { readResistorDrift } from './drift';
import { SPEC_LIMITS } from '../defaults';
import { misplaced, missing, readEnum, readMap, readString } from './read';
import type { Data } from './read';
import { readOutput, readRequire } from './mirror';
import { askIf, suggestion } from './suggest';
import { readFlavour } from './flavour';
import type { ProcessRead } from './process';
import { resolveNumber, typeName } from './values';
import type { ValueScope } from './values';

const NODE = /^[A-Za-z_][A-Za-z0-9_]*$/;
const TEMPLATE_KEYS = ['size', 'vbias', 'outputs', 'design', 'resistor', 'k'];

/** Rail name for a node, or undefined for a free node. */
function railOf(node: string): 'vdd' | 'vss' | undefined {
  const n = node.toLowerCase();
  if (n === 'vdd') return 'vdd';
  if (n === 'vss' || n === 'gnd' || n === '0') return 'vss';
  return undefined;
}

function readNode(scope: ValueScope, raw: unknown, path: SpecPath): string | undefined {
  if (raw === undefined) return undefined;
  const text = typeof raw === 'number' ? String(raw) : typeof raw === 'string' ? raw.trim() : undefined;
  if (text === undefined) {
    scope.sink.error('wrong-type', `\`${String(path[path.length - 1])}\` must be a node name; got ${typeName(raw)}`, path, undefined, 'type');
    return undefined;
  }
  const rail = railOf(text);
  if (rail) return rail;
  if (!NODE.test(text)) {
    scope.sink.error('bad-name', `node name \`${text}\` must start with a letter or _ and hold only letters, digits and _`, path);
    return undefined;
  }
  return text;
}

/** Terminal uses of each free node, for the floating-node check. */
type Uses = Map<string, { path: SpecPath; drives: boolean }[]>;

function use(uses: Uses, node: string | undefined, path: SpecPath, drives: boolean): void {
  if (!node || railOf(node)) return;
  const list = uses.get(node) ?? [];
  list.push({ path, drives });
  uses.set(node, list);
}

const SECTIONS = ['devices', 'currents', 'voltages', 'resistors'] as const;

/** A netlist past SPEC_LIMITS.maxNetlistElements is refused before its elements are read, with
 *  one finding on the key of its largest section. */
function tooLarge(scope: ValueScope, m: Data, path: SpecPath): boolean {
  const count = (k: string): number => {
    const v = m[k];
    return v !== null && typeof v === 'object' && !Array.isArray(v) ? Object.keys(v).length : 0;
  };
  const total = SECTIONS.reduce((sum, k) => sum + count(k), 0);
  if (total <= SPEC_LIMITS.maxNetlistElements) return false;
  const largest = SECTIONS.reduce((a, b) => (count(b) > count(a) ? b : a));
  const at: SpecPath = [...path, largest];
  scope.sink.error('netlist-too-large',
    `this netlist has ${total} elements; qpoint solves netlists of up to ${SPEC_LIMITS.maxNetlistElements} (split it into several mirrors)`,
    at, scope.sink.src.keyOf(at));
  return true;
}

export function readNetlistMirror(
  scope: ValueScope, m: Data, index: number, name: string, type: DeviceType | undefined, supplies: Supplies | undefined, proc?: ProcessRead,
): NetlistMirror | undefined {
  const path: SpecPath = ['mirrors', index];
  const sink = scope.sink;
  const before = sink.errorCount;
  for (const k of TEMPLATE_KEYS) if (m[k] !== undefined) misplaced(sink, [...path, k], `\`${k}\` applies to template kinds; a netlist gives w, l and m per device`);
  if (m.device !== undefined) misplaced(sink, [...path, 'device'], '`device` on a netlist is written per device: `devices: { m1: { device: lvt, d: …, g: …, s: …, w: …, l: … } }`');
  if (m.filter !== undefined) misplaced(sink, [...path, 'filter'], '`filter` applies to template kinds (the gate lines from the reference to the outputs)');
  const seen = new Map<string, string>();  // element name → its group, for duplicate-name
  const claim = (group: string, elem: string, at: SpecPath) => {
    const g = seen.get(elem);
    if (g) sink.error('duplicate-name', `\`${elem}\` is already the name of an entry in \`${g}\`; element names must be unique in a netlist`, at, 'key');
    else seen.set(elem, group);
  };
  const uses: Uses = new Map();
  if (tooLarge(scope, m, path)) return undefined;

  /** The devices (MOSFETs, bipolar devices) of one section (`devices`, or the start-up element's `startup`). */
  const readDevices = (section: 'devices' | 'startup', dmap: Data): NetlistDevice[] => {
    const list: NetlistDevice[] = [];
    const dp = [...path, section];
    for (const dn of Object.keys(dmap)) {
      const at = [...dp, dn];
      claim(section, dn, at);
      const d = readMap(sink, dmap[dn], at, 'a mapping { type, device, d, g, s, b, w, l, m }');
      if (!d) continue;
      const written = d.type === undefined ? undefined : readEnum<DeviceType>(sink, d.type, [...at, 'type'], DEVICE_TYPES);
      // `device:` names a flavour of process.devices; without `type` the device is its flavour's type.
      const flavour = readFlavour(sink, d.device, [...at, 'device'], proc, written, 'device');
      const dtype: DeviceType | undefined = d.type !== undefined ? written : flavour ? proc?.devices?.[flavour]?.type : type;
      if (d.type === undefined && !type && d.device === undefined) missing(sink, at, 'type', ' (nmos, pmos, npn or pnp; or give the mirror a `type`)');
      if (dtype && isBipolarType(dtype)) {
        // A bipolar device (BiCMOS): collector, base, emitter; sized by area and m.
        for (const k of ['d', 'g', 's', 'w', 'l']) {
          if (d[k] !== undefined) sink.error('bad-value', `a ${dtype} device has terminals c, b, e and is sized by \`area\` and \`m\`; \`${k}\` is a MOSFET's`, [...at, k], 'key');
        }
        const t3: Record<'c' | 'b' | 'e', string | undefined> = { c: undefined, b: undefined, e: undefined };
        for (const k of ['c', 'b', 'e'] as const) {
          if (d[k] === undefined) { missing(sink, at, k, k === 'c' ? ' (collector node)' : k === 'b' ? ' (base node)' : ' (emitter node)'); continue; }
          t3[k] = readNode(scope, d[k], [...at, k]);
          use(uses, t3[k], [...at, k], k !== 'b');
        }
        const area = d.area === undefined ? 1 : resolveNumber(scope, d.area, [...at, 'area'], 'plain', { positive: true });
        const mb = d.m === undefined ? 1 : resolveNumber(scope, d.m, [...at, 'm'], 'plain', { positive: true, integer: true });
        if (t3.c && t3.b && t3.e && area !== undefined && mb !== undefined) {
          list.push({ name: dn, type: dtype, c: t3.c, b: t3.b, e: t3.e, area, m: mb });
        }
        continue;
      }
      if (d.area !== undefined) sink.error('bad-value', '`area` sizes a bipolar device (type npn or pnp); a MOSFET is sized by `w`, `l` and `m`', [...at, 'area'], 'key');
      const t: Record<'d' | 'g' | 's' | 'b', string | undefined> = { d: undefined, g: undefined, s: undefined, b: undefined };
      for (const k of ['d', 'g', 's', 'b'] as const) {
        if (d[k] === undefined) {
          if (k !== 'b') missing(sink, at, k, k === 'd' ? ' (drain node)' : k === 'g' ? ' (gate node)' : ' (source node)');
          continue;
        }
        t[k] = readNode(scope, d[k], [...at, k]);
        use(uses, t[k], [...at, k], k !== 'g');
      }
      const w = d.w === undefined ? undefined : resolveNumber(scope, d.w, [...at, 'w'], 'length', { positive: true });
      const l = d.l === undefined ? undefined : resolveNumber(scope, d.l, [...at, 'l'], 'length', { positive: true });
      if (d.w === undefined) missing(sink, at, 'w', ' (width, m)');
      if (d.l === undefined) missing(sink, at, 'l', ' (length, m)');
      const mm = d.m === undefined ? 1 : resolveNumber(scope, d.m, [...at, 'm'], 'plain', { positive: true, integer: true });
      if (dtype && !isBipolarType(dtype) && t.d && t.g && t.s && w !== undefined && l !== undefined && mm !== undefined) {
        const dev: NetlistDevice = { name: dn, type: dtype, d: t.d, g: t.g, s: t.s, b: t.b ?? (dtype === 'nmos' ? 'vss' : 'vdd'), w, l, m: mm };
        if (flavour) dev.device = flavour;
        list.push(dev);
      }
    }
    return list;
  };
  const dp = [...path, 'devices'];
  if (m.devices === undefined) missing(sink, path, 'devices', ' (the MOSFETs by name)');
  const dmap = readMap(sink, m.devices, dp, 'a mapping of device names to { type, device, d, g, s, b, w, l, m }') ?? {};
  if (m.devices !== undefined && Object.keys(dmap).length === 0) sink.error('bad-value', '`devices` is empty; a netlist needs at least one MOSFET', dp, 'key');
  const devices = readDevices('devices', dmap);
  const smap = m.startup === undefined ? undefined : readMap(sink, m.startup, [...path, 'startup'], 'a mapping of start-up device names to { type, device, d, g, s, b, w, l, m }');
  const startup = smap ? readDevices('startup', smap) : undefined;

  const currents: NetlistCurrentSource[] = [];
  const cp = [...path, 'currents'];
  const cmap = readMap(sink, m.currents, cp, 'a mapping of names to { from, to, i }') ?? {};
  for (const cn of Object.keys(cmap)) {
    const at = [...cp, cn];
    claim('currents', cn, at);
    const c = readMap(sink, cmap[cn], at, 'a mapping { from, to, i }');
    if (!c) continue;
    for (const k of ['from', 'to', 'i']) if (c[k] === undefined) missing(sink, at, k);
    const from = readNode(scope, c.from, [...at, 'from']);
    const to = readNode(scope, c.to, [...at, 'to']);
    const i = c.i === undefined ? undefined : resolveNumber(scope, c.i, [...at, 'i'], 'current', { positive: true });
    use(uses, from, [...at, 'from'], true);
    use(uses, to, [...at, 'to'], true);
    if (from && to && from === to) sink.error('bad-value', `current source \`${cn}\` has both ends on \`${from}\``, [...at, 'to']);
    else if (from && to && i !== undefined) currents.push({ name: cn, from, to, i });
  }

  const voltages: NetlistVoltageSource[] = [];
  const vp = [...path, 'voltages'];
  const vmap = readMap(sink, m.voltages, vp, 'a mapping of names to { node, v }') ?? {};
  const held = new Map<string, string>();
  for (const vn of Object.keys(vmap)) {
    const at = [...vp, vn];
    claim('voltages', vn, at);
    const s = readMap(sink, vmap[vn], at, 'a mapping { node, v }');
    if (!s) continue;
    for (const k of ['node', 'v']) if (s[k] === undefined) missing(sink, at, k);
    const node = readNode(scope, s.node, [...at, 'node']);
    const v = s.v === undefined ? undefined : resolveNumber(scope, s.v, [...at, 'v'], 'voltage');
    if (node && railOf(node)) {
      sink.error('bad-value', `\`${node}\` is a rail, set by \`supplies\`; a voltage source holds a free node`, [...at, 'node']);
    } else if (node && held.has(node)) {
      sink.error('bad-value', `node \`${node}\` is already held by voltage source \`${held.get(node)}\``, [...at, 'node']);
    } else if (node && v !== undefined) {
      held.set(node, vn);
      use(uses, node, [...at, 'node'], true);
      voltages.push({ name: vn, node, v });
    }
  }

  const resistors: NetlistResistor[] = [];
  const rp = [...path, 'resistors'];
  const rmap = readMap(sink, m.resistors, rp, 'a mapping of names to { a, b, r }') ?? {};
  for (const rn of Object.keys(rmap)) {
    const at = [...rp, rn];
    claim('resistors', rn, at);
    const r = readMap(sink, rmap[rn], at, 'a mapping { a, b, r }');
    if (!r) continue;
    for (const k of ['a', 'b', 'r']) if (r[k] === undefined) missing(sink, at, k);
    const a = readNode(scope, r.a, [...at, 'a']);
    const b = readNode(scope, r.b, [...at, 'b']);
    const ohms = r.r === undefined ? undefined : resolveNumber(scope, r.r, [...at, 'r'], 'resistance', { positive: true });
    use(uses, a, [...at, 'a'], true);
    use(uses, b, [...at, 'b'], true);
    if (a && b && a === b) sink.error('bad-value', `resistor \`${rn}\` has both ends on \`${a}\``, [...at, 'b']);
    else if (a && b && ohms !== undefined) resistors.push({ name: rn, a, b, r: ohms, ...readResistorDrift(scope, r, at) });
  }

  // Output: a free node that something connects to, not held by a voltage source.
  const op = [...path, 'output'];
  let output: NetlistMirror['output'] | undefined;
  if (m.output === undefined) missing(sink, path, 'output', ' ({ node, v })');
  const o = readMap(sink, m.output, op, 'a mapping { node, v, range }');
  if (o) {
    if (o.node === undefined) missing(sink, op, 'node', ' (the output node)');
    const node = readNode(scope, o.node, [...op, 'node']);
    const spec = readOutput(scope, { v: o.v, range: o.range }, op, supplies);
    if (o.v === undefined) missing(sink, op, 'v', ' (nominal output voltage, V)');
    if (node && railOf(node)) sink.error('bad-value', `the output node cannot be the rail \`${node}\``, [...op, 'node']);
    else if (node && held.has(node)) sink.error('bad-value', `the output node \`${node}\` is already held by voltage source \`${held.get(node)}\``, [...op, 'node']);
    else if (node && !uses.has(node)) sink.error('bad-value', `the output node \`${node}\` connects to nothing in this netlist`, [...op, 'node']);
    else if (node && spec?.v !== undefined) {
      output = { node, v: spec.v };
      if (spec.range) output.range = spec.range;
      use(uses, node, [...op, 'node'], true);
    }
  }

  // No `input`: a self-biased netlist (design §14), judged by the start-up check.
  const ip = [...path, 'input'];
  let input: NetlistMirror['input'] | undefined;
  const im = m.input === undefined ? undefined : readMap(sink, m.input, ip, 'a mapping { source }');
  if (im) {
    if (im.source === undefined) missing(sink, ip, 'source');
    const src = readString(sink, im.source, [...ip, 'source']);
    if (src !== undefined) {
      if (cmap[src] === undefined) {
        const word = suggestion(src, Object.keys(cmap));
        sink.error('unknown-name', `\`${src}\` is not a current source of this netlist${askIf(word)}`, [...ip, 'source'], undefined, undefined, word);
      }
      else input = { source: src };
    }
  }

  let pair: NetlistMirror['pair'];
  if (m.pair !== undefined) {
    const pp = [...path, 'pair'];
    const pm = readMap(sink, m.pair, pp, 'a mapping { ref, out }');
    if (pm) {
      const names: Partial<Record<'ref' | 'out', string>> = {};
      for (const k of ['ref', 'out'] as const) {
        if (pm[k] === undefined) { missing(sink, pp, k); continue; }
        const n = readString(sink, pm[k], [...pp, k]);
        if (n === undefined) continue;
        if (dmap[n] === undefined) {
          const word = suggestion(n, Object.keys(dmap));
          sink.error('unknown-name', `\`${n}\` is not a device of this netlist${askIf(word)}`, [...pp, k], undefined, undefined, word);
        } else names[k] = n;
      }
      if (names.ref && names.out && names.ref === names.out) {
        sink.error('bad-value', `\`out\` is \`${names.out}\`, the device already named as \`ref\`; a pair is two devices: the reference and the output it copies to`, [...pp, 'out']);
      } else if (names.ref && names.out) pair = { ref: names.ref, out: names.out };
    }
  }

  // Nodes that no drain, source, bulk, source or resistor drives float (gates only) or dangle.
  // An error, not a warning: a solve would put a floating gate wherever gmin pulls it (mid-supply)
  // and report the wiring mistake as a ratio error with a fix that hides it.
  for (const [node, list] of uses) {
    if (list.length === 1 || !list.some((u) => u.drives)) {
      const why = list.length === 1 ? 'connects to only one terminal' : 'connects only to gates';
      sink.error('floating-node', `node \`${node}\` ${why}, so nothing sets its voltage: \`${name}\` is not solved until it is wired`, list[0].path);
    }
  }

  let mtype = type;
  if (!mtype) {
    const byPair = pair && devices.find((d) => d.name === pair!.out)?.type;
    const types = new Set(devices.map((d) => d.type));
    mtype = byPair ?? (types.size === 1 ? [...types][0] : undefined);
    if (!mtype && devices.length) missing(sink, path, 'type', ' (nmos, pmos, npn or pnp: the devices are of several types and no `pair` says which)');
  }
  const require = m.require === undefined ? {} : readRequire(scope, m.require, [...path, 'require']) ?? {};
  if (sink.errorCount > before || !mtype || !output || (m.input !== undefined && !input)) return undefined;
  const mirror: NetlistMirror = { kind: 'netlist', name, type: mtype, devices, currents, voltages, resistors, output, require, path };
  if (input) mirror.input = input;
  if (startup && startup.length > 0) mirror.startup = startup;
  if (pair) mirror.pair = pair;
  return mirror;
}
