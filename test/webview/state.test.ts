// The panel's state logic: ordering of reports, selection across updates, reload state.
import { describe, expect, it } from 'vitest';
import type { FileReport } from '../../src/core/types';
import {
  DEFAULT_NOTICE, STALE_NOTICE, applyHostMessage, fromPersisted, initialState, selectMirror, toPersisted,
} from '../../webview/state';
import { fixtureReport, tailMirror } from './fixtures';

const A = 'file:///a.bias.yaml';
const B = 'file:///b.bias.yaml';

describe('applyHostMessage', () => {
  it('shows the first report and selects its first mirror', () => {
    const s = applyHostMessage(initialState, { type: 'report', uri: A, report: fixtureReport(), version: 1 });
    expect(s.uri).toBe(A);
    expect(s.version).toBe(1);
    expect(s.selected).toBe('tail');
    expect(s.notice).toBeUndefined();
  });

  it('drops a report older than the one shown for the same file', () => {
    const newer = fixtureReport();
    newer.mirrors[0].iout = 5e-5;
    let s = applyHostMessage(initialState, { type: 'report', uri: A, report: newer, version: 5 });
    s = applyHostMessage(s, { type: 'report', uri: A, report: fixtureReport(), version: 4 });
    expect(s.report?.mirrors[0].iout).toBe(5e-5);
    expect(s.version).toBe(5);
  });

  it('takes a report of another file whatever its version', () => {
    let s = applyHostMessage(initialState, { type: 'report', uri: A, report: fixtureReport(), version: 5 });
    s = applyHostMessage(s, { type: 'report', uri: B, report: fixtureReport(), version: 2 });
    expect(s.uri).toBe(B);
  });

  it('keeps the selection while the mirror exists, else falls back to the first', () => {
    let s = applyHostMessage(initialState, { type: 'report', uri: A, report: fixtureReport(), version: 1 });
    s = selectMirror(s, 'load.b');
    s = applyHostMessage(s, { type: 'report', uri: A, report: fixtureReport(), version: 2 });
    expect(s.selected).toBe('load.b');
    const renamed = fixtureReport();
    renamed.mirrors = [tailMirror({ name: 'bias' })];
    renamed.findings = renamed.findings.filter((f) => f.path[1] !== 1);  // no mirror 1 left to have findings
    s = applyHostMessage(s, { type: 'report', uri: A, report: renamed, version: 3 });
    expect(s.selected).toBe('bias');
  });

  it('clears to a notice and keeps the version for ordering', () => {
    let s = applyHostMessage(initialState, { type: 'report', uri: A, report: fixtureReport(), version: 4 });
    s = applyHostMessage(s, { type: 'clear', message: 'closed' });
    expect(s.report).toBeUndefined();
    expect(s.notice).toBe('closed');
    expect(s.version).toBe(4);
    expect(applyHostMessage(s, { type: 'clear' }).notice).toBe(DEFAULT_NOTICE);
  });
});

describe('a spec that stops solving while it is typed', () => {
  const broken = (): FileReport => ({
    file: 'a', parsed: true, mirrors: [], anchors: [],
    findings: [{ severity: 'error', code: 'non-positive', message: '`input` must be greater than 0; got 0', path: ['mirrors', 0, 'input'],
      range: { start: { line: 68, character: 11 }, end: { line: 68, character: 12 } } }],
  });

  it('keeps the last mirrors, marked stale, beside the new findings', () => {
    let s = applyHostMessage(initialState, { type: 'report', uri: A, report: fixtureReport(), version: 1 });
    s = selectMirror(s, 'load.a');
    s = applyHostMessage(s, { type: 'report', uri: A, report: broken(), version: 2 });
    expect(s.stale).toBe(true);
    expect(s.notice).toBe(STALE_NOTICE);
    expect(s.report?.mirrors.map((m) => m.name)).toEqual(['tail', 'load.a', 'load.b']);
    expect(s.report?.findings.map((f) => f.code)).toEqual(['non-positive']);
    expect(s.selected).toBe('load.a');
    expect(fromPersisted(JSON.parse(JSON.stringify(toPersisted(s))))).toMatchObject({ stale: true, notice: STALE_NOTICE });
    // Solving again clears the mark.
    s = applyHostMessage(s, { type: 'report', uri: A, report: fixtureReport(), version: 3 });
    expect(s.stale).toBeUndefined();
    expect(s.notice).toBeUndefined();
  });

  it('keeps the last numbers when the mirror on show is the one with the error', () => {
    // The bank `load` (mirror 1) has a spec error and is left out; `tail` still solves.
    const partial = (): FileReport => ({ ...fixtureReport(), mirrors: fixtureReport().mirrors.filter((m) => m.path[1] !== 1),
      findings: [{ ...broken().findings[0]!, path: ['mirrors', 1, 'input'] }] });
    let s = applyHostMessage(initialState, { type: 'report', uri: A, report: fixtureReport(), version: 1 });
    s = applyHostMessage(selectMirror(s, 'load.a'), { type: 'report', uri: A, report: partial(), version: 2 });
    expect(s.stale).toBe(true);
    expect(s.selected).toBe('load.a');
    expect(s.report?.mirrors.map((m) => m.name)).toEqual(['tail', 'load.a', 'load.b']);
    // With another mirror on show, the partial report is shown as it is.
    s = applyHostMessage(initialState, { type: 'report', uri: A, report: fixtureReport(), version: 1 });
    s = applyHostMessage(selectMirror(s, 'tail'), { type: 'report', uri: A, report: partial(), version: 2 });
    expect(s.stale).toBeUndefined();
    expect(s.report?.mirrors.map((m) => m.name)).toEqual(['tail']);
  });

  it('shows a broken file as it is when nothing solved before, or for another file', () => {
    const first = applyHostMessage(initialState, { type: 'report', uri: A, report: broken(), version: 1 });
    expect(first.stale).toBeUndefined();
    expect(first.report?.mirrors).toEqual([]);
    const other = applyHostMessage(applyHostMessage(initialState, { type: 'report', uri: A, report: fixtureReport(), version: 1 }),
      { type: 'report', uri: B, report: broken(), version: 2 });
    expect(other.stale).toBeUndefined();
    expect(other.report?.mirrors).toEqual([]);
  });
});

describe('selectMirror', () => {
  it('ignores unknown names and a missing report', () => {
    const s = applyHostMessage(initialState, { type: 'report', uri: A, report: fixtureReport(), version: 1 });
    expect(selectMirror(s, 'nope')).toBe(s);
    expect(selectMirror(initialState, 'tail')).toBe(initialState);
  });
});

describe('persisted state', () => {
  it('round-trips through getState/setState as JSON, keeping Infinity and NaN', () => {
    const report = fixtureReport();
    report.mirrors[0].rout = Infinity;
    report.mirrors[0].sigma = Number.NaN;
    let s = applyHostMessage(initialState, { type: 'report', uri: A, report, version: 9 });
    s = selectMirror(s, 'load.a');
    const restored = fromPersisted(JSON.parse(JSON.stringify(toPersisted(s))));  // VS Code stores state as JSON
    expect(restored.uri).toBe(A);
    expect(restored.selected).toBe('load.a');
    expect(restored.report?.mirrors[0].rout).toBe(Infinity);
    expect(restored.report?.mirrors[0].sigma).toBeNaN();
    // Versions belong to one page lifetime: a restored page takes the host's next report.
    expect(restored.version).toBe(-1);
    expect(applyHostMessage(restored, { type: 'report', uri: A, report: fixtureReport(), version: 1 }).version).toBe(1);
  });

  it.each([
    ['undefined', undefined],
    ['a number', 3],
    ['no uri', { reportJson: JSON.stringify(fixtureReport()) }],
    ['a report object instead of its JSON', { uri: A, report: fixtureReport() }],
    ['JSON that does not parse', { uri: A, reportJson: '{"file":' }],
    ['a malformed report', { uri: A, reportJson: JSON.stringify({ file: 'x', mirrors: 'none' }) }],
  ])('ignores %s', (_name, v) => {
    expect(fromPersisted(v)).toEqual(initialState);
  });

  it('drops a stale selection on restore', () => {
    expect(fromPersisted({ uri: A, reportJson: JSON.stringify(fixtureReport()), selected: 'gone' }).selected).toBe('tail');
  });
});
