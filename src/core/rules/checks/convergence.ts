/** no-convergence: the DC solve failed; nothing else about this output can be trusted. */
import type { Draft, RuleContext } from '../model';
import { draftKey } from '../model';
import { mirrorRange, type Site } from '../sites';
import { code } from '../../text/format';

export function checkConvergence(rc: RuleContext, site: Site): Draft[] {
  if (site.report.converged) return [];
  const at = mirrorRange(rc.parsed, site.mirrorIndex);
  const note = site.report.solveNote ? `: ${site.report.solveNote}` : '';
  return [{
    key: draftKey('no-convergence', site.path),
    mirrorIndex: site.mirrorIndex,
    finding: {
      severity: 'error', code: 'no-convergence', path: at.path, range: at.range,
      message: `${code(site.report.name)} has no DC operating point (the solve did not converge${note}); its other figures are not checked`,
    },
  }];
}
