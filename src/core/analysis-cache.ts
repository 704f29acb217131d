/**
 * What one file's analyses keep from one to the next (the editor analyses on every keystroke):
 * the solved report of each solve unit (analysis/repeats.ts: a mirror's circuit, the resolved
 * spec but its mirrors — process with its flavours and tables, supplies, limits, params,
 * corners —, the analysis settings, and for a linked mirror every member of its network and the
 * joint solution) and each local fix re-check (rules/verify.ts: the mirror's text before and after
 * the fix, the mirror as resolved with its network, and everything outside the mirrors). Each
 * part is serialised whole (canonical.ts; a table by the digest of its text), so what the spec
 * gains later is in the keys without an edit. A keystroke in one mirror thus solves and
 * re-checks that mirror (and its network) again, and reads the others' results back.
 *
 * Every key holds all that its result depends on, so an analysis with a cache equals one without
 * (test/core/incremental.test.ts). After each analysis the entries it did not use are dropped:
 * the cache holds about one file's worth. One cache serves one document, one analysis at a time.
 */
import { SolvedUnits } from './analysis/repeats';
import { Rechecks } from './rules/verify';
import { ParseCache } from './spec/incremental';
import { MirrorFindings } from './rules/by-mirror';
import { MirrorAnchors } from './anchors';

export class AnalysisCache {
  readonly units = new SolvedUnits();
  readonly rechecks = new Rechecks();
  readonly parses = new ParseCache();
  readonly findings = new MirrorFindings();
  readonly anchors = new MirrorAnchors();

  /** Starts an analysis: what it does not use is dropped by `end`. */
  begin(): void {
    this.units.begin();
    this.rechecks.begin();
    this.parses.begin();
    this.findings.begin();
    this.anchors.begin();
  }

  end(): void {
    this.units.sweep();
    this.rechecks.sweep();
    this.parses.sweep();
    this.findings.sweep();
    this.anchors.sweep();
  }

  /** What the last analysis solved and re-checked, and what it read back. */
  get stats(): { unitsSolved: number; unitsReused: number; rechecksRun: number; rechecksReused: number; textsRead: number; textsSpliced: number; mirrorsChecked: number; mirrorsReused: number } {
    return {
      unitsSolved: this.units.solvedNow, unitsReused: this.units.reusedNow, rechecksRun: this.rechecks.runNow, rechecksReused: this.rechecks.reusedNow,
      textsRead: this.parses.wholeNow, textsSpliced: this.parses.splicedNow,
      mirrorsChecked: this.findings.foundNow, mirrorsReused: this.findings.reusedNow,
    };
  }

  /** Entries held: solved reports, re-checks. */
  get size(): { units: number; rechecks: number; parses: number; findings: number; anchors: number } {
    return { units: this.units.size, rechecks: this.rechecks.size, parses: this.parses.size, findings: this.findings.size, anchors: this.anchors.size };
  }
}
