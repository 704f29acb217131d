/**
 * What a self-biased reference reports (design §9.2): its loop current, its loop gain at the
 * operating point and its start-up check — the zero-current state without the start-up element
 * (zero-state.ts), whether the element conducts there, and its current at the operating point
 * against the limit (DEFAULTS.startupLimit of the loop's smallest branch current, design §14).
 */
import { mainCurrent } from '../device-types';
import { KINDS, isTemplateKind } from '../kinds/index';
import { DEFAULTS } from '../defaults';
import type { MirrorCircuit } from '../circuit/mirrorCircuit';
import type { DeviceReport, ReferenceReport, ResolvedMirror, StartupReport } from '../types';
import { resistorCurrent } from '../circuit/elements/resistor';
import { loopGain } from './loop-gain';
import { zeroCurrentState } from './zero-state';

/** Whether the mirror is self-biased: a reference kind, or a netlist without `input`. */
function isSelfBiased(m: ResolvedMirror): boolean {
  return isTemplateKind(m.kind) ? KINDS[m.kind].loop !== undefined : m.kind === 'netlist' && m.input === undefined;
}

/** The loop's branches: every device but the start-up element and the bank's taps (a netlist:
 *  every device but the start-up element that conducts). */
function loopDevices(m: ResolvedMirror, mc: MirrorCircuit, devices: DeviceReport[]): number[] {
  const taps = isTemplateKind(m.kind) ? KINDS[m.kind].outputRoles : [];
  const out: number[] = [];
  mc.circuit.devices.forEach((d, k) => {
    if (d.startup || taps.includes(d.role)) return;
    if (m.kind === 'netlist' && devices[k]!.region === 'cutoff') return;
    out.push(k);
  });
  return out;
}

/** A, the current of a reference kind's loop resistor: the current the loop sets (its branches
 *  differ by length modulation; the textbook current is this one). */
function resistorBranch(mc: MirrorCircuit): number {
  const r = mc.circuit.elements.find((e) => e.kind === 'resistor');
  return r && r.kind === 'resistor' ? Math.abs(resistorCurrent(r, mc.ws.v)) : NaN;
}

/** The reference report at the solved operating point (mc.ws at the solution), or undefined for
 *  a mirror that is not self-biased. `converged` false: only the zero-current state is judged. */
export function referenceReport(m: ResolvedMirror, mc: MirrorCircuit, devices: DeviceReport[], converged: boolean): ReferenceReport | undefined {
  if (!isSelfBiased(m)) return undefined;
  const c = mc.circuit;
  const isStartup = (k: number): boolean => c.devices[k]!.startup === true;
  const element = c.devices.some((d) => d.startup);
  const startup: StartupReport = { zeroState: zeroCurrentState(c, (k) => !isStartup(k)).consistent, element };
  if (element) startup.conducts = !zeroCurrentState(c).consistent;
  const loop = loopDevices(m, mc, devices);
  let smallest = Infinity;
  for (const k of loop) smallest = Math.min(smallest, Math.abs(mainCurrent(devices[k]!)));
  const current = isTemplateKind(m.kind) ? resistorBranch(mc) : smallest;
  const report: ReferenceReport = { current: converged ? current : NaN, startup };
  if (!converged) return report;
  if (element && Number.isFinite(smallest)) {
    let leak = 0;
    c.devices.forEach((d, k) => { if (d.startup) leak += Math.abs(mainCurrent(devices[k]!)); });
    startup.current = leak;
    startup.limit = DEFAULTS.startupLimit * smallest;
  }
  if (isTemplateKind(m.kind)) {
    const at = KINDS[m.kind].loop?.breakAt;
    const k = at === undefined ? -1 : c.devices.findIndex((d) => d.role === at && d.measured);
    const lg = k >= 0 ? loopGain(mc, k) : undefined;
    if (lg !== undefined) report.loopGain = lg;
  }
  return report;
}
