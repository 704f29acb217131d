/**
 * output-beyond-reach: a template mirror whose output device stands on a diode of the reference
 * (the Wilsons: `out`'s source is the diode node y, so the output current is what biases the
 * reference) has no operating point when the output voltage lies on the rail side of that node:
 * `out` cannot pass current forwards, the diode starves, and nothing holds the input node. Hand
 * analysis at the input current, with the solver's own devices and model (VGS at a current,
 * VDSsat, body effect of `out` through its source voltage), says where the output must be.
 */
import type { MirrorCircuit } from '../../circuit/mirrorCircuit';
import type { MosElement } from '../../circuit/elements/element';
import { buildMirror } from '../../analysis/solve';
import { gateDriveFor } from '../../models/evaluate';
import { KINDS } from '../../kinds/index';
import { isBipolarType, sinksCurrent } from '../../device-types';
import type { TemplateMirror } from '../../types';
import type { Draft, RuleContext } from '../model';
import { draftKey } from '../model';
import { mirrorRange, valueRange, type Site } from '../sites';
import { code, formatSI } from '../../text/format';

/** Hand analysis of the output stack, in absolute volts. */
interface OutputReach {
  /** Output device, the reference diode its source stands on, and the output device's gate node. */
  out: string; diode: string; gateNode: string;
  /** A, the output current the stack must pass (input current × ideal ratio). */
  iout: number;
  /** V, the diode node: the output conducts only beyond it. */
  floor: number;
  /** V, where `out` saturates: the floor plus its VDSsat. */
  saturation: number;
  /** V, the gate of `out` with `out` saturated: the input stack's top. */
  gate: number;
  /** V, the lowest floor any sizing gives (a model without weak inversion: VGS at no current). */
  least?: number;
}

/** The output role of `kind` that stands on a diode-connected reference device, and that device. */
function stackOnDiode(m: TemplateMirror): { out: string; diode: string; gate: string } | undefined {
  const k = KINDS[m.kind];
  for (const [out, c] of Object.entries(k.output)) {
    if (c.d !== 'O') continue;
    const diode = Object.entries(k.reference).find(([, r]) => r.d === c.s && r.g === c.s && r.s === 'R');
    if (diode) return { out, diode: diode[0], gate: c.g };
  }
  return undefined;
}

/** Gate drive of a saturated MOSFET carrying `i` with its source `vsb` above the mirror's rail. */
function drive(x: MosElement, i: number, vsb: number): number {
  return gateDriveFor(x.dev, i, x.size.bulk === 'rail' ? vsb : 0);
}

/** Where the output of a stack-on-diode kind must be, or undefined for other kinds and inputs. */
function outputReach(rc: RuleContext, site: Site): OutputReach | undefined {
  const m = site.mirror;
  // A bipolar Wilson has an operating point there (its junctions conduct backwards); a resistor
  // input sets no current to analyse at.
  if (m.kind === 'netlist' || isBipolarType(m.type) || (m.input.kind !== 'current' && m.input.kind !== 'link')) return undefined;
  const roles = stackOnDiode(m);
  const ratio = site.report.ratioIdeal;
  if (!roles || ratio === undefined || !(ratio > 0) || !(m.input.i > 0)) return undefined;
  // The devices as the solver builds them (flavour, temperature, table, bulk tie).
  const mc: MirrorCircuit = buildMirror({ spec: rc.spec, mirror: m, outputIndex: site.outputIndex }, site.vout, undefined);
  const dev = (role: string): MosElement | undefined => {
    const k = mc.byRole[role];
    const x = k === undefined ? undefined : mc.circuit.devices[k];
    return x?.kind === 'mos' ? x : undefined;
  };
  const out = dev(roles.out), diode = dev(roles.diode);
  if (!out || !diode || mc.circuit.problems.length > 0) return undefined;
  const iout = m.input.i * ratio;
  // Polarity frame: u measured from the mirror's rail towards the other.
  const uFloor = drive(diode, iout, 0);
  const uGate = uFloor + drive(out, iout, uFloor);
  const vdsat = out.dev.model.saturationVoltage(out.dev, iout);
  const at = (u: number): number => mc.rail + mc.sign * u;
  const r: OutputReach = {
    out: out.name, diode: diode.name, gateNode: roles.gate, iout,
    floor: at(uFloor), saturation: at(uFloor + vdsat), gate: at(uGate),
  };
  if (!diode.dev.model.coversWeakInversion) r.least = at(drive(diode, 0, 0));
  return [r.floor, r.saturation, r.gate].every(Number.isFinite) ? r : undefined;
}

/**
 * The finding when the output lies on the rail side of the floor, or — the solve having run a
 * node past a rail — short of where `out` saturates while the saturated stack itself would fit
 * the supply (in triode `out` needs more gate drive than the supply gives). Undefined otherwise.
 */
export function checkReach(rc: RuleContext, site: Site): Draft | undefined {
  const r = outputReach(rc, site);
  if (!r) return undefined;
  const { vdd, vss } = rc.spec.supplies;
  const sinks = sinksCurrent(site.mirror.type);
  const past = (v: number, edge: number): boolean => (sinks ? v < edge : v > edge);
  const below = past(site.vout, r.floor);
  const fits = !past(sinks ? vdd : vss, r.gate);
  const triode = !below && site.report.beyondRails !== undefined && fits && past(site.vout, r.saturation);
  if (!below && !triode) return undefined;
  const path = [...site.path, 'output', 'v'];
  const at = rc.parsed.source.value(path) ? valueRange(rc.parsed, path) : mirrorRange(rc.parsed, site.mirrorIndex);
  const [side, far, edge, rail] = sinks ? ['below', 'above', 'at least', 'vdd'] : ['above', 'below', 'at most', 'vss'];
  const v = (x: number): string => formatSI(x, 'V');
  const i = formatSI(r.iout, 'A');
  const out = code(r.out);
  const ran = site.report.beyondRails;
  const cause = below
    ? `the output at ${v(site.vout)} is ${side} ${v(r.floor)}, where ${out}'s source sits (${code(r.diode)}'s VGS at ${i}), ` +
      `so ${out} cannot pass the output current forwards and the reference gets none`
    : `the output at ${v(site.vout)} is ${formatSI(Math.abs(site.vout - r.saturation), 'V')} past ${v(r.saturation)}, where ${out} leaves saturation: ` +
      `in triode ${out} needs more gate drive to pass ${i} than the supply gives` +
      (ran ? ` (the solve ran node ${code(ran.node)} to ${v(ran.v)}, beyond ${ran.rail})` : '');
  const outside = past(sinks ? vdd : vss, r.saturation) ? ` (beyond ${rail})` : '';
  const reach = `The output must be ${far} ${v(r.floor)} for the stack to conduct and ${edge} ${v(r.saturation)}${outside} for ${out} to saturate ` +
    `(VGS of ${code(r.diode)} + VDSsat of ${out} at ${i})`;
  const stack = fits ? '' : `; even then ${out}'s gate (node ${code(r.gateNode)}) would sit at ${v(r.gate)}, beyond ${rail}: ` +
    `the stack ${code(r.diode)} + ${out} needs ${v(Math.abs(r.gate - (sinks ? vss : vdd)))} of the ${v(vdd - vss)} supply`;
  const change = r.least !== undefined && past(site.vout, r.least)
    ? `no sizing reaches ${v(site.vout)}: at any width the stack conducts only ${far} ${v(r.least)} (${code(r.diode)}'s VGS at no current); move the output (the load sets it) or use`
    : `move the output (the load sets it), lower the VGS (wider or shorter devices, or less current), or use`;
  const message = `no operating point: ${cause}. ${reach}${stack}; ${change} a kind that reaches nearer the rail (a wide-swing cascode needs two VDSsat, a simple mirror one)`;
  return {
    key: draftKey('output-beyond-reach', site.path),
    mirrorIndex: site.mirrorIndex,
    finding: { severity: 'error', code: 'output-beyond-reach', path: at.path, range: at.range, message },
  };
}
