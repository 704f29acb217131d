/**
 * The whole analysis of one bias spec: text → parse → elaborate → solve → measure → rules →
 * FileReport. Every front end (extension worker, CLI, tests) calls this one function, so what a
 * designer sees in the editor, the panel and CI is computed once, the same way.
 */
import type { Anchor, FileReport, Finding, MirrorReport, MirrorWiring, ResolvedSpec, WithheldMirror } from './types';
import { isBipolarDevice } from './device-types';
import { isRecord } from './spec/params';
import type { ParsedSpec, TableTexts } from './spec/index';
import { resolveText } from './resolve';
import { analyzeSpec } from './analysis/index';
import { runRules } from './rules/index';
import { withSuggestionFixes } from './spec/suggestion-fixes';
import { buildAnchors } from './anchors';
import { attachVariation } from './variation/attach';
import { variationFindings } from './variation/findings';
import { withCornerFixes } from './variation/corner-fixes';
import { sortFindings } from './findings';
import { indexOf, mirrorAt } from './mirror-at';
import type { AnalysisCache } from './analysis-cache';
import { attachNetworks } from './network/report';
import { networkFindings } from './network/findings';

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
  /** With `corners`: fixes for corner findings, each verified by analysing the edited text at every corner (default true). */
  cornerFixes?: boolean;
  /** Characterisation-table texts by the name the spec writes (`table:`), read by the front end
   *  (relative to the spec, inside its folder, size-capped): the core reads no file. */
  tables?: TableTexts;
  /** Fixes for `link-saturation`, each verified by analysing the edited text (default true). */
  linkFixes?: boolean;
  /** Fixes for design findings (default true; a link fix's re-check needs findings only). */
  ruleFixes?: boolean;
}

/** Callbacks of one in-process analysis (not options: they cannot cross to a worker thread). */
export interface AnalyzeHooks {
  /** Monte Carlo samples done over all outputs, and their total. */
  mcProgress?: (done: number, total: number) => void;
  /** This file's results kept from its earlier analyses (analysis-cache.ts); the report is the same without it. */
  cache?: AnalysisCache;
}

export function analyzeText(text: string, file: string, opts: AnalyzeOptions = {}, hooks: AnalyzeHooks = {}): FileReport {
  const cache = hooks.cache;
  cache?.begin();
  try {
    return analyze(text, file, opts, hooks);
  } finally {
    cache?.end();
  }
}

function analyze(text: string, file: string, opts: AnalyzeOptions, hooks: AnalyzeHooks): FileReport {
  let parsed: ParsedSpec | undefined;
  try {
    // Design targets (`size: auto`) are sized before anything is solved, so every later step
    // sees concrete devices; DeviceReport.sized marks what qpoint computed.
    const resolved = resolveText(text, file, {
      limitsDefaults: opts.limitsDefaults, ...(opts.tables ? { tables: opts.tables } : {}), ...(hooks.cache ? { parses: { cache: hooks.cache.parses, slot: 'spec' } } : {}),
    });
    parsed = resolved.parsed;
    const spec = parsed.spec;
    if (!spec) {
      return { file, parsed: parsed.parsed, mirrors: [], findings: sortFindings(withSuggestionFixes(parsed, file)), anchors: [] };
    }
    const solved = withRequirements(spec, analyzeSpec(spec, { curve: opts.curve, units: hooks.cache?.units }), hooks.cache !== undefined);
    const net = attachNetworks(spec, solved);
    const mirrors: MirrorReport[] = attachVariation(spec, net.reports, { corners: opts.corners, mc: opts.mc, mcProgress: hooks.mcProgress });
    let findings: Finding[] = [
      ...withSuggestionFixes(parsed, file),
      // A partial spec (a mirror with errors left out) gets findings but no fixes yet: a fix is
      // verified against the whole file, which has errors until the designer fixes them.
      ...runRules(parsed, mirrors, parsed.withheld || opts.ruleFixes === false ? { maxRechecks: 0 } : { rechecks: hooks.cache?.rechecks, units: hooks.cache?.units, parses: hooks.cache?.parses, ...(hooks.cache ? { byMirror: { store: hooks.cache.findings, settings: settingsOf(opts) } } : {}) }),
      ...variationFindings(parsed, spec, mirrors, resolved.sized, file),
    ];
    if (net.networks.length > 0 || spec.limits.supplyCurrent !== undefined) {
      const again: AnalyzeOptions = { anchors: false, linkFixes: false, ruleFixes: false, ...(opts.limitsDefaults ? { limitsDefaults: opts.limitsDefaults } : {}), ...(opts.tables ? { tables: opts.tables } : {}) };
      const reanalyze = opts.linkFixes === false ? undefined : (t: string) => analyzeText(t, file, again);
      findings.push(...networkFindings(parsed, spec, mirrors, net.networks, findings, reanalyze));
    }
    if (opts.corners && opts.cornerFixes !== false && !parsed.withheld) {
      const again: AnalyzeOptions = { corners: true, cornerFixes: false, anchors: false, ...(opts.limitsDefaults ? { limitsDefaults: opts.limitsDefaults } : {}), ...(opts.tables ? { tables: opts.tables } : {}) };
      findings = withCornerFixes(parsed, spec, mirrors, findings, (t) => analyzeText(t, file, again).findings);
    }
    const anchors: Anchor[] = opts.anchors === false ? [] : buildAnchors(parsed, mirrors, hooks.cache?.anchors);
    const report: FileReport = {
      file, parsed: true, title: spec.title, mirrors, findings: sortFindings(findings), anchors,
      limits: { error: spec.limits.error, margin: spec.limits.margin },
    };
    if (parsed.withheld) report.withheld = withheldMirrors(parsed, parsed.withheld);
    if (net.networks.length > 0) report.networks = net.networks;
    report.wiring = wiringOf(spec);
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

/** The options a report's figures depend on (the tables are in the spec's process, by digest). */
function settingsOf(opts: AnalyzeOptions): string {
  return JSON.stringify({ ...opts, tables: undefined });
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

/** Each mirror's wiring for its schematic: what the figures do not say. */
function wiringOf(spec: ResolvedSpec): MirrorWiring[] {
  const out: MirrorWiring[] = [];
  spec.mirrors.forEach((m) => {
    const mirrorIndex = indexOf(m);
    if (m.kind !== 'netlist') {
      out.push({ mirrorIndex, input: m.input,
        ...(m.degeneration !== undefined ? { degeneration: m.degeneration } : {}),
        ...(m.resistor !== undefined ? { loopResistor: m.resistor } : {}) });
      return;
    }
    out.push({ mirrorIndex, netlist: {
      // A bipolar device's collector, base and emitter take the drain, gate and source places.
      devices: m.devices.map((d) => (isBipolarDevice(d) ? { name: d.name, d: d.c, g: d.b, s: d.e } : { name: d.name, d: d.d, g: d.g, s: d.s })),
      currents: m.currents, voltages: m.voltages, resistors: m.resistors, output: m.output.node,
    } });
  });
  return out;
}

/**
 * Each report carries the requirements it is checked against, for the panel's "met" column: a
 * copy (the analysis adds to its reports: a network's figures in place). In a spec without
 * networks nothing is added in place, so with the file's cache a report read back from its
 * solved units (the very copy of the last analysis: analysis/repeats.ts) gets the very copy made
 * of it then.
 */
function withRequirements(spec: ResolvedSpec, reports: MirrorReport[], cached: boolean): MirrorReport[] {
  const keep = cached && (!spec.networks || spec.networks.length === 0);
  return reports.map((r) => {
    const mirror = mirrorAt(spec, r.mirrorIndex);
    if (!mirror) return { ...r };
    const require = mirror.kind === 'netlist' ? mirror.require : mirror.outputs[r.outputIndex]?.require;
    if (mirror.kind !== 'netlist' && !mirror.outputs[r.outputIndex]) return { ...r };
    const kept = keep ? required.get(r) : undefined;
    if (kept && kept.require === require) return kept.report;
    const out = { ...r, require };
    if (keep) required.set(r, { require, report: out });
    return out;
  });
}
const required = new WeakMap<MirrorReport, { require: MirrorReport['require']; report: MirrorReport }>();
