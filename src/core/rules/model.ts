/** Internal shapes of the rules pass: a check yields drafts; fixes are planned lazily, then verified. */
import type { Finding, MirrorReport, ResolvedSpec, TextEdit } from '../types';
import type { ParsedSpec } from '../spec/index';
import type { MirrorFragments } from '../spec/fragment';

export interface RuleContext {
  parsed: ParsedSpec;
  spec: ResolvedSpec;
  reports: MirrorReport[];
  /** Verification pass: detect only — no fixes, no solves that only improve a message. */
  quick: boolean;
  /** The file is JSON (inserted values must be JSON). */
  json: boolean;
  /** A file name with the right extension for re-parsing edited text. */
  file: string;
  /**
   * Mirror-by-mirror reading of edited text (spec/fragment.ts): fixes are composed and verified on
   * the edited mirror's lines alone. Absent: every step re-reads the whole text.
   */
  fragments?: MirrorFragments;
}

/** A candidate fix: edits on the original text, and how far its effect reaches. */
export interface FixPlan {
  title: string;
  edits: TextEdit[];
  /** 'mirror': only mirror `mirrorIndex` can change; 'spec': the whole file must be re-checked. */
  scope: 'mirror' | 'spec';
  mirrorIndex: number;
  /** Alternatives of one kind (the same fix at slightly different sizes): only the first verified is offered. */
  family: string;
}

export interface Draft {
  /** Identity across re-checks: code, report path and subject (device, token). */
  key: string;
  finding: Finding;
  mirrorIndex: number;
  /** Candidate fixes, best first, built lazily; only verified ones are offered. */
  plan?: () => Iterable<{ family: string; build: () => FixPlan | undefined }>;
  /** Appended to the message when no verified fix exists ("a cascode would …"). */
  hint?: string;
}

export function draftKey(code: string, path: (string | number)[], subject = ''): string {
  return `${code}|${path.join('/')}|${subject}`;
}

/** The report path segments of a draft key (see draftKey). */
export function keyPath(key: string): string[] {
  return (key.split('|')[1] ?? '').split('/');
}
