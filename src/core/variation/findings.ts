/**
 * Every finding of the variation and sizing passes, for the lead's analyze step: corners,
 * Monte Carlo and computed sizes. Pure and total: a defect in one pass must not hide the
 * others' findings, so each runs on its own and a failure becomes an `internal-error` finding.
 */
import type { Finding, MirrorReport, ResolvedSpec } from '../types';
import type { ParsedSpec } from '../spec/index';
import type { SizedDevice } from '../design/auto-size';
import { computedSizeFindings } from '../design/size-fix';
import { cornerFindings } from './corner-findings';
import { monteCarloFindings } from './mc-findings';

/** Findings from variation: worst corner per failing check (`corner-not-saturated`,
 *  `corner-ratio-error`, …), MC vs linearized sigma differing by > 15 % (info `mc-nonlinear`),
 *  MC yield below 1 when requirements exist (warning `mc-yield`), and `computed-size` (info)
 *  with a fix that writes the computed sizes into the file. `spec` is the sized spec the
 *  reports were computed from; `parsed` is the file as written. */
export function variationFindings(parsed: ParsedSpec, spec: ResolvedSpec, reports: MirrorReport[], sized: SizedDevice[], file?: string): Finding[] {
  const out: Finding[] = [];
  const guard = (f: () => Finding[]): void => {
    try {
      out.push(...f());
    } catch (err) {
      const message = err instanceof Error ? err.message : String(err);
      out.push({
        severity: 'error', code: 'internal-error', path: [],
        range: { start: { line: 0, character: 0 }, end: { line: 0, character: 0 } },
        message: `qpoint's variation checks failed on this file (${message}); please report it with the file attached`,
      });
    }
  };
  guard(() => cornerFindings(parsed, spec, reports));
  guard(() => monteCarloFindings(parsed, spec, reports));
  guard(() => computedSizeFindings(parsed, sized, file));
  return out;
}
