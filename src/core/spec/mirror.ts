/** One template mirror (any kind of src/core/kinds/) → TemplateMirror. */
import { BANK_KINDS, KINDS, REFERENCE_KINDS, VBIAS_KINDS, type TemplateKind } from '../kinds/index';
import type { DesignTarget, DeviceParams, DeviceSize, DeviceType, InputSource, MirrorOutput, OutputSpec,
  Requirements, SpecPath, Supplies, TemplateMirror } from '../types';
import { isBipolarType } from '../device-types';
import { formatSI } from '../text/format';
import { readFilter, readResistorDrift } from './drift';
import { isRecord } from './params';
import { misplaced, missing, readMap, readString } from './read';
import type { Data } from './read';
import { buildBipolarSize, buildSize, readSizeLayer } from './sizes';
import type { SizeContext, SizeLayer } from './sizes';
import { askIf, suggestion } from './suggest';
import { resolveNumber, typeName } from './values';
import type { ValueScope } from './values';

const NETLIST_KEYS = ['currents', 'voltages', 'resistors', 'pair'];
/** Keys of the self-biased reference kinds only. */
const REFERENCE_KEYS = ['resistor', 'k', 'startup'];

function readInput(scope: ValueScope, raw: unknown, path: SpecPath): InputSource | undefined {
  if (raw === undefined) {
    missing(scope.sink, path.slice(0, -1), 'input', ' (an input current, e.g. `10u`, { resistor: R } or { from: mirror.output })');
    return undefined;
  }
  if (isRecord(raw)) {
    if (raw.from !== undefined) {
      const from = readString(scope.sink, raw.from, [...path, 'from']);
      if (raw.resistor !== undefined) misplaced(scope.sink, [...path, 'resistor'], 'an input is either `from` (a link) or `resistor`, not both');
      // Resolved against the other mirrors once all are read (spec/links.ts).
      return from === undefined ? undefined : { kind: 'link', from, mirror: -1, output: -1, i: NaN };
    }
    if (raw.resistor === undefined) {
      missing(scope.sink, path, 'resistor', ' (a resistor to the opposite rail, Ω), or `from` (the output that feeds it)');
      return undefined;
    }
    const r = resolveNumber(scope, raw.resistor, [...path, 'resistor'], 'resistance', { positive: true });
    const drift = readResistorDrift(scope, raw, path);
    return r === undefined ? undefined : { kind: 'resistor', r, ...drift };
  }
  const i = resolveNumber(scope, raw, path, 'current', { positive: true });
  return i === undefined ? undefined : { kind: 'current', i };
}

export function readOutput(scope: ValueScope, raw: unknown, path: SpecPath, supplies?: Supplies): Partial<OutputSpec> | undefined {
  const o = readMap(scope.sink, raw, path, 'a mapping { v, range }');
  if (!o) return undefined;
  const out: Partial<OutputSpec> = {};
  if (o.v !== undefined) {
    const v = resolveNumber(scope, o.v, [...path, 'v'], 'voltage');
    if (v !== undefined) {
      out.v = v;
      if (supplies && (v < supplies.vss || v > supplies.vdd)) {
        scope.sink.warning('outside-supplies', `output \`v\` = ${formatSI(v, 'V')} lies outside the supplies (${formatSI(supplies.vss, 'V')} … ${formatSI(supplies.vdd, 'V')})`, [...path, 'v']);
      }
    }
  }
  if (o.range !== undefined) {
    const rp = [...path, 'range'];
    if (!Array.isArray(o.range) || o.range.length !== 2) {
      scope.sink.error('bad-value', `\`range\` must be a list of two voltages [low, high]; got ${typeName(o.range)}`, rp, undefined, 'items');
    } else {
      const lo = resolveNumber(scope, o.range[0], [...rp, 0], 'voltage');
      const hi = resolveNumber(scope, o.range[1], [...rp, 1], 'voltage');
      if (lo !== undefined && hi !== undefined) {
        if (lo < hi) out.range = [lo, hi];
        else scope.sink.error('bad-value', `\`range\` must be [low, high] with low < high; got [${lo}, ${hi}]`, rp);
      }
    }
  }
  return out;
}

export function readRequire(scope: ValueScope, raw: unknown, path: SpecPath): Requirements | undefined {
  const r = readMap(scope.sink, raw, path, 'a mapping { ratio, rout, compliance, sigma, noise, tc, supplySensitivity }');
  if (!r) return undefined;
  const out: Requirements = {};
  const read = (key: keyof Requirements, q: Parameters<typeof resolveNumber>[3], positive: boolean) => {
    if (r[key] === undefined) return;
    const v = resolveNumber(scope, r[key], [...path, key], q, positive ? { positive: true } : {});
    if (v !== undefined) out[key] = v;
  };
  read('ratio', 'ratio', true);
  read('rout', 'resistance', true);
  read('compliance', 'voltage', false);
  read('sigma', 'ratio', true);
  read('noise', 'noiseDensity', true);
  read('tc', 'plain', true);
  read('supplySensitivity', 'plain', true);
  return out;
}

function readDesign(scope: ValueScope, raw: unknown, path: SpecPath): DesignTarget | undefined {
  const d = readMap(scope.sink, raw, path, 'a mapping with one of vov, gmid, ic');
  if (!d) return undefined;
  const keys = Object.keys(d).filter((k) => ['vov', 'gmid', 'ic'].includes(k));
  if (keys.length !== 1) {
    scope.sink.error('bad-value', '`design` takes exactly one of vov (V), gmid (1/V), ic', path, 'key', 'props');
    return undefined;
  }
  const kind = keys[0] as DesignTarget['kind'];
  const q = kind === 'vov' ? 'voltage' : kind === 'gmid' ? 'inverseVoltage' : 'plain';
  const value = resolveNumber(scope, d[kind], [...path, kind], q, { positive: true });
  return value === undefined ? undefined : { kind, value };
}

/** Per-role override layers of a `devices` mapping; unknown roles are findings. */
function readRoleLayers(scope: ValueScope, raw: unknown, path: SpecPath, kind: TemplateKind, allowed: readonly string[], bank: boolean): Map<string, SizeLayer> {
  const layers = new Map<string, SizeLayer>();
  const d = readMap(scope.sink, raw, path, 'a mapping of roles to sizes');
  if (!d) return layers;
  for (const role of Object.keys(d)) {
    const at = [...path, role];
    if (!allowed.includes(role)) {
      const shared = bank && KINDS[kind].roles.includes(role);
      const word = shared ? undefined : suggestion(role, allowed);
      const msg = shared
        ? `\`${role}\` belongs to the shared reference of the bank; set it in the mirror's \`devices\``
        : `\`${role}\` is not a role of a ${kind} mirror (roles: ${allowed.join(', ')})${askIf(word)}`;
      scope.sink.error('unknown-role', msg, at, 'key', undefined, word);
      continue;
    }
    const layer = readSizeLayer(scope, d[role], at);
    if (layer) layers.set(role, layer);
  }
  return layers;
}

function completeOutput(scope: ValueScope, own: Partial<OutputSpec> | undefined, inherited: Partial<OutputSpec> | undefined, path: SpecPath, ownWritten: boolean, fed: boolean, supplies: Supplies | undefined): OutputSpec | undefined {
  // A linked output's node is solved (network/): until then it sits at the supplies' midpoint.
  const v = fed ? (supplies ? 0.5 * (supplies.vdd + supplies.vss) : 0) : own?.v ?? inherited?.v;
  if (v === undefined) {
    if (ownWritten) missing(scope.sink, [...path, 'output'], 'v', ' (nominal output voltage, V)');
    else missing(scope.sink, path, 'output', ' ({ v: nominal output voltage })');
    return undefined;
  }
  const out: OutputSpec = { v };
  const range = own?.range ?? inherited?.range;
  if (range) out.range = range;
  return out;
}

export interface MirrorHeader { name: string; kind: TemplateKind; type: DeviceType }

/** `fed(j)`: whether output j feeds another mirror's input (a link names it). */
export function readTemplateMirror(scope: ValueScope, m: Data, index: number, head: MirrorHeader, params: DeviceParams | undefined, supplies: Supplies | undefined, fed: (j: number) => boolean = () => false): TemplateMirror | undefined {
  const path: SpecPath = ['mirrors', index];
  const { kind } = head;
  const sink = scope.sink;
  const before = sink.errorCount;
  for (const k of NETLIST_KEYS) if (m[k] !== undefined) misplaced(sink, [...path, k], `\`${k}\` belongs to netlist mirrors (kind: netlist)`);
  const spec = KINDS[kind];
  if (m.vbias !== undefined && !spec.vbias) misplaced(sink, [...path, 'vbias'], `\`vbias\` applies only to ${VBIAS_KINDS.join(', ')} mirrors (the cascode gate voltage)`);
  if (m.outputs !== undefined && !spec.bank) misplaced(sink, [...path, 'outputs'], `\`outputs\` (bias banks) applies to ${BANK_KINDS.join(', ')} mirrors`);

  const bipolar = isBipolarType(head.type);
  if (m.degeneration !== undefined && spec.degeneration === undefined) misplaced(sink, [...path, 'degeneration'], '`degeneration` (an emitter resistor) applies only to widlar mirrors');
  if (spec.degeneration !== undefined && m.degeneration === undefined) missing(sink, path, 'degeneration', ' (the emitter resistor of `out`, Ω)');
  const degeneration = m.degeneration === undefined || spec.degeneration === undefined ? undefined
    : resolveNumber(scope, m.degeneration, [...path, 'degeneration'], 'resistance', { positive: true });
  const loop = spec.loop;
  if (loop) {
    if (m.input !== undefined) misplaced(sink, [...path, 'input'], `a ${kind} sets its own current (its loop and \`resistor\`); it takes no \`input\``);
    if (m.design !== undefined) misplaced(sink, [...path, 'design'], `\`design\` sizes mirrors fed by an input current; a ${kind} sets its own`);
    if (m.k !== undefined && !loop.scaled) misplaced(sink, [...path, 'k'], `\`k\` applies to ${REFERENCE_KINDS.filter((r) => KINDS[r].loop?.scaled).join(' and ')} references (the width or emitter-area ratio of \`wide\` to \`ref\`)`);
  } else {
    for (const k of REFERENCE_KEYS) if (m[k] !== undefined) misplaced(sink, [...path, k], `\`${k}\` applies to the self-biased references (${REFERENCE_KINDS.join(', ')})`);
    if (bipolar && m.design !== undefined) sink.error('bad-value', '`design` targets size MOSFETs; a bipolar mirror is sized by `area` and `m`', [...path, 'design'], 'key');
  }
  const input: InputSource | undefined = loop ? { kind: 'self' } : readInput(scope, m.input, [...path, 'input']);
  const design = m.design === undefined || loop || bipolar ? undefined : readDesign(scope, m.design, [...path, 'design']);
  let resistor: number | undefined, k: number | undefined, startup: DeviceSize | undefined;
  if (loop) {
    if (m.resistor === undefined) missing(sink, path, 'resistor', ' (the loop resistor, Ω)');
    else resistor = resolveNumber(scope, m.resistor, [...path, 'resistor'], 'resistance', { positive: true });
    if (loop.scaled && m.k !== undefined) k = resolveNumber(scope, m.k, [...path, 'k'], 'ratio', { positive: true });
    if (m.startup !== undefined) {
      const sp = [...path, 'startup'];
      const layer = readSizeLayer(scope, m.startup, sp);
      startup = layer ? buildSize({ scope, params, hasDesign: false, sizePath: sp }, [layer]) : undefined;
    }
  }
  const filter = m.filter === undefined ? undefined : readFilter(scope, m.filter, [...path, 'filter']);
  const vbias = m.vbias === undefined || !spec.vbias ? undefined : resolveNumber(scope, m.vbias, [...path, 'vbias'], 'voltage');
  // A bipolar mirror without `size` uses the unit device (area 1).
  if (m.size === undefined && !bipolar) missing(sink, path, 'size', ' (unit device { w, l }, or auto)');
  const unit = m.size === undefined ? (bipolar ? {} : undefined) : readSizeLayer(scope, m.size, [...path, 'size']);
  const roles = spec.roles;
  const outRoles = spec.outputRoles;
  const mirrorLayers = readRoleLayers(scope, m.devices, [...path, 'devices'], kind, roles, false);
  const ctx: SizeContext = { scope, params, hasDesign: design !== undefined, sizePath: [...path, 'size'] };
  // Without a readable unit size the finding is already made; no role can be sized.
  const size = (role: string, extra?: SizeLayer) => (!unit ? undefined
    : bipolar ? buildBipolarSize(ctx, [unit, mirrorLayers.get(role), extra]) : buildSize(ctx, [unit, mirrorLayers.get(role), extra]));

  const devices: Record<string, DeviceSize> = {};
  for (const role of roles) {
    if (outRoles.includes(role)) continue;
    const s = size(role);
    if (s) devices[role] = s;
  }
  // `k:` scales the degenerated device K times: the beta multiplier's W/L, the PTAT cell's
  // emitter area (over ref's).
  const scaled = loop?.scaled;
  const dev = scaled ? devices[scaled] : undefined;
  if (scaled && dev) {
    if (k !== undefined) devices[scaled] = bipolar ? { ...dev, area: (dev.area ?? 1) * k } : { ...dev, w: dev.w * k };
    else if (m.k === undefined && !mirrorLayers.has(scaled)) missing(sink, path, 'k', ` (the ${bipolar ? 'emitter-area' : 'width'} ratio of \`${scaled}\` to \`ref\`, e.g. ${bipolar ? 8 : 4})`);
  }
  const mirrorOutput = m.output === undefined ? undefined : readOutput(scope, m.output, [...path, 'output'], supplies);
  const mirrorRequire = m.require === undefined ? {} : readRequire(scope, m.require, [...path, 'require']) ?? {};

  const outputs: MirrorOutput[] = [];
  if (m.outputs !== undefined && spec.bank) {
    const op = [...path, 'outputs'];
    if (!Array.isArray(m.outputs) || m.outputs.length === 0) {
      sink.error(Array.isArray(m.outputs) ? 'bad-value' : 'wrong-type', '`outputs` must be a non-empty list of { name, devices, output, require }', op, 'key', 'type');
    } else {
      const names = new Map<string, number>();
      m.outputs.forEach((item: unknown, j: number) => {
        const ip = [...op, j];
        const o = readMap(sink, item, ip, 'a mapping { name, devices, output, require }');
        if (!o) return;
        const name = o.name === undefined ? undefined : readString(sink, o.name, [...ip, 'name']);
        if (o.name === undefined) missing(sink, ip, 'name', ' (output name)');
        if (name !== undefined) {
          if (names.has(name)) sink.error('duplicate-name', `output \`${name}\` is named twice in bank \`${head.name}\` (also output ${names.get(name)! + 1})`, [...ip, 'name']);
          else names.set(name, j);
        }
        const layers = readRoleLayers(scope, o.devices, [...ip, 'devices'], kind, outRoles, true);
        const own = o.output === undefined ? undefined : readOutput(scope, o.output, [...ip, 'output'], supplies);
        const output = completeOutput(scope, own, mirrorOutput, ip, o.output !== undefined, fed(j), supplies);
        const req = o.require === undefined ? {} : readRequire(scope, o.require, [...ip, 'require']) ?? {};
        const devs: Record<string, DeviceSize> = {};
        for (const role of outRoles) {
          const s = size(role, layers.get(role));
          if (s) devs[role] = s;
        }
        if (name !== undefined && output) outputs.push({ name, devices: devs, output, require: { ...mirrorRequire, ...req }, path: ip });
      });
    }
  } else {
    const output = completeOutput(scope, mirrorOutput, undefined, path, m.output !== undefined, fed(0), supplies);
    const devs: Record<string, DeviceSize> = {};
    for (const role of outRoles) {
      const s = size(role);
      if (s) devs[role] = s;
    }
    if (output) outputs.push({ name: head.name, devices: devs, output, require: mirrorRequire, path });
  }
  if (design && ![...Object.values(devices), ...outputs.flatMap((o) => Object.values(o.devices))].some((d) => d.auto)) {
    sink.warning('unused-design', '`design` is set but no size is `auto`; it has no effect', [...path, 'design'], 'key');
  }
  if (sink.errorCount > before || !input) return undefined;
  const mirror: TemplateMirror = { kind, name: head.name, type: head.type, input, devices, outputs, path };
  if (resistor !== undefined) mirror.resistor = resistor;
  if (startup) mirror.startup = startup;
  if (vbias !== undefined) mirror.vbias = vbias;
  if (degeneration !== undefined) mirror.degeneration = degeneration;
  if (design) mirror.design = design;
  if (filter) mirror.filter = filter;
  return mirror;
}
