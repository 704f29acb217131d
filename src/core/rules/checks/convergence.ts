/**
 * no-convergence: the DC solve failed; nothing else about this output can be trusted.
 * stack-over-supply: the solve put a node outside the rails — the devices between the mirror's
 * rail and that node need more voltage to carry their current than the supply gives, so there is
 * no operating point. One error names the stack and what it needs; no other finding follows.
 * A Wilson whose output lies beyond its output stack's reach gets output-beyond-reach (reach.ts)
 * in the place of either: the cause, not the solver's log.
 */
import { mainCurrent } from '../../device-types';
import type { Draft, RuleContext } from '../model';
import { draftKey } from '../model';
import { mirrorRange, valueRange, type Site } from '../sites';
import { code, formatSI } from '../../text/format';
import { checkReach } from './reach';

export function checkConvergence(rc: RuleContext, site: Site): Draft[] {
  const r = site.report;
  if (r.converged) return [];
  let reach: Draft | undefined;
  try {
    reach = checkReach(rc, site);
  } catch {
    // A diagnosis that fails on odd numbers leaves the solver's own finding.
  }
  if (reach) return [reach];
  if (r.beyondRails) return [overSupply(rc, site)];
  const at = mirrorRange(rc.parsed, site.mirrorIndex);
  const note = r.solveNote ? `the solve did not converge: ${r.solveNote}` : 'the solve did not converge';
  return [{
    key: draftKey('no-convergence', site.path),
    mirrorIndex: site.mirrorIndex,
    finding: {
      severity: 'error', code: 'no-convergence', path: at.path, range: at.range,
      message: `no DC operating point (${note}); its other figures are not checked`,
    },
  }];
}

function overSupply(rc: RuleContext, site: Site): Draft {
  const b = site.report.beyondRails!;
  const { vdd, vss } = rc.spec.supplies;
  const m = site.mirror;
  // The input value is what the stack is asked to carry (template kinds); else the mirror's name.
  const at = m.kind !== 'netlist' && b.stack.length > 0 && !b.stack.some((n) => n.includes('.'))
    ? valueRange(rc.parsed, m.input.kind === 'resistor' ? ['mirrors', site.mirrorIndex, 'input', 'resistor'] : m.input.kind === 'self' ? ['mirrors', site.mirrorIndex, 'resistor'] : ['mirrors', site.mirrorIndex, 'input'])
    : mirrorRange(rc.parsed, site.mirrorIndex);
  const first = site.report.devices.find((d) => d.name === b.stack[0]);
  const firstI = first ? mainCurrent(first) : NaN;
  const carry = Number.isFinite(firstI) ? ` to carry ${formatSI(Math.abs(firstI), 'A')}` : '';
  const stack = b.stack.length > 0 ? `the stack ${b.stack.map(code).join(' + ')}` : `the devices feeding node ${code(b.node)}`;
  const side = b.rail === 'vss' ? 'below vss' : 'above vdd';
  return {
    // The input stack is shared by a bank's outputs: one finding for the mirror.
    key: draftKey('stack-over-supply', ['mirrors', site.mirrorIndex], b.node),
    mirrorIndex: site.mirrorIndex,
    finding: {
      severity: 'error', code: 'stack-over-supply', path: at.path, range: at.range,
      message: `no operating point: ${stack} needs ${formatSI(b.need, 'V')}${carry} but the supply is ${formatSI(vdd - vss, 'V')} ` +
        `(node ${code(b.node)} would sit at ${formatSI(b.v, 'V')}, ${side}); no figures until it fits — lower VGS (wider or shorter devices), fewer stacked gate-source drops, or less current`,
    },
  };
}
