/** The spec's drift and noise keys (design §12): a resistor's `tc1` and `tolerance`, a mirror's
 *  gate-line `filter`, and the top-level `analysis.noise`. */
import { DEFAULTS } from '../defaults';
import type { AnalysisSpec, GateFilter, ResistorDrift, SpecPath } from '../types';
import { readMap } from './read';
import type { Data } from './read';
import { resolveNumber } from './values';
import type { ValueScope } from './values';

/** `tc1` (1/K) and `tolerance` (relative) of a resistor written as a mapping. */
export function readResistorDrift(scope: ValueScope, r: Data, path: SpecPath): ResistorDrift {
  const out: ResistorDrift = {};
  if (r.tc1 !== undefined) {
    const v = resolveNumber(scope, r.tc1, [...path, 'tc1'], 'plain');
    if (v !== undefined) out.tc1 = v;
  }
  if (r.tolerance !== undefined) {
    const v = resolveNumber(scope, r.tolerance, [...path, 'tolerance'], 'ratio', { nonNegative: true });
    if (v !== undefined && v >= 1) scope.sink.error('bad-value', `\`tolerance\` is relative and below 100 %; got ${v}`, [...path, 'tolerance']);
    else if (v !== undefined) out.tolerance = v;
  }
  return out;
}

/** `filter: { r, c }` on a mirror's gate lines. */
export function readFilter(scope: ValueScope, raw: unknown, path: SpecPath): GateFilter | undefined {
  const f = readMap(scope.sink, raw, path, 'a mapping { r, c }');
  if (!f) return undefined;
  if (f.r === undefined || f.c === undefined) {
    scope.sink.error('missing-key', `\`filter\` needs both \`r\` (series resistance) and \`c\` (capacitance to the rail)`, path, 'key', 'missing:filter');
    return undefined;
  }
  const r = resolveNumber(scope, f.r, [...path, 'r'], 'resistance', { positive: true });
  const c = resolveNumber(scope, f.c, [...path, 'c'], 'capacitance', { positive: true });
  return r === undefined || c === undefined ? undefined : { r, c };
}

/** `analysis: { noise: { f, band: [f1, f2] } }`, every default filled. */
export function readAnalysis(scope: ValueScope, raw: unknown): AnalysisSpec {
  const out: AnalysisSpec = { noise: { f: DEFAULTS.noise.f, band: [...DEFAULTS.noise.band] } };
  const a = readMap(scope.sink, raw, ['analysis'], 'a mapping { noise }');
  const n = a ? readMap(scope.sink, a.noise, ['analysis', 'noise'], 'a mapping { f, band }') : undefined;
  if (!n) return out;
  const path: SpecPath = ['analysis', 'noise'];
  if (n.f !== undefined) {
    const f = resolveNumber(scope, n.f, [...path, 'f'], 'frequency', { positive: true });
    if (f !== undefined) out.noise.f = f;
  }
  if (n.band !== undefined) {
    const bp = [...path, 'band'];
    if (!Array.isArray(n.band) || n.band.length !== 2) {
      scope.sink.error('wrong-type', '`band` is a list of two frequencies [f1, f2]', bp, undefined, 'type');
    } else {
      const lo = resolveNumber(scope, n.band[0], [...bp, 0], 'frequency', { positive: true });
      const hi = resolveNumber(scope, n.band[1], [...bp, 1], 'frequency', { positive: true });
      if (lo !== undefined && hi !== undefined) {
        if (lo < hi) out.noise.band = [lo, hi];
        else scope.sink.error('bad-value', `\`band\` must go from a lower to a higher frequency; got [${lo}, ${hi}] Hz`, bp);
      }
    }
  }
  return out;
}
