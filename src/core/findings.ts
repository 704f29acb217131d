import type { Finding, Severity } from './types';

const RANK: Record<Severity, number> = { error: 0, warning: 1, info: 2 };

/** Findings in reading order (line, column), errors first on the same spot. */
export function sortFindings(findings: Finding[]): Finding[] {
  return [...findings].sort((a, b) =>
    a.range.start.line - b.range.start.line ||
    a.range.start.character - b.range.start.character ||
    RANK[a.severity] - RANK[b.severity] ||
    a.code.localeCompare(b.code));
}

export function countBySeverity(findings: Finding[]): Record<Severity, number> {
  const n: Record<Severity, number> = { error: 0, warning: 0, info: 0 };
  for (const f of findings) n[f.severity]++;
  return n;
}
