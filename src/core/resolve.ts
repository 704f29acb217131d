/**
 * The one resolve step every front end shares: text → parse → elaborate → design targets
 * (`size: auto` sized at the mirror's own currents). `analyzeText`, the CLI's `sweep`, fix
 * verification and the benchmark all start here, so a mirror is the same circuit whichever of
 * them solves it.
 */
import type { Limits, ResolvedSpec } from './types';
import { parseSpec, type ParsedSpec, type TableTexts } from './spec/index';
import type { ParseCache } from './spec/incremental';
import { applyDesignTargets, type SizedDevice } from './design/auto-size';
import { provisionalLinks, solveNetworks } from './network/index';

export interface ResolveOptions {
  /** Fallbacks for limits the spec leaves unset (the editor's `qpoint.limits.margin`). */
  limitsDefaults?: { margin?: number };
  /** Limits to use whatever the spec says (a fix's re-check keeps the original's). */
  limits?: Limits;
  /** Characterisation-table texts by the name the spec writes (design §11). */
  tables?: TableTexts;
  /** This file's earlier parses (spec/incremental.ts) and which of its texts this is: an edit
   *  inside one mirror is read alone. The result is the same without. */
  parses?: { cache: ParseCache; slot: string };
}

export interface ResolvedText {
  /** The parse, with `spec` the resolved spec (design targets applied) when there is one. */
  parsed: ParsedSpec;
  /** What the design targets computed, for `computed-size` findings and DeviceReport.sized. */
  sized: SizedDevice[];
}

export function resolveText(text: string, file?: string, opts: ResolveOptions = {}): ResolvedText {
  const parseOpts = opts.tables ? { tables: opts.tables } : {};
  const parsed = opts.parses ? opts.parses.cache.parse(opts.parses.slot, text, file, parseOpts) : parseSpec(text, file, parseOpts);
  return resolveParsed(parsed, opts);
}

/** The resolve step after the parse (a fix's re-check may read its edited text in parts: rules/verify.ts). */
export function resolveParsed(parsed: ParsedSpec, opts: ResolveOptions = {}): ResolvedText {
  if (!parsed.spec) return { parsed, sized: [] };
  // Linked inputs start from their intended currents; once sized, each linked group is solved
  // as one circuit and its mirrors handed on at that solution (network/).
  const { spec, sized } = applyDesignTargets(provisionalLinks(withLimits(parsed, parsed.spec, opts)));
  return { parsed: { ...parsed, spec: solveNetworks(spec) }, sized };
}

/** The editor may supply a default margin; a margin written in the spec always wins. */
function withLimits(parsed: ParsedSpec, spec: ResolvedSpec, opts: ResolveOptions): ResolvedSpec {
  if (opts.limits) return { ...spec, limits: opts.limits };
  const margin = opts.limitsDefaults?.margin;
  if (margin === undefined || parsed.source.value(['limits', 'margin']) !== undefined) return spec;
  return { ...spec, limits: { ...spec.limits, margin } };
}
