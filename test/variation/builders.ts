/**
 * Test-only builders of resolved specs for the variation and sizing tests. The core's input is
 * the fully defaulted ResolvedSpec, so these tests build it directly.
 */
import type {
  CornerSpec, DesignTarget, DeviceParams, DeviceSize, ModelKind, NetlistMirror, Polarity, Requirements,
  ResolvedMirror, ResolvedSpec, TemplateKind, TemplateMirror,
} from '../../src/core/types';
import { KINDS, referenceRoles } from '../../src/core/kinds/index';

/** Razavi, Design of Analog CMOS ICs, Table 2.1 level-1 0.5 µm set (from memory, references §2
 *  "D"), with Pelgrom coefficients of the order references §7 gives (AVT 5 mV·µm, Aβ 1 %·µm). */
export const NMOS_D: DeviceParams = {
  kp: 134e-6, vt0: 0.7, lambda: 0.1, gamma: 0.45, phi: 0.9, n: 1.3, tcv: -1e-3, bex: -1.5,
  avt: 5e-9, abeta: 1e-8,
};
/** Razavi PMOS set (from memory, references §2 "PMOS check"). */
export const PMOS_D: DeviceParams = {
  kp: 38e-6, vt0: 0.8, lambda: 0.2, gamma: 0.4, phi: 0.8, n: 1.3, tcv: -1e-3, bex: -1.5,
  avt: 5e-9, abeta: 1e-8,
};

export interface SpecOptions {
  nmos?: Partial<DeviceParams>; pmos?: Partial<DeviceParams>;
  model?: ModelKind; temperature?: number; tnom?: number; grid?: number;
  vdd?: number; vss?: number; corners?: CornerSpec[];
}

export function makeSpec(mirrors: ResolvedMirror[], o: SpecOptions = {}): ResolvedSpec {
  const tnom = o.tnom ?? 300.15;
  return {
    format: 1,
    process: {
      model: o.model ?? 'square-law', tnom, temperature: o.temperature ?? tnom,
      ...(o.grid !== undefined ? { grid: o.grid } : {}),
      nmos: { ...NMOS_D, ...o.nmos }, pmos: { ...PMOS_D, ...o.pmos },
    },
    supplies: { vdd: o.vdd ?? 3.3, vss: o.vss ?? 0 },
    limits: { margin: 0.1, error: 0.01, sourceHeadroom: 0.2, tolerance: 0.05 },
    params: {},
    mirrors: mirrors.map((m, i) => reindex(m, i)),
    corners: o.corners ?? [],
  };
}

function reindex(m: ResolvedMirror, i: number): ResolvedMirror {
  const path = ['mirrors', i];
  if (m.kind === 'netlist') return { ...m, path };
  return {
    ...m, path,
    outputs: m.outputs.map((o) => ({ ...o, path: [...path, ...o.path.slice(2)] })),
  };
}

export function sz(w: number, l: number, m = 1, bulk: 'rail' | 'source' = 'rail', auto?: DeviceSize['auto']): DeviceSize {
  return auto ? { w, l, m, bulk, auto } : { w, l, m, bulk };
}

export interface MirrorOptions {
  name?: string;
  type?: Polarity;
  input?: number | { resistor: number };
  size?: DeviceSize;
  devices?: Record<string, Partial<DeviceSize>>;
  vout: number;
  vbias?: number;
  require?: Requirements;
  design?: DesignTarget;
  outputs?: { name: string; v: number; devices?: Record<string, Partial<DeviceSize>>; require?: Requirements }[];
}

export function mirror(kind: TemplateKind, o: MirrorOptions): TemplateMirror {
  const unit = o.size ?? sz(10e-6, 1e-6);
  const sizeOf = (role: string, extra?: Record<string, Partial<DeviceSize>>): DeviceSize =>
    ({ ...unit, ...o.devices?.[role], ...extra?.[role] });
  const outputRoles = KINDS[kind].outputRoles;
  const refRoles = referenceRoles(kind);
  const name = o.name ?? kind;
  const outputs = o.outputs
    ? o.outputs.map((x, j) => ({
      name: x.name, output: { v: x.v }, require: x.require ?? {}, path: ['mirrors', 0, 'outputs', j],
      devices: Object.fromEntries(outputRoles.map((r) => [r, sizeOf(r, x.devices)])),
    }))
    : [{ name, output: { v: o.vout }, require: o.require ?? {}, path: ['mirrors', 0],
      devices: Object.fromEntries(outputRoles.map((r) => [r, sizeOf(r)])) }];
  const m: TemplateMirror = {
    kind, name, type: o.type ?? 'nmos',
    input: typeof o.input === 'object' ? { kind: 'resistor', r: o.input.resistor } : { kind: 'current', i: o.input ?? 20e-6 },
    devices: Object.fromEntries(refRoles.map((r) => [r, sizeOf(r)])),
    outputs, path: ['mirrors', 0],
  };
  if (o.vbias !== undefined) m.vbias = o.vbias;
  if (o.design) m.design = o.design;
  return m;
}

/** One mirror of every template kind, NMOS or PMOS, sized to sit comfortably in saturation. */
export function everyKind(type: Polarity): TemplateMirror[] {
  const vdd = 3.3;
  const v = (u: number): number => (type === 'nmos' ? u : vdd - u);
  const size = type === 'nmos' ? sz(20e-6, 2e-6) : sz(40e-6, 2e-6);
  return [
    mirror('simple', { name: 's', type, size, vout: v(1.2) }),
    mirror('cascode', { name: 'c', type, size, vout: v(2.2) }),
    mirror('wide-swing', { name: 'w', type, size, vout: v(1.4) }),
    mirror('wilson', { name: 'x', type, size, vout: v(2.4) }),
    mirror('wilson-balanced', { name: 'b', type, size, vout: v(2.4) }),
  ];
}

/** One NMOS with its gate held at `vgs` and its drain at `vds` (both from vss): iout is its ID.
 *  The input source (vdd → vss) only gives the netlist the input it must name. */
export function heldDevice(vgs: number, vds: number, w = 10e-6, l = 1e-6): NetlistMirror {
  return {
    kind: 'netlist', name: 'held', type: 'nmos', path: ['mirrors', 0], require: {},
    devices: [{ name: 'M1', type: 'nmos', d: 'dr', g: 'gate', s: 'vss', b: 'vss', w, l, m: 1 }],
    currents: [{ name: 'I1', from: 'vdd', to: 'vss', i: 1e-6 }],
    voltages: [{ name: 'VG', node: 'gate', v: vgs }],
    resistors: [],
    output: { node: 'dr', v: vds },
    input: { source: 'I1' },
  };
}

/** A simple NMOS mirror written as a netlist (M1 diode, M2 output at twice the width). */
export function netlistMirror(vout = 1.2): NetlistMirror {
  return {
    kind: 'netlist', name: 'net', type: 'nmos', path: ['mirrors', 0], require: {},
    devices: [
      { name: 'M1', type: 'nmos', d: 'nin', g: 'nin', s: 'vss', b: 'vss', w: 20e-6, l: 2e-6, m: 1 },
      { name: 'M2', type: 'nmos', d: 'nout', g: 'nin', s: 'vss', b: 'vss', w: 40e-6, l: 2e-6, m: 1 },
    ],
    currents: [{ name: 'IREF', from: 'vdd', to: 'nin', i: 20e-6 }],
    voltages: [], resistors: [],
    output: { node: 'nout', v: vout },
    input: { source: 'IREF' },
    pair: { ref: 'M1', out: 'M2' },
  };
}
