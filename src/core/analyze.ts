/**
 * The whole analysis of one bias spec: text → parse → elaborate → solve → measure → rules →
 * FileReport. Every front end (extension worker, CLI, tests) calls this one function, so what a
 * designer sees in the editor, the panel and CI is computed once, the same way.
 */
import type { Anchor, FileReport, Finding, MirrorReport, ResolvedSpec, WithheldMirror } from './types';
import { isRecord } from './spec/params';
import { parseSpec, type ParsedSpec } from './spec/index';
import { analyzeSpec } from './analysis/index';
import { runRules } from './rules/index';
import { buildAnchors } from './anchors';
import { applyDesignTargets } from './design/auto-size';
import { attachVariation } from './variation/attach';
import { variationFindings } from './variation/findings';
import { sortFindings } from './findings';
import { mirrorOfPath } from './mirror-at';

export interface AnalyzeOptions {
  /** Compute Iout/Rout versus Vout for plots (the panel and the HTML report). */
  curve?: boolean;
  /** Solve every named process corner (design: `corners:`). */
  corners?: boolean;
  /** Monte Carlo mismatch: samples and seed. */
  mc?: { samples: number; seed: number };
  /** Fallbacks for limits the spec leaves unset (the editor's `qpoint.limits.margin`). */
  limitsDefaults?: { margin?: number };
  /** Source anchors for hover, CodeLens and the panel (default true; the CLI's check needs none). */
  anchors?: boolean;
}

/** Callbacks of one in-process analysis (not options: they cannot cross to a worker thread). */
export interface AnalyzeHooks {
  /** Monte Carlo samples done over all outputs, and their total. */
  mcProgress?: (done: number, total: number) => void;
}

export function analyzeText(text: string, file: string, opts: AnalyzeOptions = {}, hooks: AnalyzeHooks = {}): FileReport {
  let parsed: ParsedSpec | undefined;
  try {
    parsed = parseSpec(text, file);
    if (!parsed.spec) {
      return { file, parsed: parsed.parsed, mirrors: [], findings: sortFindings(parsed.findings), anchors: [] };
    }
    // Design targets (`size: auto`) are sized before anything is solved, so every later step
    // sees concrete devices; DeviceReport.sized marks what qpoint computed.
    const { spec, sized } = applyDesignTargets(withLimitDefaults(parsed, parsed.spec, opts));
    const withSpec: ParsedSpec = { ...parsed, spec };
    const solved = withRequirements(spec, analyzeSpec(spec, { curve: opts.curve }));
    const mirrors: MirrorReport[] = attachVariation(spec, solved, { corners: opts.corners, mc: opts.mc, mcProgress: hooks.mcProgress });
    const findings: Finding[] = [
      ...parsed.findings,
      // A partial spec (a mirror with errors left out) gets findings but no fixes yet: a fix is
      // verified against the whole file, which has errors until the designer fixes them.
      ...runRules(withSpec, mirrors, parsed.withheld ? { maxRechecks: 0 } : {}),
      ...variationFindings(withSpec, spec, mirrors, sized, file),
    ];
    const anchors: Anchor[] = opts.anchors === false ? [] : buildAnchors(withSpec, mirrors);
    const report: FileReport = {
      file, parsed: true, title: spec.title, mirrors, findings: sortFindings(findings), anchors,
      limits: { error: spec.limits.error, margin: spec.limits.margin },
    };
    if (parsed.withheld) report.withheld = withheldMirrors(parsed, parsed.withheld);
    return report;
  } catch (err) {
    // A defect in qpoint must not cost the designer their diagnostics: report it as a finding.
    const message = err instanceof Error ? err.message : String(err);
    const findings = parsed ? [...parsed.findings] : [];
    findings.push({
      severity: 'error', code: 'internal-error', path: [],
      message: `qpoint could not analyse this file (${message}); please report it with the file attached`,
      range: { start: { line: 0, character: 0 }, end: { line: 0, character: 0 } },
    });
    return { file, parsed: parsed?.parsed ?? false, mirrors: [], findings: sortFindings(findings), anchors: [] };
  }
}

/** Where each mirror set aside for its errors is written, for the editor's lens on it. */
function withheldMirrors(parsed: ParsedSpec, indices: number[]): WithheldMirror[] {
  const items = isRecord(parsed.data) && Array.isArray(parsed.data.mirrors) ? parsed.data.mirrors : [];
  return indices.map((index) => {
    const item: unknown = items[index];
    const name = isRecord(item) && typeof item.name === 'string' ? item.name : undefined;
    const range = parsed.source.value(['mirrors', index, 'name']) ?? parsed.source.rangeFor(['mirrors', index]);
    return name === undefined ? { index, range } : { index, name, range };
  });
}

/** Each report carries the requirements it is checked against, for the panel's "met" column. */
function withRequirements(spec: ResolvedSpec, reports: MirrorReport[]): MirrorReport[] {
  return reports.map((r) => {
    const mirror = mirrorOfPath(spec, r.path);
    if (!mirror) return r;
    if (mirror.kind === 'netlist') return { ...r, require: mirror.require };
    const j = r.path.length >= 4 && typeof r.path[3] === 'number' ? r.path[3] : 0;
    const out = mirror.outputs[j];
    return out ? { ...r, require: out.require } : r;
  });
}

/** The editor may supply a default margin; a margin written in the spec always wins. */
function withLimitDefaults(parsed: ParsedSpec, spec: ResolvedSpec, opts: AnalyzeOptions): ResolvedSpec {
  const margin = opts.limitsDefaults?.margin;
  if (margin === undefined || parsed.source.value(['limits', 'margin']) !== undefined) return spec;
  return { ...spec, limits: { ...spec.limits, margin } };
}
