/** Collects spec findings at the narrowest range, once each. Codes: docs/findings.md. */
import type { Finding, Range, Severity, SpecPath } from '../types';
import { SPEC_LIMITS } from '../defaults';
import { mirrorIndexOfPath } from '../mirror-at';
import type { YamlSourceMap } from './source-map';

/** `mirrors[0].devices.out.w` */
export function formatPath(path: SpecPath): string {
  let s = '';
  for (const seg of path) s += typeof seg === 'number' ? `[${seg}]` : s ? `.${seg}` : seg;
  return s || '(root)';
}

/** Findings of one code past the cap: counted, and the first of them kept for the summary. */
interface Overflow {
  count: number;
  severity: Severity;
  first: { message: string; path: SpecPath; range: Range };
}

/** Where a finding goes: a range, or 'key' for the key at its path (found only if it is listed). */
export type At = Range | 'key';

const RANK: Record<Severity, number> = { error: 0, warning: 1, info: 2 };

/**
 * A did-you-mean that can be applied: `word` replaces the token at `range` (quotes kept). The
 * quick fix is made from it only once re-reading the edited text shows the finding gone
 * (spec/suggestion-fixes.ts).
 */
export interface SpecSuggestion { finding: Finding; range: Range; word: string }

export class FindingSink {
  private readonly kept: Finding[] = [];
  /** Did-you-means of listed findings (one past the cap is only counted, so it has none). */
  readonly suggestions: SpecSuggestion[] = [];
  /** Facts said, by path (JSON): a few per path, so no one huge set of long keys. */
  private readonly seen = new Map<string, Set<string>>();
  private readonly perCode = new Map<string, number>();
  private readonly overflow = new Map<string, Overflow>();
  private errors = 0;
  private readonly errorMirrors = new Set<number>();
  private errorOutsideMirrors = false;
  /** Calls that added to the sink or asked it something: a reader that made none did not depend on it. */
  private asked = 0;

  /**
   * `words` false: a re-read that only asks which findings an edit leaves (a did-you-mean fix's
   * check), whose messages nobody reads, so no did-you-mean is searched for.
   */
  constructor(readonly src: YamlSourceMap, private readonly maxPerCode: number = SPEC_LIMITS.maxFindingsPerCode,
    private readonly words = true) {}

  /**
   * Add a finding. `once` names the fact (e.g. 'missing-key:size'); a second finding with the same
   * fact at the same path is dropped, so the schema and the elaborator never report one thing twice.
   * Past `maxPerCode` findings of one code the rest are only counted (`more-findings`): a file of
   * 40 000 unknown keys would otherwise bury the editor and every report in lines.
   */
  add(severity: Severity, code: string, message: string, path: SpecPath, at?: At, once?: string): Finding | undefined {
    this.asked++;
    const p = JSON.stringify(path);
    const fact = once ?? code;
    let facts = this.seen.get(p);
    if (!facts) this.seen.set(p, facts = new Set());
    else if (facts.has(fact)) return undefined;
    facts.add(fact);
    if (severity === 'error') {
      this.errors++;
      const mirror = mirrorIndexOfPath(path);
      if (mirror !== undefined) this.errorMirrors.add(mirror);
      else this.errorOutsideMirrors = true;
    }
    const n = this.perCode.get(code) ?? 0;
    this.perCode.set(code, n + 1);
    if (n < this.maxPerCode) {
      const f: Finding = { severity, code, message, path, range: this.range(path, at) };
      this.kept.push(f);
      return f;
    }
    const o = this.overflow.get(code);
    if (o) {
      o.count++;
      if (RANK[severity] < RANK[o.severity]) o.severity = severity;
    } else {
      this.overflow.set(code, { count: 1, severity, first: { message, path, range: this.range(path, at) } });
    }
    return undefined;
  }

  /** An error; with `word`, a did-you-mean whose fix writes `word` over the finding's own token. */
  error(code: string, message: string, path: SpecPath, at?: At, once?: string, word?: string): void {
    const f = this.add('error', code, message, path, at, once);
    if (f && word !== undefined) this.suggestions.push({ finding: f, range: f.range, word });
  }

  warning(code: string, message: string, path: SpecPath, at?: At, once?: string): void {
    this.add('warning', code, message, path, at, once);
  }

  private range(path: SpecPath, at: At | undefined): Range {
    return at === 'key' ? this.src.keyOf(path) : at ?? this.src.narrow(path);
  }

  /** The findings: at most `maxPerCode` of each code, then one `more-findings` per code that had
   *  more, at the first one left out. */
  get list(): Finding[] {
    const out = [...this.kept];
    for (const [code, o] of this.overflow) {
      const noun = o.severity === 'error' ? 'errors' : o.severity === 'warning' ? 'warnings' : 'notes';
      out.push({
        severity: o.severity, code: 'more-findings', path: o.first.path, range: o.first.range,
        message: `${o.count} more \`${code}\` ${noun} are not listed (qpoint lists the first ${this.maxPerCode} of each kind); the next one: ${o.first.message}`,
      });
    }
    return out;
  }

  /** True while findings of `code` are still listed (below the cap): what is only counted needs
   *  no costly hint. */
  listing(code: string): boolean {
    this.asked++;
    return (this.perCode.get(code) ?? 0) < this.maxPerCode;
  }

  /** True when a did-you-mean for a finding of `code` is worth its search: the finding is listed
   *  and its message is read. */
  suggesting(code: string): boolean {
    this.asked++;
    return this.words && this.listing(code);
  }

  /** True when a finding with this fact (or, without `once`, any finding) was made at path. */
  has(path: SpecPath, once?: string): boolean {
    this.asked++;
    const facts = this.seen.get(JSON.stringify(path));
    return facts !== undefined && (once === undefined ? facts.size > 0 : facts.has(once));
  }

  /** How many times findings were added or asked about so far (see `asked`). */
  get touches(): number {
    return this.asked;
  }

  get errorCount(): number {
    return this.errors;
  }

  /** File indices of the mirrors that hold errors (listed or counted), in order; undefined when
   *  an error lies outside mirrors. */
  mirrorsInError(): number[] | undefined {
    return this.errorOutsideMirrors ? undefined : [...this.errorMirrors].sort((a, b) => a - b);
  }
}
