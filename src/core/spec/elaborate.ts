/**
 * The one pass that turns checked data into a ResolvedSpec with every default filled
 * (src/core/defaults.ts). Each part is read defensively: whatever the schema let through, a bad
 * value becomes a finding at that value, never an exception.
 */
import type { DeviceParams, DeviceType, ProcessSpec, ResolvedMirror, ResolvedSpec, TemplateMirror } from '../types';
import { DEFAULTS } from '../defaults';
import { DEVICE_TYPES, isBipolarDevice, isBipolarType } from '../device-types';
import { familyOf, KINDS } from '../kinds/index';
import { readAnalysis } from './drift';
import { MIRROR_KINDS, type MirrorKind } from '../kinds/names';
import { readCorners } from './corners';
import type { FindingSink } from './findings';
import { readTemplateMirror } from './mirror';
import { checkLinks, fedOutputs, relinkEdited, sameLinkShape } from './links';
import { readFlavour } from './flavour';
import { readNetlistMirror } from './netlist';
import { isRecord, resolveParams } from './params';
import { readLimits, readProcess, readSupplies } from './process';
import { missing, readEnum, readMap, readString } from './read';
import { typeName, type ValueScope } from './values';
import type { TableTexts } from './tables';

/**
 * Mirrors already elaborated from the same items: a re-check after a fix to mirror `except` reads
 * only that mirror again. `items[i]` must be the very object `mirrors[i]` was elaborated from.
 */
export interface ElaborateReuse {
  items: readonly unknown[];
  mirrors: readonly ResolvedMirror[];
  except: number;
  /**
   * `mirrors` are an error-free spec's own (links resolved, fed outputs marked) and the caller
   * counts only the errors it is told (a fix's re-check): when item `except` names, types and
   * links as before and every other item is the very one, only that mirror's links are taken
   * again (spec/links.ts `relinkEdited`), not every link of the file checked again.
   */
  relink?: boolean;
}

/** The mirror at `except` as `reuse` had it, when the re-read item links exactly as before and
 *  every other item is the very one (`ElaborateReuse.relink`). */
function relinkable(reuse: ElaborateReuse | undefined, list: readonly unknown[] | undefined): ResolvedMirror | undefined {
  if (!reuse?.relink || !list || list.length !== reuse.items.length || list.length !== reuse.mirrors.length) return undefined;
  const i = reuse.except;
  const before = reuse.mirrors[i];
  if (!before || before.path[1] !== i || !sameLinkShape(list[i], reuse.items[i])) return undefined;
  for (let k = 0; k < list.length; k++) if (k !== i && (list[k] !== reuse.items[k] || reuse.mirrors[k]!.path[1] !== k)) return undefined;
  return before;
}

/** Device types a bipolar reference takes beyond its own: the closing mirror's other polarity
 *  (PNP on an NPN cell) and its MOSFET start-up device (nmos for npn). A MOSFET reference's other
 *  polarity keeps borrowing the written one as before. */
const NONE: readonly DeviceType[] = [];

function borrowedTypes(m: TemplateMirror): readonly DeviceType[] {
  const loop = KINDS[m.kind].loop;
  if (!loop || !isBipolarType(m.type)) return NONE;
  const out: DeviceType[] = [];
  if (Object.values(KINDS[m.kind].reference).some((c) => c.other)) out.push(m.type === 'npn' ? 'pnp' : 'npn');
  if (m.startup) out.push(m.type === 'npn' ? 'nmos' : 'pmos');
  return out;
}

/** What elaboration reads outside the mirrors before them: the title, params, process, supplies, limits. */
interface RootRead {
  title: string | undefined;
  scope: ValueScope;
  proc: ReturnType<typeof readProcess>;
  supplies: ReturnType<typeof readSupplies>;
  limits: ReturnType<typeof readLimits>;
}

/**
 * Root reads kept by the mirror list they were read beside (`data.mirrors`, which a re-check after
 * a fix names as `reuse.items`), with the root's values they were read from and the table texts.
 * Only a read that said nothing and asked nothing of its sink is kept: reading the same values
 * again would then add nothing to any sink, so skipping it is exact.
 */
const roots = new WeakMap<readonly unknown[], { data: Record<string, unknown>; tables: TableTexts | undefined; read: RootRead }>();

/** The root's values other than `mirrors` are the same (the very objects) in both. */
function sameRoot(a: Record<string, unknown>, b: Record<string, unknown>): boolean {
  const keys = Object.keys(a).filter((k) => k !== 'mirrors');
  if (keys.length !== Object.keys(b).filter((k) => k !== 'mirrors').length) return false;
  return keys.every((k) => Object.hasOwn(b, k) && Object.is(a[k], b[k]));
}

/** The root read for `data`: a re-check's is the original's (with its own sink) when its root is the original's. */
function readRoot(data: Record<string, unknown>, sink: FindingSink, reuse: ElaborateReuse | undefined, tables: TableTexts | undefined): RootRead {
  const kept = reuse ? roots.get(reuse.items) : undefined;
  if (kept && kept.tables === tables && sameRoot(kept.data, data)) return { ...kept.read, scope: { ...kept.read.scope, sink } };
  const before = sink.touches;
  const title = data.title === undefined ? undefined : readString(sink, data.title, ['title']);
  const scope: ValueScope = { ...resolveParams(data.params, sink), ...(tables ? { tables } : {}) };
  const proc = readProcess(scope, data.process);
  const supplies = readSupplies(scope, data.supplies);
  const limits = readLimits(scope, data.limits);
  const read = { title, scope, proc, supplies, limits };
  // The first read beside a list is the file's own (a process fix's re-read puts the same list beside another root).
  if (!reuse && Array.isArray(data.mirrors) && sink.touches === before && !roots.has(data.mirrors)) roots.set(data.mirrors, { data, tables, read });
  return read;
}

/** Elaborate; undefined when the spec cannot be analysed. Findings go to sink. */
export function elaborate(data: unknown, sink: FindingSink, reuse?: ElaborateReuse, tables?: TableTexts): ResolvedSpec | undefined {
  if (!isRecord(data)) {
    sink.error('wrong-type', `a bias spec is a mapping (\`format: 1\`, \`process\`, \`supplies\`, \`mirrors\`); got ${typeName(data)}`, [], undefined, 'type');
    return undefined;
  }
  let formatOk = true;
  if (data.format === undefined) {
    missing(sink, [], 'format', ' (write `format: 1` first)');
  } else if (data.format !== 1) {
    sink.error('bad-value', `this qpoint reads \`format: 1\`; got ${typeName(data.format)}`, ['format'], undefined, 'enum');
    formatOk = false;
  }
  const { title, scope, proc, supplies, limits } = readRoot(data, sink, reuse, tables);

  const mirrors: ResolvedMirror[] = [];
  const used = new Map<DeviceType, string>();  // device type → first mirror using it
  const useType = (t: DeviceType, name: string): void => { if (!used.has(t)) used.set(t, name); };
  if (data.mirrors === undefined) missing(sink, [], 'mirrors', ' (the list of current mirrors)');
  const list = data.mirrors === undefined ? [] : Array.isArray(data.mirrors) ? data.mirrors : undefined;
  if (!list) sink.error('wrong-type', `\`mirrors\` must be a list; got ${typeName(data.mirrors)}`, ['mirrors'], undefined, 'type');
  const names = new Map<string, number>();
  const before = relinkable(reuse, list);
  // Which outputs some link feeds (their `output.v` is optional), found when a mirror is read.
  let fed: Set<string> | undefined;
  const isFed = (i: number, j: number): boolean => (before && i === reuse!.except ? before.kind !== 'netlist' && before.outputs[j]?.feeds !== undefined
    : (fed ??= fedOutputs(data)).has(`${i}:${j}`));
  (list ?? []).forEach((item: unknown, i: number) => {
    const path = ['mirrors', i];
    const known = reuse && i !== reuse.except && reuse.items[i] === item ? reuse.mirrors[i] : undefined;
    if (known) {
      const first = names.get(known.name);
      if (first !== undefined) sink.error('duplicate-name', `mirror name \`${known.name}\` is already used by mirror ${first + 1}; names must be unique`, [...path, 'name']);
      else names.set(known.name, i);
      if (known.kind === 'netlist') for (const d of known.devices) useType(d.type, known.name);
      else {
        if (!known.device) useType(known.type, known.name);
        for (const t of borrowedTypes(known)) useType(t, known.name);
      }
      mirrors.push(known);
      return;
    }
    const m = readMap(sink, item, path, 'a mapping { name, kind, type, … }');
    if (!m) return;
    if (m.name === undefined) missing(sink, path, 'name', ' (mirror name)');
    if (m.kind === undefined) missing(sink, path, 'kind', ` (one of ${MIRROR_KINDS.join(', ')})`);
    const name = m.name === undefined ? undefined : readString(sink, m.name, [...path, 'name']);
    const kind = m.kind === undefined ? undefined : readEnum<MirrorKind>(sink, m.kind, [...path, 'kind'], MIRROR_KINDS);
    if (m.type === undefined && kind !== 'netlist') missing(sink, path, 'type', ' (nmos, pmos, npn or pnp)');
    const type = m.type === undefined ? undefined : readEnum<DeviceType>(sink, m.type, [...path, 'type'], DEVICE_TYPES);
    if (name !== undefined) {
      const first = names.get(name);
      if (first !== undefined) sink.error('duplicate-name', `mirror name \`${name}\` is already used by mirror ${first + 1}; names must be unique`, [...path, 'name']);
      else names.set(name, i);
    }
    if (!name || !kind) return;
    if (kind === 'netlist') {
      const nm = readNetlistMirror(scope, m, i, name, type, supplies, proc);
      if (nm) {
        for (const d of nm.devices) if ((isBipolarDevice(d) || d.device === undefined) && !used.has(d.type)) used.set(d.type, name);
        mirrors.push(nm);
      }
      return;
    }
    if (!type) return;
    const families = KINDS[kind].families;
    if (!families.includes(familyOf(type))) {
      const types = families.flatMap((f) => (f === 'bipolar' ? ['npn', 'pnp'] : ['nmos', 'pmos']));
      sink.error('bad-value', `a ${kind} mirror is built from ${families.join(' or ')} devices: \`type\` is one of ${types.join(', ')}; got ${type}`, [...path, 'type']);
      return;
    }
    const flavour = readFlavour(sink, m.device, [...path, 'device'], proc, type, 'mirror');
    if (flavour === null) return;
    if (!flavour && !used.has(type)) used.set(type, name);
    const params = flavour ? proc?.devices?.[flavour]?.params : type === 'nmos' || type === 'pmos' ? proc?.[type] : undefined;
    const tm = readTemplateMirror(scope, m, i, { name, kind, type }, params, supplies, (j) => isFed(i, j));
    if (tm && flavour) tm.device = flavour;
    if (tm) for (const t of borrowedTypes(tm)) if (!used.has(t)) used.set(t, name);
    if (tm) mirrors.push(tm);
  });

  const linked = (before && relinkEdited(data, mirrors, reuse!.except, before, sink)) || checkLinks(data, mirrors, sink);

  // Each polarity a mirror uses must have parameters; an unused one borrows the other's so the
  // resolved process is complete (nothing reads it).
  let process: ProcessSpec | undefined;
  if (proc) {
    for (const [type, mirror] of used) {
      if (!proc.written.has(type)) missing(sink, ['process'], type, ` (mirror \`${mirror}\` uses ${type} devices)`);
    }
    // A spec of bipolar devices only needs no MOSFET parameters: a placeholder nothing reads.
    const bipolarOnly = !proc.written.has('nmos') && !proc.written.has('pmos') && proc.flavourNames.size === 0
      && (proc.written.has('npn') || proc.written.has('pnp')) && ![...used.keys()].some((t) => !isBipolarType(t));
    const anyFlavour = proc.devices ? Object.values(proc.devices)[0]?.params : undefined;
    const placeholder: DeviceParams | undefined = anyFlavour ?? (bipolarOnly ? { kp: 1e-4, vt0: 0.5, ...DEFAULTS.device } : undefined);
    const nmos: DeviceParams | undefined = proc.nmos ?? (used.has('nmos') ? undefined : proc.pmos ?? placeholder);
    const pmos: DeviceParams | undefined = proc.pmos ?? (used.has('pmos') ? undefined : proc.nmos ?? placeholder);
    if (!proc.written.has('nmos') && !proc.written.has('pmos') && proc.flavourNames.size === 0 && !bipolarOnly) missing(sink, ['process'], 'nmos', ' (device parameters: kp, vt0, …)');
    const bipolarReady = (['npn', 'pnp'] as const).every((t) => !used.has(t) || proc[t] !== undefined);
    if (nmos && pmos && proc.ok && bipolarReady) {
      process = { model: proc.model, tnom: proc.tnom, temperature: proc.temperature, nmos, pmos };
      if (proc.devices) process.devices = proc.devices;
      if (proc.grid !== undefined) process.grid = proc.grid;
      if (proc.trange !== undefined) process.trange = proc.trange;
      if (proc.npn) process.npn = proc.npn;
      if (proc.pnp) process.pnp = proc.pnp;
    }
  }
  const corners = data.corners === undefined ? [] : readCorners(scope, data.corners, process, supplies);
  const analysis = readAnalysis(scope, data.analysis);
  if (!formatOk || !process || !supplies || !limits) return undefined;
  const spec: ResolvedSpec = { format: 1, process, supplies, limits, params: Object.fromEntries(scope.params), mirrors: linked, corners, analysis };
  if (title !== undefined) spec.title = title;
  return spec;
}
