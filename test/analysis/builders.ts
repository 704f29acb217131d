/**
 * Test-only builders of resolved specs: the engine's input is the fully defaulted ResolvedSpec,
 * so tests build it directly instead of going through the parser.
 */
import type {
  DeviceParams, DeviceSize, InputSource, ModelKind, NetlistMirror, Polarity, ResolvedMirror,
  ResolvedSpec, TemplateKind, TemplateMirror,
} from '../../src/core/types';
import { KINDS, referenceRoles } from '../../src/core/kinds/index';

/** Razavi, Design of Analog CMOS ICs, Table 2.1 level-1 0.5 µm set (from memory, references §2 "D"). */
export const RAZAVI_N: DeviceParams = { kp: 134e-6, vt0: 0.7, lambda: 0.1, gamma: 0.45, phi: 0.9, n: 1.3, tcv: 0, bex: -1.5 };
/** Razavi PMOS set (from memory, references §2 "PMOS check"). */
export const RAZAVI_P: DeviceParams = { kp: 38e-6, vt0: 0.8, lambda: 0.2, gamma: 0.4, phi: 0.8, n: 1.3, tcv: 0, bex: -1.5 };

export interface SpecOptions {
  nmos?: Partial<DeviceParams>; pmos?: Partial<DeviceParams>;
  model?: ModelKind; temperature?: number; tnom?: number;
  vdd?: number; vss?: number; margin?: number;
}

export function makeSpec(mirrors: ResolvedMirror[], o: SpecOptions = {}): ResolvedSpec {
  const tnom = o.tnom ?? 300;
  return {
    format: 1,
    process: {
      model: o.model ?? 'square-law', tnom, temperature: o.temperature ?? tnom,
      nmos: { ...RAZAVI_N, ...o.nmos }, pmos: { ...RAZAVI_P, ...o.pmos },
    },
    supplies: { vdd: o.vdd ?? 3.3, vss: o.vss ?? 0 },
    limits: { margin: o.margin ?? 0.1, error: 0.01, sourceHeadroom: 0.2, tolerance: 0.05 },
    params: {},
    mirrors,
    corners: [],
  };
}

export function sz(w: number, l: number, m = 1, bulk: 'rail' | 'source' = 'rail'): DeviceSize {
  return { w, l, m, bulk };
}

export interface TemplateOptions {
  name?: string;
  type?: Polarity;
  input?: number | { resistor: number };
  size?: DeviceSize;
  devices?: Record<string, Partial<DeviceSize>>;
  vout: number;
  vbias?: number;
  /** A bias bank: each output's name, nominal voltage and per-role overrides. */
  outputs?: { name: string; v: number; devices?: Record<string, Partial<DeviceSize>> }[];
}

export function template(kind: TemplateKind, o: TemplateOptions): TemplateMirror {
  const unit = o.size ?? sz(10e-6, 1e-6);
  const sizeOf = (role: string, extra?: Record<string, Partial<DeviceSize>>): DeviceSize =>
    ({ ...unit, ...o.devices?.[role], ...extra?.[role] });
  const outputRoles = KINDS[kind].outputRoles;
  const refRoles = referenceRoles(kind);
  const input: InputSource = typeof o.input === 'object'
    ? { kind: 'resistor', r: o.input.resistor } : { kind: 'current', i: o.input ?? 100e-6 };
  const name = o.name ?? kind;
  const outs = o.outputs
    ? o.outputs.map((x, j) => ({
      name: x.name, output: { v: x.v }, require: {}, path: ['mirrors', 0, 'outputs', j],
      devices: Object.fromEntries(outputRoles.map((r) => [r, sizeOf(r, x.devices)])),
    }))
    : [{ name, output: { v: o.vout }, require: {}, path: ['mirrors', 0],
      devices: Object.fromEntries(outputRoles.map((r) => [r, sizeOf(r)])) }];
  const m: TemplateMirror = {
    kind, name, type: o.type ?? 'nmos', input,
    devices: Object.fromEntries(refRoles.map((r) => [r, sizeOf(r)])),
    outputs: outs, path: ['mirrors', 0],
  };
  if (o.vbias !== undefined) m.vbias = o.vbias;
  return m;
}

export function netlist(m: Omit<NetlistMirror, 'kind' | 'path' | 'require' | 'voltages' | 'resistors'> &
  Partial<Pick<NetlistMirror, 'voltages' | 'resistors'>>): NetlistMirror {
  return { kind: 'netlist', path: ['mirrors', 0], require: {}, voltages: [], resistors: [], ...m };
}

export function ctxOf(spec: ResolvedSpec, outputIndex = 0) {
  return { spec, mirror: spec.mirrors[0]!, outputIndex };
}
