/** Test helper: the analyze steps the variation code sits in, from text to findings. */
import { analyzeSpec } from '../../src/core/analysis/index';
import { parseSpec, type ParsedSpec } from '../../src/core/spec/index';
import type { Finding, MirrorReport, ResolvedSpec } from '../../src/core/types';
import { applyDesignTargets, attachVariation, variationFindings, type SizedDevice } from '../../src/core/variation/index';

export interface Run { parsed: ParsedSpec; spec: ResolvedSpec; sized: SizedDevice[]; reports: MirrorReport[]; findings: Finding[] }

export function run(text: string, file: string, opts: { corners?: boolean; mc?: { samples: number; seed: number } } = {}): Run {
  const parsed = parseSpec(text, file);
  if (!parsed.spec) throw new Error(`fixture does not parse: ${parsed.findings.map((f) => f.message).join('; ')}`);
  const { spec, sized } = applyDesignTargets(parsed.spec);
  const reports = attachVariation(spec, analyzeSpec(spec), opts);
  return { parsed, spec, sized, reports, findings: variationFindings(parsed, spec, reports, sized, file) };
}
