/**
 * A file's findings in parts, by blocks of mirrors, so the editor hands VS Code only the parts
 * whose diagnostics changed. VS Code converts and serialises a collection's whole list for a
 * file on every `DiagnosticCollection.set` and sends it to the workbench: on a 500-mirror spec
 * (637 diagnostics) that was about 80 ms of the extension host per keystroke, while a keystroke
 * in one mirror changes the findings of that mirror alone (and, when it adds or removes a line,
 * the ranges of the mirrors below it). Pure: no `vscode`, tested without it.
 */
import type { Finding, Range } from '../core/types';
import { mirrorIndexOfPath } from '../core/mirror-at';

/** Mirrors per part. A part is one diagnostic collection: a small spec has one, as before. */
export const MIRRORS_PER_PART = 32;

/** The part a finding belongs to: its mirror's block; findings outside the mirrors in the first. */
export function partOf(f: Pick<Finding, 'path'>): number {
  const i = mirrorIndexOfPath(f.path);
  return i === undefined || i < 0 ? 0 : Math.floor(i / MIRRORS_PER_PART);
}

/** The findings by part, in their order within each part (a part without findings is absent). */
export function splitParts<F extends Pick<Finding, 'path'>>(findings: readonly F[]): F[][] {
  const parts: F[][] = [];
  for (const f of findings) (parts[partOf(f)] ??= []).push(f);
  return parts;
}

/** What to hand VS Code to go from the parts shown to `next`: the parts to set again, those to
 *  clear. A part whose findings give the same diagnostics is left as it is. */
export function changedParts(shown: readonly (readonly Finding[] | undefined)[], next: readonly (readonly Finding[] | undefined)[]): { set: number[]; clear: number[] } {
  const set: number[] = [];
  const clear: number[] = [];
  for (let k = 0; k < Math.max(shown.length, next.length); k++) {
    const was = shown[k];
    const now = next[k];
    if (!now) { if (was) clear.push(k); }
    else if (!was || !sameDiagnostics(was, now)) set.push(k);
  }
  return { set, clear };
}

function sameRange(a: Range, b: Range): boolean {
  return a.start.line === b.start.line && a.start.character === b.start.character
    && a.end.line === b.end.line && a.end.character === b.end.character;
}

/** Two lists of findings give the same diagnostics (what `toDiagnostics` reads of each). */
export function sameDiagnostics(a: readonly Finding[], b: readonly Finding[]): boolean {
  return a.length === b.length && a.every((f, k) => sameFinding(f, b[k]!, false));
}

/** A file's findings as the worker sends them (without their fixes): by part, a part the same as
 *  in the last message of that file `null` (then the receiver reads it from that message). */
export type FindingParts = (Finding[] | null)[];

/** Two findings the same in code, severity, message, ranges and related locations (what a
 *  diagnostic shows), and with `paths` in their spec paths too (what a message carries; never
 *  the fixes). */
function sameFinding(f: Finding, g: Finding, paths: boolean): boolean {
  if (f === g) return true;
  const fr = f.related ?? [];
  const gr = g.related ?? [];
  return f.code === g.code && f.severity === g.severity && f.message === g.message && (!paths || samePath(f.path, g.path)) && sameRange(f.range, g.range)
    && fr.length === gr.length && fr.every((r, j) => r.message === gr[j]!.message && (!paths || samePath(r.path, gr[j]!.path)) && sameRange(r.range, gr[j]!.range));
}

function samePath(a: Finding['path'], b: Finding['path']): boolean {
  return a.length === b.length && a.every((x, k) => x === b[k]);
}

/** `findings` by part, every part (empty ones too), with the parts equal to `last`'s as `null`. */
export function compactParts(findings: readonly Finding[], last: readonly Finding[][] | undefined): { parts: Finding[][]; message: FindingParts } {
  const split = splitParts(findings);
  const parts = Array.from({ length: split.length }, (_, k) => split[k] ?? []);
  const message = parts.map((p, k) => {
    const was = last?.[k];
    return was && was.length === p.length && p.every((f, j) => sameFinding(f, was[j]!, true)) ? null : p;
  });
  return { parts, message };
}

/** The parts a message stands for, given the parts of the last message (`null` parts read from
 *  there); undefined when it needs a part the receiver does not have. */
export function expandParts(message: FindingParts, last: readonly Finding[][] | undefined): Finding[][] | undefined {
  const parts: Finding[][] = [];
  for (let k = 0; k < message.length; k++) {
    const p = message[k] ?? last?.[k];
    if (!p) return undefined;
    parts.push(p);
  }
  return parts;
}

/**
 * The parts of the last findings message of each file, on both sides of the worker's port: the
 * worker remembers what it sent, the host what it received, in the same order, so both forget
 * the same files (the least recently sent beyond `MAX_FILES`) and a `null` part always refers to
 * a message the host still has. A new worker starts both afresh.
 */
export class SentParts {
  static readonly MAX_FILES = 16;
  private readonly last = new Map<string, { seq: number; parts: Finding[][] }>();

  get(key: string): { seq: number; parts: Finding[][] } | undefined {
    return this.last.get(key);
  }

  set(key: string, seq: number, parts: Finding[][]): void {
    this.last.delete(key);
    this.last.set(key, { seq, parts });
    if (this.last.size > SentParts.MAX_FILES) this.last.delete(this.last.keys().next().value!);
  }

  delete(key: string): void {
    this.last.delete(key);
  }

  clear(): void {
    this.last.clear();
  }
}
