/**
 * A `netlist` mirror elaborated into a circuit. Rails: `vdd`, and `vss` = `0` = `gnd`. Every
 * device counts for compliance. Initial guess: a diode-connected device with its source on
 * its own rail starts at the gate drive for the input current; every other node at mid-supply.
 */
import { gateDriveFor } from '../models/evaluate';
import { paramsOf } from '../flavours';
import { deviceProblem, prepareDevice } from '../models/device';
import { bipolarProblem, prepareBipolar, vbeFor } from '../models/bipolar';
import { isBipolarDevice, polaritySign } from '../device-types';
import type { NetlistMirror, ResolvedSpec } from '../types';
import { CircuitBuilder, type BjtDescription, type MosDescription } from './circuit';
import { resistanceOf, resistorLaw } from './resistance';
import { makeWorkspace, type MirrorCircuit } from './mirrorCircuit';
import type { PerturbationLike } from './templates';

function railName(node: string): string {
  const n = node.trim();
  const lower = n.toLowerCase();
  if (lower === 'vss' || lower === 'gnd' || n === '0') return 'vss';
  if (lower === 'vdd') return 'vdd';
  return n;
}

export function buildNetlist(spec: ResolvedSpec, m: NetlistMirror, vout: number, perturb?: PerturbationLike): MirrorCircuit {
  const { vdd, vss } = spec.supplies;
  const sign = polaritySign(m.type);
  const proc = { model: spec.process.model, temperature: spec.process.temperature, tnom: spec.process.tnom };
  const b = new CircuitBuilder();
  b.hold('vdd', vdd);
  b.hold('vss', vss);
  for (const src of m.voltages) {
    const node = railName(src.node);
    if (node === 'vdd' || node === 'vss') { b.problems.push(`voltage source ${src.name} drives the rail ${node}`); continue; }
    b.hold(node, src.v);
  }
  const out = railName(m.output.node);
  if (out === 'vdd' || out === 'vss') b.problems.push(`output node ${m.output.node} is a supply rail`);
  else b.hold(out, vout);

  const startup = new Set((m.startup ?? []).map((d) => d.name));
  for (const d of [...m.devices, ...(m.startup ?? [])]) {
    // A start-up device is judged by the start-up check, not counted for compliance.
    const role = startup.has(d.name) ? 'startup' : d.name;
    if (isBipolarDevice(d)) {
      const params = spec.process[d.type];
      if (!params) { b.problems.push(`device ${d.name}: no ${d.type} parameters`); continue; }
      const size = { w: 0, l: 0, m: d.m, bulk: 'rail' as const, area: d.area };
      const problem = bipolarProblem(params, { area: d.area, m: d.m });
      if (problem) b.problems.push(`device ${d.name}: ${problem}`);
      const dev = prepareBipolar(params, { area: d.area, m: d.m }, d.type, proc.temperature, proc.tnom, perturb?.dvt[d.name] ?? 0, perturb?.dbeta[d.name] ?? 0);
      const q: BjtDescription = { name: d.name, role, type: d.type, size, params, dev, measured: !startup.has(d.name) };
      if (startup.has(d.name)) q.startup = true;
      b.bjt(q, railName(d.c), railName(d.b), railName(d.e));
      continue;
    }
    const params = paramsOf(spec.process, d.type, d.device);
    const size = { w: d.w, l: d.l, m: d.m, bulk: 'rail' as const };
    const problem = deviceProblem(params, size);
    if (problem) b.problems.push(`device ${d.name}: ${problem}`);
    const dev = prepareDevice(params, size, d.type, proc, perturb?.dvt[d.name] ?? 0, perturb?.dbeta[d.name] ?? 0);
    const desc: MosDescription = { name: d.name, role, type: d.type, size, params, dev, measured: !startup.has(d.name) };
    if (startup.has(d.name)) desc.startup = true;
    b.mos(desc, railName(d.d), railName(d.g), railName(d.s), railName(d.b));
  }
  for (const s of m.currents) {
    if (!Number.isFinite(s.i)) b.problems.push(`current source ${s.name}: ${s.i} A is not a number`);
    b.current(s.name, railName(s.from), railName(s.to), s.i);
  }
  for (const r of m.resistors) {
    const law = resistorLaw(r.r, r, spec.process);
    b.resistor(r.name, railName(r.a), railName(r.b), resistanceOf(law, spec.process.temperature), law);
  }
  const input = m.input;
  const inputIndex = input ? m.currents.findIndex((s) => s.name === input.source) : -1;
  if (input && inputIndex < 0) b.problems.push(`input source ${input.source} is not a current source of this netlist`);

  const c = b.build(out === 'vdd' || out === 'vss' ? `${out}` : out, sign, vss, vdd);
  const ws = makeWorkspace(c);
  // A self-biased netlist has no input: its diodes start a fifth of the way from VT to the
  // supply, on (the loop's zero-current state is tested apart, analysis/zero-state.ts).
  const iin = inputIndex >= 0 ? m.currents[inputIndex]!.i : NaN;
  const railIndex = { vdd: c.nodeNames.indexOf('vdd'), vss: c.nodeNames.indexOf('vss') };

  const guess = (): void => {
    for (let k = 0; k < c.nFree; k++) ws.v[k] = c.vmid;
    for (const x of c.devices) {
      const [top, ctl, bottom] = x.kind === 'mos' ? [x.d, x.g, x.s] : [x.c, x.b, x.e];
      if (top !== ctl || top >= c.nFree) continue;
      const ownRail = x.dev.sign > 0 ? railIndex.vss : railIndex.vdd;
      if (bottom !== ownRail) continue;
      // A self-biased netlist has no input current: a diode starts a fifth of the way past its threshold (a MOSFET) or at 1 µA (a bipolar device).
      const drive = x.kind === 'mos'
        ? (Number.isFinite(iin) ? gateDriveFor(x.dev, Math.abs(iin), 0) : x.dev.vt0 + 0.2 * (vdd - vss - x.dev.vt0))
        : vbeFor(x.dev, Number.isFinite(iin) ? Math.abs(iin) : 1e-6);
      if (Number.isFinite(drive)) ws.v[top] = c.fixedV[ownRail]! + x.dev.sign * Math.min(drive, vdd - vss);
    }
  };

  const find = (name: string): number => c.devices.findIndex((x) => x.name === name);
  const pr = m.pair ? find(m.pair.ref) : -1;
  const po = m.pair ? find(m.pair.out) : -1;
  return {
    circuit: c, ws, sign, rail: sign > 0 ? vss : vdd, span: vdd - vss, guess,
    iin: () => iin,
    pair: pr >= 0 && po >= 0 ? { ref: pr, out: po } : undefined,
    byRole: {},
  };
}
