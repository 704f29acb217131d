/** Collects spec findings at the narrowest range, once each. Codes: docs/findings.md. */
import type { Finding, Range, Severity, SpecPath } from '../types';
import type { YamlSourceMap } from './source-map';

/** `mirrors[0].devices.out.w` */
export function formatPath(path: SpecPath): string {
  let s = '';
  for (const seg of path) s += typeof seg === 'number' ? `[${seg}]` : s ? `.${seg}` : seg;
  return s || '(root)';
}

/**
 * A did-you-mean that can be applied: `word` replaces the token at `range` (quotes kept). The
 * quick fix is made from it only once re-reading the edited text shows the finding gone
 * (spec/suggestion-fixes.ts).
 */
export interface SpecSuggestion { finding: Finding; range: Range; word: string }

export class FindingSink {
  readonly list: Finding[] = [];
  readonly suggestions: SpecSuggestion[] = [];
  private readonly seen = new Set<string>();
  private errors = 0;

  constructor(readonly src: YamlSourceMap) {}

  /**
   * Add a finding. `once` names the fact (e.g. 'missing-key:size'); a second finding with the same
   * fact at the same path is dropped, so the schema and the elaborator never report one thing twice.
   */
  add(severity: Severity, code: string, message: string, path: SpecPath, range?: Range, once?: string): Finding | undefined {
    const key = `${once ?? code}@${JSON.stringify(path)}`;
    if (this.seen.has(key)) return undefined;
    this.seen.add(key);
    if (severity === 'error') this.errors++;
    const f: Finding = { severity, code, message, path, range: range ?? this.src.narrow(path) };
    this.list.push(f);
    return f;
  }

  /** An error whose fix is a replacement word for its own token (a did-you-mean), if `word` is given. */
  error(code: string, message: string, path: SpecPath, range?: Range, once?: string, word?: string): void {
    const f = this.add('error', code, message, path, range, once);
    if (f && word !== undefined) this.suggestions.push({ finding: f, range: f.range, word });
  }

  warning(code: string, message: string, path: SpecPath, range?: Range, once?: string): void {
    this.add('warning', code, message, path, range, once);
  }

  /** True when a finding with this fact (or, without `once`, any finding) was made at path. */
  has(path: SpecPath, once?: string): boolean {
    const p = JSON.stringify(path);
    if (once) return this.seen.has(`${once}@${p}`);
    for (const k of this.seen) if (k.endsWith(`@${p}`)) return true;
    return false;
  }

  get errorCount(): number {
    return this.errors;
  }
}
