/**
 * The panel's state and how messages change it. Pure: no DOM, no vscode — tested in vitest.
 *
 * The page keeps the last report it was sent, which mirror the designer selected, and the
 * version of the report it shows. Reports for the same file can arrive out of order (a slow
 * analysis finishing after a newer one): the older is dropped. A report for another file
 * replaces the view, keeping the selection when that file has a mirror of the same name.
 */
import type { FileReport } from '../src/core/types';
import { mirrorIndexOfPath } from '../src/core/mirror-at';
import { embedReportJson, parseEmbeddedReport } from '../src/core/report/html';
import { isFileReport, type HostMessage } from '../src/protocol/messages';

export interface PanelState {
  uri?: string;
  /** Version of the shown report; -1 before the first one of this page lifetime. */
  version: number;
  report?: FileReport;
  /** MirrorReport.name of the selected mirror output. */
  selected?: string;
  /** Shown instead of a report (e.g. "Open a bias spec …"), or above a stale one. */
  notice?: string;
  /** The mirrors shown are from an earlier version of the file: the current text has errors
   *  that stop the analysis (a value half typed), and a blank panel would help nobody. */
  stale?: boolean;
}

export const STALE_NOTICE = 'The spec has errors that stop the analysis: the mirrors below are from the last version that solved.';

/** What survives a reload (`setState`/`getState`, and the panel serializer). VS Code keeps it as
 *  JSON, which turns Infinity (an ideal Rout) into null: the report travels as the same tagged
 *  JSON the HTML report embeds. */
export interface PersistedState {
  uri?: string;
  reportJson?: string;
  selected?: string;
  stale?: boolean;
}

export const DEFAULT_NOTICE = 'Open a bias spec (*.bias.yaml, *.bias.yml, *.bias.json) to see its mirrors.';

export const initialState: PanelState = { version: -1, notice: DEFAULT_NOTICE };

export function applyHostMessage(state: PanelState, message: HostMessage): PanelState {
  switch (message.type) {
    case 'report': {
      if (message.uri === state.uri && message.version < state.version) return state;  // out of order
      const last = state.report;
      // A spec error leaves no numbers, or none for the mirror on show when the error is in it
      // (the mirror being edited): keep the last numbers (and where they sit) beside the new
      // findings until it solves again.
      const errors = message.report.findings.filter((f) => f.severity === 'error');
      const shown = last?.mirrors.find((m) => m.name === state.selected);
      const lost = message.report.mirrors.length === 0 || (shown !== undefined &&
        !message.report.mirrors.some((m) => m.name === shown.name || m.mirrorIndex === shown.mirrorIndex) &&
        errors.some((f) => mirrorIndexOfPath(f.path) === shown.mirrorIndex));
      if (message.uri === state.uri && last && last.mirrors.length > 0 && lost && errors.length > 0) {
        // The last numbers include the mirror being edited: it is not "set aside" in this view.
        const { withheld: _aside, ...rest } = message.report;
        const report: FileReport = { ...rest, mirrors: last.mirrors, anchors: last.anchors, title: message.report.title ?? last.title };
        return { uri: message.uri, version: message.version, report, selected: keepSelection(report, state.selected), notice: STALE_NOTICE, stale: true };
      }
      return {
        uri: message.uri,
        version: message.version,
        report: message.report,
        selected: keepSelection(message.report, state.selected),
      };
    }
    case 'clear':
      return { version: state.version, notice: message.message ?? DEFAULT_NOTICE, selected: state.selected };
  }
}

/** Select a mirror output by name; an unknown name leaves the state unchanged. */
export function selectMirror(state: PanelState, name: string): PanelState {
  if (!state.report?.mirrors.some((m) => m.name === name)) return state;
  return { ...state, selected: name };
}

/** The selection after a new report: the same name if it is still there, else the first. */
function keepSelection(report: FileReport, selected: string | undefined): string | undefined {
  if (selected !== undefined && report.mirrors.some((m) => m.name === selected)) return selected;
  return report.mirrors[0]?.name;
}

export function toPersisted(state: PanelState): PersistedState {
  return { uri: state.uri, reportJson: state.report ? embedReportJson(state.report) : undefined, selected: state.selected,
    stale: state.stale };
}

/** State from what `getState()` returned; anything malformed (an older page's state, a
 *  tampered blob) is ignored rather than trusted. Ordering starts afresh: versions belong to
 *  one page lifetime. */
export function fromPersisted(value: unknown): PanelState {
  if (typeof value !== 'object' || value === null) return initialState;
  const v = value as Record<string, unknown>;
  if (typeof v.uri !== 'string' || typeof v.reportJson !== 'string') return initialState;
  let report: unknown;
  try {
    report = parseEmbeddedReport(v.reportJson);
  } catch {
    return initialState;
  }
  if (!isFileReport(report)) return initialState;
  const selected = typeof v.selected === 'string' ? v.selected : undefined;
  const restored: PanelState = { uri: v.uri, version: -1, report, selected: keepSelection(report, selected) };
  return v.stale === true ? { ...restored, stale: true, notice: STALE_NOTICE } : restored;
}
