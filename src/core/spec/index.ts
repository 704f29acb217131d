/**
 * The bias-spec language: text → ParsedSpec (data with positions, findings, resolved spec).
 *
 * Pipeline: readDocument (YAML 1.2, limits, duplicate keys) → validateSchema (structure, the
 * shipped JSON Schema) → elaborate (values with units, expressions, defaults, roles, references).
 * `spec` is present when the file reads and no spec finding is an error; warnings do not block.
 * When every error sits inside mirrors (a typo in one mirror while the designer types), `spec`
 * is partial: it holds the other mirrors, so their findings stay in view, and `withheld` lists
 * the file indices of the mirrors left out until their errors are fixed.
 */
import type { Finding, ResolvedSpec } from '../types';
import { readDocument, type ReadDocument } from './document';
import { elaborate } from './elaborate';
import { FindingSink, type SpecSuggestion } from './findings';
import { LineIndex, ZERO_RANGE } from '../text/lines';
import { validateSchema } from './schema';
import { YamlSourceMap } from './source-map';
import { indexOf } from '../mirror-at';
import { tableNames, type TableTexts } from './tables';

export type { TableTexts } from './tables';
import type { SourceMap } from './source-map';

export type { SourceMap } from './source-map';

export interface ParsedSpec {
  text: string;
  parsed: boolean;              // false only for YAML syntax errors / unreadable input
  spec?: ResolvedSpec;          // present when there is no error-severity finding that makes it unusable
  findings: Finding[];          // spec findings (severity, code, message, path, narrowest range)
  source: SourceMap;
  /** The file is JSON (by its name, else by its text): edits keep it JSON. */
  json?: boolean;
  /** The plain data the spec was elaborated from (present when the text reads). */
  data?: unknown;
  /** A partial spec: file indices of the mirrors left out because they have errors. */
  withheld?: number[];
  /** Did-you-means that can be applied to their token (not yet verified: spec/suggestion-fixes.ts). */
  suggestions?: SpecSuggestion[];
  /** The table texts the spec was read with (a re-read of an edited text reuses them). */
  tables?: TableTexts;
}

export interface ParseOptions {
  /** Characterisation-table texts by the name the spec writes (front ends read the files). */
  tables?: TableTexts;
  /** False for a re-read that only asks which findings an edit leaves: no did-you-mean search. */
  words?: boolean;
}

/**
 * The table files a spec names (`table:` values), for the front end to read before analysing.
 * A text without the word `table` and without a backslash (an escape could spell it in a quoted
 * key) names none: most specs, which are then not read twice.
 */
export function tableFiles(text: string): string[] {
  if (typeof text === 'string' && !text.includes('table') && !text.includes('\\')) return [];
  try {
    const read = readDocument(typeof text === 'string' ? text : '', new LineIndex(text));
    return read.parsed ? tableNames(read.data) : [];
  } catch {
    return [];
  }
}

const SEVERITY_ORDER = { error: 0, warning: 1, info: 2 } as const;

export function sortSpecFindings(list: Finding[]): Finding[] {
  return [...list].sort((a, b) => a.range.start.line - b.range.start.line
    || a.range.start.character - b.range.start.character
    || SEVERITY_ORDER[a.severity] - SEVERITY_ORDER[b.severity]);
}

export function looksJson(text: string, file?: string): boolean {
  if (file) return /\.json$/i.test(file);
  return /^\s*\{/.test(text) && /\}\s*$/.test(text);
}

export function parseSpec(text: string, file?: string, opts: ParseOptions = {}): ParsedSpec {
  const src = typeof text === 'string' ? text : '';
  const lines = LineIndex.of(src);
  let source: SourceMap = new YamlSourceMap(undefined, lines);
  const json = looksJson(src, file);
  try {
    const read = readDocument(src, lines);
    const yaml = new YamlSourceMap(read.doc, lines);
    source = yaml;
    return fromRead(src, read, { source, findings: yaml }, json, opts);
  } catch (e) {
    // A defect in qpoint must not take the designer's diagnostics with it.
    const message = e instanceof Error ? e.message : String(e);
    return {
      text: src, parsed: false, source, json,
      findings: [{ severity: 'error', code: 'internal-error', path: [], range: ZERO_RANGE,
        message: `qpoint could not read this spec (${message}); please report it with the file attached` }],
    };
  }
}

/**
 * A read document's data through the schema and the elaborator: `maps.source` is the text's source
 * map, `maps.findings` the tree the findings are placed on. `parseSpec` reads the document from
 * the text (one map for both); a fix's re-check may hand in data it spliced from parts it read
 * alone (spec/fragment.ts), whose findings it only counts. Throws only on a defect (parseSpec
 * turns that into a finding).
 */
export function fromRead(src: string, read: ReadDocument, maps: { source: SourceMap; findings: YamlSourceMap }, json: boolean, opts: ParseOptions = {}): ParsedSpec {
  const source = maps.source;
  if (!read.parsed) return { text: src, parsed: false, findings: sortSpecFindings(read.findings), source, json };
  const sink = new FindingSink(maps.findings, undefined, opts.words ?? true);
  for (const f of read.findings) sink.add(f.severity, f.code, f.message, f.path, f.range, `${f.code}:${f.range.start.line}:${f.range.start.character}`);
  if (read.data === undefined || read.data === null) return { text: src, parsed: true, findings: sortSpecFindings(sink.list), source, json };
  validateSchema(read.data, sink);
  const spec = elaborate(read.data, sink, undefined, opts.tables);
  const out: ParsedSpec = { text: src, parsed: true, findings: sortSpecFindings(sink.list), source, json, data: read.data };
  if (opts.tables) out.tables = opts.tables;
  if (sink.suggestions.length > 0) out.suggestions = sink.suggestions;
  if (spec !== undefined && sink.errorCount === 0) out.spec = spec;
  else if (spec !== undefined) {
    const withheld = sink.mirrorsInError();
    if (withheld) {
      const setAside = new Set(withheld);
      out.spec = { ...spec, mirrors: spec.mirrors.filter((m) => !setAside.has(indexOf(m))) };
      out.withheld = withheld;
    }
  }
  return out;
}
