/**
 * SARIF 2.1.0 (OASIS) log of qpoint's findings, for CI code-scanning annotators. Positions:
 * SARIF lines and columns are 1-based and columns count UTF-16 code units by default, the same
 * units as the core's LSP ranges, so the conversion is +1 on both; endColumn is the column after
 * the last character, which is exactly LSP's exclusive end + 1.
 */
import type { Finding, NetworkReport, Range, Severity, TextEdit } from '../types';
import { DESIGN_RULES, type RuleInfo } from '../rules/catalog';

export interface SarifTool {
  version: string;
  /** Address of docs/findings.md; each rule links to `${rulesDoc}#${code}`. */
  rulesDoc: string;
  /** Where qpoint lives (the README); defaults to rulesDoc without its fragment. */
  informationUri?: string;
  /** Descriptions of codes from other parts of qpoint (spec, variation) to add to the rule table. */
  rules?: readonly RuleInfo[];
}

/** SARIF `level` per severity: SARIF has no "info", its "note" is the same idea. */
const LEVEL: Record<Severity, 'error' | 'warning' | 'note'> = { error: 'error', warning: 'warning', info: 'note' };

const SARIF_SCHEMA_URI = 'https://json.schemastore.org/sarif-2.1.0.json';

export function toSarif(files: { file: string; findings: Finding[]; networks?: NetworkReport[] }[], tool: SarifTool): object {
  const known = new Map<string, RuleInfo>();
  for (const r of [...DESIGN_RULES, ...(tool.rules ?? [])]) known.set(r.code, r);
  // The rule table: every design check, plus every other code that occurs in this log.
  const ruleCodes: string[] = DESIGN_RULES.map((r) => r.code);
  for (const f of files.flatMap((x) => x.findings)) if (!ruleCodes.includes(f.code)) ruleCodes.push(f.code);
  const ruleIndex = new Map(ruleCodes.map((c, i) => [c, i]));
  const rules = ruleCodes.map((code) => sarifRule(code, known.get(code), tool.rulesDoc));

  // Every file checked, findings or not: the set of analysis targets (SARIF §3.24.6).
  const artifacts = files.map((f) => ({ location: { uri: toUri(f.file) }, roles: ['analysisTarget'] }));
  const results = files.flatMap((f, fileIndex) =>
    f.findings.map((finding) => sarifResult(finding, toUri(f.file), fileIndex, ruleIndex.get(finding.code) ?? 0)));

  // Bias networks (design §9.3) ride along as the run's properties: root, members, supply current.
  const networks = files.flatMap((f) => (f.networks ?? []).map((n) => ({ file: toUri(f.file), ...n })));
  return {
    $schema: SARIF_SCHEMA_URI,
    version: '2.1.0',
    runs: [{
      ...(networks.length > 0 ? { properties: { networks } } : {}),
      tool: {
        driver: {
          name: 'qpoint',
          version: tool.version,
          informationUri: tool.informationUri ?? tool.rulesDoc.replace(/#.*$/, ''),
          rules,
        },
      },
      columnKind: 'utf16CodeUnits',
      artifacts,
      results,
    }],
  };
}

function sarifRule(code: string, info: RuleInfo | undefined, rulesDoc: string): object {
  const summary = info?.summary ?? `qpoint finding \`${code}\`.`;
  const full = info ? `${info.summary} ${info.why}` : `qpoint finding \`${code}\`; see the documentation for what it means and how to fix it.`;
  const help = info ? `${info.why} Fix: ${info.fix}` : `See ${rulesDoc}#${code}.`;
  return {
    id: code,
    name: ruleName(code),
    shortDescription: { text: summary },
    fullDescription: { text: full },
    helpUri: `${rulesDoc}#${code}`,
    help: { text: help, markdown: info ? `${info.why}\n\n**Fix.** ${info.fix}` : `See [${code}](${rulesDoc}#${code}).` },
    ...(info ? { defaultConfiguration: { level: LEVEL[info.severity] } } : {}),
  };
}

function sarifResult(f: Finding, uri: string, artifactIndex: number, ruleIndex: number): object {
  const location = (range: Range) => ({
    physicalLocation: { artifactLocation: { uri, index: artifactIndex }, region: toRegion(range) },
  });
  const result: Record<string, unknown> = {
    ruleId: f.code,
    ruleIndex,
    level: LEVEL[f.severity],
    message: { text: f.message },
    locations: [location(f.range)],
    properties: { specPath: f.path.map(String) },
  };
  if (f.related && f.related.length > 0) {
    result.relatedLocations = f.related.map((r, i) => ({ id: i + 1, ...location(r.range), message: { text: r.message } }));
  }
  if (f.fixes && f.fixes.length > 0) {
    result.fixes = f.fixes.map((fix) => ({
      description: { text: fix.preferred ? `${fix.title} (preferred)` : fix.title },
      artifactChanges: [{ artifactLocation: { uri, index: artifactIndex }, replacements: fix.edits.map(toReplacement) }],
    }));
  }
  return result;
}

/** LSP range (0-based, exclusive end) → SARIF region (1-based, endColumn after the last character). */
export function toRegion(r: Range): { startLine: number; startColumn: number; endLine: number; endColumn: number } {
  return { startLine: r.start.line + 1, startColumn: r.start.character + 1, endLine: r.end.line + 1, endColumn: r.end.character + 1 };
}

function toReplacement(e: TextEdit): object {
  return { deletedRegion: toRegion(e.range), insertedContent: { text: e.newText } };
}

/** A file name as a URI reference: forward slashes, each segment percent-encoded; absolute
 *  paths (drive or root) become file URIs, since a relative reference must not start with a
 *  slash (rule SARIF1004 of the SARIF multitool's validator). */
export function toUri(file: string): string {
  const slashed = file.replace(/\\/g, '/');
  const drive = /^([A-Za-z]):\//.exec(slashed);
  const encode = (p: string) => p.split('/').map((s) => encodeURIComponent(s)).join('/');
  if (drive) return `file:///${drive[1]}:/${encode(slashed.slice(3))}`;
  if (/^[a-z][a-z0-9+.-]*:\/\//i.test(slashed)) return slashed;
  if (slashed.startsWith('/')) return `file://${encode(slashed)}`;
  return encode(slashed);
}

/** `not-saturated` → `NotSaturated` (SARIF's `name` is an identifier-like label, and must differ
 *  from the id: a one-word code gets a second word). */
function ruleName(code: string): string {
  const name = code.split('-').map((w) => w.charAt(0).toUpperCase() + w.slice(1)).join('');
  return name.toLowerCase() === code.toLowerCase() ? `${name}Check` : name;
}
