/**
 * input-headroom: the input branch's voltage. The input node sits Σ VDS of the input stack above
 * the source rail (NMOS; below it for PMOS): the ideal current source feeding it needs
 * limits.sourceHeadroom across it, and a resistor input left with less than that sets a current
 * that follows the threshold voltage rather than the resistor.
 */
import type { DeviceReport, ResolvedSpec, SpecPath } from '../../types';
import { mainVoltage, sinksCurrent } from '../../device-types';
import { KINDS, type TemplateKind } from '../../kinds/index';
import type { Draft, RuleContext } from '../model';
import { draftKey } from '../model';
import { valueRange, type Site } from '../sites';
import { solve } from '../../sizing/devices';
import type { OperatingPoint } from '../../analysis/index';
import { widenPlans } from '../plans';
import { code, formatSI } from '../../text/format';

/** Voltage left between the input node and the opposite rail, and the stack height. */
function inputRoom(spec: ResolvedSpec, kind: TemplateKind, devices: DeviceReport[]): { room: number; stack: number } | undefined {
  let stack = 0;
  for (const role of KINDS[kind].inputStack) {
    const d = devices.find((x) => x.role === role && !x.name.includes('.'));
    if (!d) return undefined;
    stack += mainVoltage(d);
  }
  return { room: spec.supplies.vdd - spec.supplies.vss - stack, stack };
}

export function checkHeadroom(rc: RuleContext, site: Site): Draft[] {
  const m = site.mirror;
  // A linked input hangs from another mirror's output, not a source: `link-saturation` judges it.
  if (m.kind === 'netlist' || m.input.kind === 'link') return [];
  // The input belongs to the mirror: check it once, on its first output.
  if (site.outputIndex !== 0) return [];
  const need = rc.spec.limits.sourceHeadroom;
  const got = inputRoom(rc.spec, m.kind, site.report.devices);
  if (!got || got.room >= need) return [];
  if (m.input.kind === 'self') return [];
  const resistor = m.input.kind === 'resistor';
  const path: SpecPath = resistor ? ['mirrors', site.mirrorIndex, 'input', 'resistor'] : ['mirrors', site.mirrorIndex, 'input'];
  const at = valueRange(rc.parsed, path);
  const stackNames = KINDS[m.kind].inputStack.map(code).join(' + ');
  // The stack stands on the mirror's own rail; the input source or resistor hangs from the other.
  const [own, far] = sinksCurrent(m.type) ? ['vss', 'vdd'] : ['vdd', 'vss'];
  const side = sinksCurrent(m.type) ? 'above' : 'below';
  const message = resistor
    ? `the input resistor has only ${formatSI(got.room, 'V')} across it to ${far} (the stack ${stackNames} takes ${formatSI(got.stack, 'V')} ${side} ${own} of the ${formatSI(rc.spec.supplies.vdd - rc.spec.supplies.vss, 'V')} supply; limits.sourceHeadroom is ${formatSI(need, 'V')}), ` +
      `so iin = ${formatSI(site.report.iin ?? NaN, 'A')} is set by the threshold voltage, not by the resistor`
    : `the input node sits ${formatSI(got.stack, 'V')} ${side} ${own} (stack ${stackNames}), leaving ${formatSI(got.room, 'V')} to ${far} for the input current source; it needs limits.sourceHeadroom ${formatSI(need, 'V')}`;
  const goal = (s: ResolvedSpec): number => {
    const op: OperatingPoint | undefined = solve(s, site.mirrorIndex, site.outputIndex);
    const g = op ? inputRoom(s, m.kind, op.devices) : undefined;
    return g ? g.room - need : NaN;
  };
  return [{
    key: draftKey('input-headroom', ['mirrors', site.mirrorIndex]),
    mirrorIndex: site.mirrorIndex,
    finding: { severity: 'error', code: 'input-headroom', path: at.path, range: at.range, message },
    plan: () => widenPlans(rc, site.mirrorIndex, goal, `for ${formatSI(need, 'V')} of input headroom`),
    hint: 'lower VGS (wider devices) or use a stack with fewer gate-source drops',
  }];
}
