/**
 * Extension-host suite: runs inside a real VS Code (code-server here, VS Code desktop through
 * @vscode/test-electron elsewhere) with the real `vscode` API, on copies of the fixture specs in
 * the workspace folder. The host calls `run()`; a rejected promise is exit code 1.
 *
 * External checks: the Razavi level-1 device D of docs/references.md (set from memory, values
 * computed there from the square law): diode VGS = 1.067 234 V, IOUT at VOUT = 1.5 V =
 * 103.9103 µA, so the ratio error is +3.91 % (§9); VDSsat = VOV = 0.367 V, so VOUT = 0.3 V puts
 * the output device in triode (design §3). Expected finding positions come from the fixtures'
 * FAULT markers: the range is the value that must change (design §6).
 *
 * Results and measurements go to $QPOINT_SUITE_RESULT as JSON; the harness prints them.
 */
import * as vscode from 'vscode';
import { writeFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { Session } from 'node:inspector';
import type { QpointApi } from '../../../src/extension/api';
import { CAUTION as CAUTION_TEXT } from '../../../src/core/text/format';
import { formatSI } from '../../../src/core/text/format';
import { analyzeText } from '../../../src/core/analyze';
import { faultySpecText } from '../../../scripts/spec-texts';
import type { MonteCarloSummary } from '../../../src/extension/monteCarlo';
import type { FileReport } from '../../../src/core/types';

const EXTENSION_ID = 'qpoint-dev.qpoint';
const FINDINGS_DOC = 'https://github.com/qpoint-dev/qpoint/blob/main/docs/findings.md';

interface CheckResult { name: string; ok: boolean; ms: number; detail?: string }
const results: CheckResult[] = [];
const metrics: Record<string, number | number[] | string> = {};

class CheckFailed extends Error {}

function assert(cond: unknown, message: string): asserts cond {
  if (!cond) throw new CheckFailed(message);
}

function near(actual: number, expected: number, relTol: number, what: string): void {
  assert(Math.abs(actual - expected) <= relTol * Math.abs(expected), `${what}: ${actual} is not within ${relTol * 100} % of ${expected}`);
}

async function check(name: string, body: () => Promise<void>): Promise<void> {
  const t0 = Date.now();
  try {
    await body();
    results.push({ name, ok: true, ms: Date.now() - t0 });
  } catch (err) {
    results.push({ name, ok: false, ms: Date.now() - t0, detail: err instanceof Error ? (err.stack ?? err.message) : String(err) });
  }
}

/** Resolve with probe()'s value once it is truthy; re-probe on the given events and every 25 ms. */
function waitFor<T>(what: string, probe: () => T | undefined | false | null, timeoutMs = 20_000,
  events: vscode.Event<unknown>[] = [vscode.languages.onDidChangeDiagnostics]): Promise<T> {
  return new Promise<T>((resolve, reject) => {
    const subs: vscode.Disposable[] = [];
    let done = false;
    const finish = (fn: () => void) => {
      if (done) return;
      done = true;
      clearInterval(poll);
      clearTimeout(deadline);
      for (const s of subs) s.dispose();
      fn();
    };
    const tryProbe = () => {
      try {
        const v = probe();
        if (v) finish(() => resolve(v));
      } catch (e) { finish(() => reject(e)); }
    };
    const poll = setInterval(tryProbe, 25);
    const deadline = setTimeout(() => finish(() => reject(new CheckFailed(`timed out after ${timeoutMs} ms waiting for ${what}`))), timeoutMs);
    for (const ev of events) subs.push(ev(tryProbe));
    tryProbe();
  });
}

function qpointDiagnostics(uri: vscode.Uri): vscode.Diagnostic[] {
  return vscode.languages.getDiagnostics(uri).filter((d) => d.source === 'qpoint');
}

function codeOf(d: vscode.Diagnostic): string | undefined {
  return typeof d.code === 'object' && d.code !== null ? String(d.code.value) : d.code === undefined ? undefined : String(d.code);
}

function hoverText(hovers: vscode.Hover[]): string {
  return hovers.flatMap((h) => h.contents.map((c) => (typeof c === 'string' ? c : 'value' in c ? c.value : ''))).join('\n');
}

/** Position of `needle` on the first line matching `line`, at `offset` characters into it. */
function positionOf(doc: vscode.TextDocument, line: RegExp, needle: string, offset = 0): vscode.Position {
  for (let i = 0; i < doc.lineCount; i++) {
    const text = doc.lineAt(i).text;
    if (line.test(text)) {
      const c = text.indexOf(needle);
      assert(c >= 0, `"${needle}" not on line ${i + 1}: ${text}`);
      return new vscode.Position(i, c + offset);
    }
  }
  throw new CheckFailed(`no line matches ${line}`);
}

function commentsOf(text: string): string[] {
  return text.split('\n').map((l) => l.indexOf('#')).map((c, i) => (c >= 0 ? text.split('\n')[i].slice(c) : '')).filter(Boolean);
}

async function setText(editor: vscode.TextEditor, range: vscode.Range, text: string): Promise<void> {
  const ok = await editor.edit((b) => b.replace(range, text));
  assert(ok, 'editor edit was not applied');
}

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  return s.length % 2 ? s[(s.length - 1) / 2] : (s[s.length / 2 - 1] + s[s.length / 2]) / 2;
}

/** A figure in ms to a tenth. */
function round1(ms: number): number {
  return Math.round(ms * 10) / 10;
}

export async function run(): Promise<void> {
  const folder = vscode.workspace.workspaceFolders?.[0]?.uri;
  const resultFile = process.env.QPOINT_SUITE_RESULT;
  try {
    assert(folder, 'no workspace folder open');
    await suite(folder);
  } catch (err) {
    results.push({ name: 'suite', ok: false, ms: 0, detail: err instanceof Error ? (err.stack ?? err.message) : String(err) });
  }
  if (resultFile) writeFileSync(resultFile, JSON.stringify({ results, metrics }, null, 2));
  for (const r of results) console.log(`${r.ok ? 'ok  ' : 'FAIL'} ${r.name} (${r.ms} ms)${r.detail ? `\n${r.detail}` : ''}`);
  console.log(`qpoint workbench metrics: ${JSON.stringify(metrics)}`);
  const failed = results.filter((r) => !r.ok);
  if (failed.length > 0) throw new Error(`${failed.length} of ${results.length} workbench checks failed: ${failed.map((f) => f.name).join(', ')}`);
}

async function suite(folder: vscode.Uri): Promise<void> {
  const ext = vscode.extensions.getExtension<QpointApi>(EXTENSION_ID);
  assert(ext, `${EXTENSION_ID} is not loaded`);
  const faultyUri = vscode.Uri.joinPath(folder, 'faulty.bias.yaml');
  const dUri = vscode.Uri.joinPath(folder, 'd-check.bias.yaml');
  const jsonUri = vscode.Uri.joinPath(folder, 'unopened.bias.json');
  let api: QpointApi | undefined;
  let faulty: vscode.TextDocument | undefined;

  await check('activation waits for a bias spec (language and commands only)', async () => {
    assert(!ext.isActive, 'qpoint was active before any bias spec was opened');
  });

  await check('opening a spec activates qpoint and shows its diagnostics', async () => {
    const t0 = Date.now();
    faulty = await vscode.workspace.openTextDocument(faultyUri);
    await vscode.window.showTextDocument(faulty);
    await waitFor('diagnostics of faulty.bias.yaml', () => qpointDiagnostics(faultyUri).length > 0);
    metrics.openToFirstDiagnosticsMs = Date.now() - t0;
    assert(faulty.languageId === 'qpoint-bias', `language is ${faulty.languageId}`);
    api = ext.exports;
    assert(api && typeof api.analysisCount === 'function', 'activate() did not return the qpoint API');
    metrics.activationMs = Math.round(api.activationMs * 10) / 10;
    metrics.firstAnalysisInWorkerMs = Math.round(api.lastAnalysisMs());
  });
  if (!api || !faulty) return;
  const qp = api;
  const doc = faulty;

  await check('diagnostic at the FAULT marker: code, narrow range, link, related locations', async () => {
    const marker = positionOf(doc, /# FAULT ratio-error/, '{ m: 3 }', '{ m: '.length);
    const d = qpointDiagnostics(faultyUri).find((x) => codeOf(x) === 'ratio-error');
    assert(d, `no ratio-error diagnostic; got ${qpointDiagnostics(faultyUri).map(codeOf).join(', ')}`);
    assert(d.severity === vscode.DiagnosticSeverity.Error, `severity ${d.severity}`);
    assert(d.range.start.isEqual(marker), `range starts at ${d.range.start.line}:${d.range.start.character}, expected ${marker.line}:${marker.character}`);
    assert(doc.getText(d.range) === '3', `range covers "${doc.getText(d.range)}", expected the value "3"`);
    const target = typeof d.code === 'object' ? d.code.target.toString(true) : '';
    assert(target === `${FINDINGS_DOC}#ratio-error`, `code target ${target}`);
    assert((d.relatedInformation?.length ?? 0) > 0, 'no related information');
    const requireLine = positionOf(doc, /require: \{ ratio: 4, rout: 20M/, 'ratio: 4').line;
    assert(d.relatedInformation!.some((r) => r.location.uri.toString() === faultyUri.toString() && r.location.range.start.line === requireLine),
      'related information does not point at require.ratio');
    // The clean example's other nominal findings are warnings only (no second error). Its
    // corners (ss, ff) fail some checks of their own: those are the engine's, tested below.
    const nominalErrors = qpointDiagnostics(faultyUri).filter((x) => x.severity === vscode.DiagnosticSeverity.Error && !codeOf(x)?.startsWith('corner-'));
    assert(nominalErrors.length === 1, `more than the one deliberate nominal error: ${nominalErrors.map(codeOf).join(', ')}`);
  });

  await check('a typo in one mirror keeps the other mirrors\' diagnostics', async () => {
    const editor = await vscode.window.showTextDocument(doc);
    // Before the fixes below: the ratio-error and the example's warnings are still there.
    const kindAt = positionOf(doc, /^\s+kind: wide-swing\s*$/, 'wide-swing');
    // The mirror's own lines: from its `- name:` to the next mirror's.
    const first = positionOf(doc, /^\s+- name: ws_bias/, 'name').line;
    const next = positionOf(doc, /^\s+- name: wilson_ref/, 'name').line;
    const others = (list: vscode.Diagnostic[]) => list.filter((x) => x.range.start.line < first || x.range.start.line >= next)
      .map((x) => `${codeOf(x)}@${x.range.start.line}`).sort();
    const before = others(qpointDiagnostics(faultyUri));
    assert(before.some((k) => k.startsWith('ratio-error@')), `no ratio-error to keep: ${before.join(', ')}`);
    await setText(editor, new vscode.Range(kindAt, kindAt.translate(0, 'wide-swing'.length)), 'wide-swng');
    try {
      // The diagnostics come from the findings, just before the report: wait for both.
      const err = await waitFor('the typo\'s error and its report', () => qp.lastTiming(faultyUri)?.version === doc.version
        && qp.lastTiming(faultyUri)?.reportAt !== undefined && qpointDiagnostics(faultyUri)
        .find((x) => x.severity === vscode.DiagnosticSeverity.Error && x.range.start.line === kindAt.line),
      20_000, [vscode.languages.onDidChangeDiagnostics, qp.onDidUpdate]);
      assert(doc.getText(err.range) === 'wide-swng', `the error covers "${doc.getText(err.range)}"`);
      const kept = others(qpointDiagnostics(faultyUri).filter((x) => x !== err));
      const lost = before.filter((k) => !kept.includes(k));
      assert(lost.length === 0, `warnings gone while one mirror has a typo: ${lost.join(', ')}`);
      assert(!qp.lastReport(faultyUri)?.mirrors.some((m) => m.name === 'ws_bias'), 'the mirror with the typo was solved');
      assert(qp.lastReport(faultyUri)?.mirrors.some((m) => m.name === 'wilson_ref'), 'the next mirror was not solved');
      // A lens on the mirror's name says why it shows no figures.
      const lenses = await vscode.commands.executeCommand<vscode.CodeLens[]>('vscode.executeCodeLensProvider', faultyUri);
      const aside = lenses.find((l) => l.range.start.line === first && /^not solved/.test(l.command?.title ?? ''));
      assert(aside, `no "not solved" lens on line ${first + 1}: ${lenses.map((l) => `${l.range.start.line}:${l.command?.title}`).join(' | ')}`);
    } finally {
      await setText(editor, new vscode.Range(kindAt, kindAt.translate(0, 'wide-swng'.length)), 'wide-swing');
      // The diagnostics arrive before the report (whose fixes the next check reads; a spec with an
      // error has its fixes withheld): wait for the restored text's report too.
      await waitFor('the typo\'s error to clear and the restored text\'s report', () => qp.lastTiming(faultyUri)?.version === doc.version
        && qp.lastTiming(faultyUri)?.reportAt !== undefined && !qpointDiagnostics(faultyUri)
        .some((x) => x.severity === vscode.DiagnosticSeverity.Error && x.range.start.line === kindAt.line),
      20_000, [vscode.languages.onDidChangeDiagnostics, qp.onDidUpdate]);
    }
  });

  await check('quick fix through WorkspaceEdit clears its diagnostic and keeps comments', async () => {
    const d = qpointDiagnostics(faultyUri).find((x) => codeOf(x) === 'ratio-error');
    assert(d, 'no ratio-error diagnostic');
    // VS Code hands a provider the diagnostics at the requested range; the fixes must be those of
    // the finding behind this diagnostic (same code, same range), and nowhere else.
    const finding = qp.lastReport(faultyUri)?.findings.find((f) => f.code === 'ratio-error');
    assert(finding?.fixes?.length, 'the report has no fixes for ratio-error');
    const titles = finding.fixes.map((f) => f.title);
    const actions = await vscode.commands.executeCommand<vscode.CodeAction[]>('vscode.executeCodeActionProvider', faultyUri, d.range, vscode.CodeActionKind.QuickFix.value);
    const mine = actions.filter((a) => titles.includes(a.title));
    assert(mine.length === titles.length, `quick fixes ${actions.map((a) => a.title).join(' | ')}; expected ${titles.join(' | ')}`);
    assert(mine.every((a) => a.kind?.value === 'quickfix'), 'not all quick fixes have kind quickfix');
    const elsewhere = await vscode.commands.executeCommand<vscode.CodeAction[]>('vscode.executeCodeActionProvider', faultyUri, new vscode.Range(0, 0, 0, 1), vscode.CodeActionKind.QuickFix.value);
    assert(!elsewhere.some((a) => titles.includes(a.title)), 'the fixes are offered away from their diagnostic');
    const preferred = mine.filter((a) => a.isPreferred);
    assert(preferred.length === 1 && preferred[0].title === finding.fixes.find((f) => f.preferred)?.title, `${preferred.length} preferred fixes`);
    assert(preferred[0].edit, 'preferred fix has no edit');
    const before = doc.getText();
    const version = doc.version;
    assert(await vscode.workspace.applyEdit(preferred[0].edit), 'applyEdit failed');
    await waitFor('ratio-error to clear after the fix', () => doc.version > version && qp.lastReport(faultyUri) !== undefined
      && !qpointDiagnostics(faultyUri).some((x) => codeOf(x) === 'ratio-error'), 20_000, [vscode.languages.onDidChangeDiagnostics, qp.onDidUpdate]);
    const lost = commentsOf(before).filter((c) => !doc.getText().includes(c));
    assert(lost.length === 0, `comments lost: ${lost.join(' / ')}`);
    metrics.quickFix = preferred[0].title;
  });

  await check('fix-all source action and command apply the preferred fixes', async () => {
    const before = qpointDiagnostics(faultyUri).length;
    const all = new vscode.Range(0, 0, doc.lineCount, 0);
    const src = await vscode.commands.executeCommand<vscode.CodeAction[]>('vscode.executeCodeActionProvider', faultyUri, all, 'source.fixAll.qpoint');
    const fixAll = src.find((a) => a.kind?.value === 'source.fixAll.qpoint');
    assert(fixAll, `no source.fixAll.qpoint action (got ${src.map((a) => a.kind?.value).join(', ')})`);
    const summary = await vscode.commands.executeCommand<{ applied: number; changed: boolean } | undefined>('qpoint.fixAll');
    assert(summary, 'qpoint.fixAll returned nothing');
    if (summary.applied > 0) {
      assert(summary.changed, 'fixes applied but the text did not change');
      await waitFor('fewer findings after fix-all', () => qpointDiagnostics(faultyUri).length < before, 20_000,
        [vscode.languages.onDidChangeDiagnostics, qp.onDidUpdate]);
    }
    metrics.fixAllApplied = summary.applied;
  });

  let dDoc: vscode.TextDocument | undefined;
  await check('hover shows the operating point of the D device (docs/references.md §9)', async () => {
    dDoc = await vscode.workspace.openTextDocument(dUri);
    await vscode.window.showTextDocument(dDoc);
    const report = await waitFor('report of d-check', () => qp.lastReport(dUri), 20_000, [qp.onDidUpdate]);
    const d = dDoc;
    const out = report.mirrors[0]?.devices.find((x) => x.name === 'out');
    assert(out, 'no device out in the report');
    near(out.id!, 103.9103e-6, 1e-5, 'IOUT at 1.5 V');
    const onKey = hoverText(await vscode.commands.executeCommand<vscode.Hover[]>('vscode.executeHoverProvider', dUri, positionOf(d, /^\s+out:\s*$/, 'out', 1)));
    for (const s of ['Operating point', '| **ID** | 104 µA |', '| **VGS** | 1.07 V |', '| **VDS** | 1.5 V |', '| **VDSsat** | 367 mV |', `| **gm** | ${formatSI(out.gm, 'S')} |`, 'gm/ID', 'IC', CAUTION_TEXT]) {
      assert(onKey.includes(s), `hover on the device key lacks "${s}":\n${onKey}`);
    }
    const onSize = hoverText(await vscode.commands.executeCommand<vscode.Hover[]>('vscode.executeHoverProvider', dUri, positionOf(d, /^\s+w: 10u/, '10u', 1)));
    assert(onSize.includes('| **ID** | 104 µA |'), `hover on the size value inside the device lacks the table:\n${onSize}`);
    const onName = hoverText(await vscode.commands.executeCommand<vscode.Hover[]>('vscode.executeHoverProvider', dUri, positionOf(d, /- name: copy/, 'copy', 1)));
    for (const s of ['| **Iout** | 104 µA |', '| **error** | +3.91 % |', 'textbook', 'compliance', CAUTION_TEXT]) {
      assert(onName.includes(s), `hover on the mirror name lacks "${s}":\n${onName}`);
    }
  });

  await check('CodeLens above each mirror: Iout, error, Rout, compliance', async () => {
    assert(dDoc, 'd-check not open');
    const lenses = await vscode.commands.executeCommand<vscode.CodeLens[]>('vscode.executeCodeLensProvider', dUri);
    const titles = lenses.map((l) => l.command?.title ?? '');
    assert(lenses.length === 1, `${lenses.length} lenses: ${titles.join(' | ')}`);
    assert(titles[0].startsWith('Iout 104 µA · error +3.91 % · Rout '), `lens title: ${titles[0]}`);
    assert(lenses[0].range.start.line === positionOf(dDoc, /- name: copy/, 'copy').line, 'lens not at the mirror');
    const bank = await vscode.commands.executeCommand<vscode.CodeLens[]>('vscode.executeCodeLensProvider', faultyUri);
    const bankTitles = bank.map((l) => l.command?.title ?? '');
    assert(bankTitles.includes('tail: bias bank of 3 outputs'), `bank lens missing: ${bankTitles.join(' | ')}`);
    // 7 mirrors, the bank adds its 3 outputs.
    assert(bank.length === 10, `${bank.length} lenses in the example`);
  });

  await check('live re-check after edits; keystroke → diagnostics latency', async () => {
    assert(dDoc, 'd-check not open');
    const d = dDoc;
    const editor = await vscode.window.showTextDocument(d);
    const lat: number[] = [];
    const vLine = positionOf(d, /output: \{ v: 1\.5 \}/, '1.5').line;
    for (let i = 0; i < 6; i++) {
      const low = i % 2 === 0;
      const line = d.lineAt(vLine).text;
      const c = line.indexOf('v: ') + 3;
      const end = line.indexOf(' }', c);
      const t0 = Date.now();
      await setText(editor, new vscode.Range(vLine, c, vLine, end), low ? '0.3' : '1.5');
      // VOUT = 0.3 V < VDSsat = 0.367 V: the output device leaves saturation (design §3).
      await waitFor(`not-saturated to ${low ? 'appear' : 'clear'}`, () =>
        qpointDiagnostics(dUri).some((x) => codeOf(x) === 'not-saturated') === low, 10_000);
      lat.push(Date.now() - t0);
    }
    metrics.keystrokeToDiagnosticsMs = lat;
    metrics.keystrokeToDiagnosticsMedianMs = median(lat);
    // The example (7 mirrors, 9 outputs): time from an edit to its report in the editor.
    const exEditor = await vscode.window.showTextDocument(doc);
    const inLine = positionOf(doc, /^\s+input: 10u\s+# ideal input current/, '10u');
    const exLat: number[] = [];
    for (const value of ['12u', '10u']) {
      const t0 = Date.now();
      await setText(exEditor, new vscode.Range(inLine, inLine.translate(0, 3)), value);
      const version = doc.version;
      await waitFor(`the example's report for input ${value}`, () => {
        const r = qp.lastReport(faultyUri);
        return r && Math.abs((r.mirrors[0]?.iin ?? 0) - Number.parseFloat(value) * 1e-6) < 1e-12 && doc.version === version;
      }, 20_000, [qp.onDidUpdate]);
      exLat.push(Date.now() - t0);
    }
    metrics.exampleEditToReportMs = exLat;
    const count = qp.analysisCount();
    assert(count >= 6, `analysisCount ${count}`);
  });

  await check('the bias panel opens from qpoint.openPanel', async () => {
    await vscode.commands.executeCommand('qpoint.openPanel');
    await waitFor('a qpoint panel tab', () => vscode.window.tabGroups.all.flatMap((g) => g.tabs)
      .some((t) => t.input instanceof vscode.TabInputWebview && t.input.viewType.includes('qpoint.biasPanel')), 10_000,
    [vscode.window.tabGroups.onDidChangeTabs]);
  });

  await variationChecks(folder, qp, doc);
  await networkChecks(folder, qp);

  await check('workspace check finds every spec, also unopened ones (JSON too)', async () => {
    const summary = await vscode.commands.executeCommand<{ files: number; checked: number; errors: number; cancelled: boolean }>('qpoint.checkWorkspace');
    const expected = Number(process.env.QPOINT_EXPECT_SPECS ?? NaN);
    assert(summary && summary.files === expected && summary.checked === expected, `summary ${JSON.stringify(summary)}, expected ${expected} files`);
    assert(!vscode.workspace.textDocuments.some((t) => t.uri.toString() === jsonUri.toString()), 'the JSON spec was opened');
    const diags = qpointDiagnostics(jsonUri);
    assert(diags.some((x) => codeOf(x) === 'not-saturated'), `unopened JSON spec: ${diags.map(codeOf).join(', ')}`);
  });

  await check('a *.bias.json spec opens in the qpoint-bias language with hovers', async () => {
    const json = await vscode.workspace.openTextDocument(jsonUri);
    assert(json.languageId === 'qpoint-bias', `language of the JSON spec is ${json.languageId}`);
    await waitFor('report of the JSON spec', () => qp.lastReport(jsonUri), 20_000, [qp.onDidUpdate]);
    const text = hoverText(await vscode.commands.executeCommand<vscode.Hover[]>('vscode.executeHoverProvider', jsonUri,
      positionOf(json, /"name": "low"/, 'low', 1)));
    assert(text.includes('**Iout**') && text.includes(CAUTION_TEXT), `hover on the JSON mirror name:\n${text}`);
  });

  await check('export writes the self-contained HTML report', async () => {
    await vscode.window.showTextDocument(doc);
    const target = vscode.Uri.joinPath(folder, 'out', 'faulty.report.html');
    const written = await vscode.commands.executeCommand<vscode.Uri | undefined>('qpoint.exportReport', { target });
    assert(written?.toString() === target.toString(), `export returned ${written?.toString()}`);
    const html = new TextDecoder().decode(await vscode.workspace.fs.readFile(target));
    assert(html.startsWith('<!DOCTYPE html>'), 'not an HTML document');
    for (const s of ['tail.lna', 'load_p', 'wilson_ref', '"curve"']) assert(html.includes(s), `report lacks ${s}`);
  });

  await check('closing a spec clears its diagnostics', async () => {
    // Opened through the workbench (not openTextDocument, whose model VS Code keeps alive for
    // minutes after its editor closes), so closing the editor really closes the document.
    const uri = vscode.Uri.joinPath(folder, 'close-me.bias.yaml');
    await vscode.workspace.fs.copy(dUri, uri, { overwrite: true });
    await vscode.commands.executeCommand('vscode.open', uri);
    await waitFor('diagnostics of close-me', () => qpointDiagnostics(uri).length > 0, 15_000);
    await vscode.commands.executeCommand('workbench.action.closeActiveEditor');
    await waitFor('close-me to close', () => vscode.workspace.textDocuments.every((d) => d.uri.toString() !== uri.toString()), 15_000,
      [vscode.workspace.onDidCloseTextDocument]);
    assert(qpointDiagnostics(uri).length === 0, `diagnostics left after close: ${qpointDiagnostics(uri).map(codeOf).join(', ')}`);
  });

  await check('keystroke → report latency on a 500-mirror spec with findings (a reported figure)', async () => {
    // Written after the workspace check, which counts the specs of the folder.
    const uri = vscode.Uri.joinPath(folder, 'large-faulty.bias.yaml');
    await vscode.workspace.fs.writeFile(uri, new TextEncoder().encode(faultySpecText(500)));
    const big = await vscode.workspace.openTextDocument(uri);
    const editor = await vscode.window.showTextDocument(big);
    // A figure, not an assertion: on a machine busy with other work an analysis may run over the
    // worker's budget (analysis-timeout); then that is what is reported.
    const overBudget = (): boolean => qp.lastReport(uri)?.findings.some((f) => f.code === 'analysis-timeout') === true;
    await waitFor('the first report of the 500-mirror spec', () => qp.lastReport(uri)?.mirrors.length === 500 || overBudget(), 120_000, [qp.onDidUpdate]);
    // faultySpecText writes name, kind, type, input: the input is three lines below the name.
    const inputLine = positionOf(big, /^ {2}- name: \S+_250$/, 'name').line + 3;
    assert(big.lineAt(inputLine).text.startsWith('    input: '), `line ${inputLine + 1}: ${big.lineAt(inputLine).text}`);
    const lat: number[] = [];
    const worker: number[] = [];
    // On the extension's own clock (this suite runs in the same extension host): from the
    // analysis asked of the worker once the debounce has passed to the diagnostics set (the
    // worker's analysis with the document's cache, the findings copied back from the thread,
    // turned into diagnostics and handed to VS Code), and to the whole report published; and
    // from the edit to the diagnostics (the debounce, qpoint.debounceMs, included).
    const afterDebounce: number[] = [];
    const reportAfterDebounce: number[] = [];
    const editToDiagnostics: number[] = [];
    // Where the time after the debounce goes: waiting for the worker to begin, the findings
    // crossing back from the thread, and their turning into diagnostics.
    const parts: { queue: number[]; transfer: number[]; convert: number[] } = { queue: [], transfer: [], convert: [] };
    // QPOINT_KEYSTROKE_PROFILE=1: a CPU profile of this extension host over the keystrokes,
    // written beside the results (keystroke500.cpuprofile), to see where the host's time goes.
    const profiler = process.env.QPOINT_KEYSTROKE_PROFILE === '1' ? await startProfile() : undefined;
    for (let i = 0; i < 10 && !overBudget(); i++) {
      const line = big.lineAt(inputLine).text;
      const c = line.indexOf('input: ') + 7;
      const value = 20 + i;
      const t0 = Date.now();
      const edited = performance.now();
      await setText(editor, new vscode.Range(inputLine, c, inputLine, line.indexOf('u', c)), String(value));
      const version = big.version;
      // The ideal input source sets the reference current (KCL): the report of this edit shows it.
      await waitFor(`the report for input ${value}u`, () => {
        const m = qp.lastReport(uri)?.mirrors.find((r) => r.mirrorIndex === 250);
        return (m?.iin !== undefined && Math.abs(m.iin - value * 1e-6) < 1e-12 && big.version === version) || overBudget();
      }, 60_000, [qp.onDidUpdate]);
      if (overBudget()) break;
      lat.push(Date.now() - t0);
      worker.push(qp.lastAnalysisMs());
      const t = qp.lastTiming(uri);
      assert(t?.version === version && t.diagnosticsAt !== undefined && t.reportAt !== undefined, `timing of version ${version}: ${JSON.stringify(t)}`);
      afterDebounce.push(round1(t.diagnosticsAt - t.startedAt));
      reportAfterDebounce.push(round1(t.reportAt - t.startedAt));
      editToDiagnostics.push(round1(t.diagnosticsAt - edited));
      if (t.workerStartedAt !== undefined && t.findingsSentAt !== undefined && t.findingsReceivedAt !== undefined) {
        parts.queue.push(t.workerStartedAt - t.startedAt);
        parts.transfer.push(t.findingsReceivedAt - t.findingsSentAt);
        parts.convert.push(t.diagnosticsAt - t.findingsReceivedAt);
      }
    }
    if (profiler && process.env.QPOINT_SUITE_RESULT) await profiler(join(dirname(process.env.QPOINT_SUITE_RESULT), 'keystroke500.cpuprofile'));
    if (overBudget()) metrics.keystroke500 = 'an analysis ran over the worker budget (a busy machine)';
    metrics.keystroke500ToReportMs = lat;
    metrics.keystroke500WorkerMs = worker.map(round1);
    metrics.keystroke500DiagnosticsAfterDebounceMs = afterDebounce;
    metrics.keystroke500ReportAfterDebounceMs = reportAfterDebounce;
    metrics.keystroke500EditToDiagnosticsMs = editToDiagnostics;
    if (lat.length > 1) {
      // The first keystroke after opening fills the document's cache: the median of the rest.
      metrics.keystroke500ToReportMedianMs = median(lat.slice(1));
      metrics.keystroke500WorkerMedianMs = round1(median(worker.slice(1)));
      metrics.keystroke500DiagnosticsAfterDebounceMedianMs = round1(median(afterDebounce.slice(1)));
      metrics.keystroke500ReportAfterDebounceMedianMs = round1(median(reportAfterDebounce.slice(1)));
      metrics.keystroke500EditToDiagnosticsMedianMs = round1(median(editToDiagnostics.slice(1)));
      if (parts.queue.length > 1) {
        metrics.keystroke500QueueMedianMs = round1(median(parts.queue.slice(1)));
        metrics.keystroke500FindingsTransferMedianMs = round1(median(parts.transfer.slice(1)));
        metrics.keystroke500ToDiagnosticsMedianMs = round1(median(parts.convert.slice(1)));
      }
    }
    await vscode.commands.executeCommand('workbench.action.revertAndCloseActiveEditor');
    await vscode.workspace.fs.delete(uri);
  });
}

/** Starts the V8 profiler of this process (the extension host); the function it returns stops
 *  it and writes the profile to a file (open it in Chromium's DevTools). */
async function startProfile(): Promise<(file: string) => Promise<void>> {
  const session = new Session();
  session.connect();
  const post = (method: string, params?: object): Promise<unknown> =>
    new Promise((resolve, reject) => session.post(method, params ?? {}, (err, res) => (err ? reject(err) : resolve(res))));
  await post('Profiler.enable');
  await post('Profiler.setSamplingInterval', { interval: 100 });
  await post('Profiler.start');
  return async (file) => {
    const { profile } = await post('Profiler.stop') as { profile: unknown };
    writeFileSync(file, JSON.stringify(profile));
    session.disconnect();
  };
}

/** VOV of the D diode (square law with length modulation, design §3) at kp·scale, carrying
 *  100 µA: solves 100 µA = β/2·VOV²·(1 + λ·(VT0 + VOV)) by bisection (the diode has VDS = VGS). */
function dDiodeVov(kpScale: number): number {
  const beta = 134e-6 * kpScale * 10;
  const id = (vov: number) => beta / 2 * vov * vov * (1 + 0.1 * (0.7 + vov));
  let lo = 0, hi = 2;
  for (let i = 0; i < 60; i++) {
    const mid = (lo + hi) / 2;
    if (id(mid) < 100e-6) lo = mid; else hi = mid;
  }
  return (lo + hi) / 2;
}

/** Corners in the live analysis and the Monte Carlo command (corner-check.bias.yaml). */
/** Links (design §9.1) in the editor, on network.bias.yaml: go to definition, references, rename
 *  through the real providers; the hover and the root's lens carry the report's figures. */
async function networkChecks(folder: vscode.Uri, qp: QpointApi): Promise<void> {
  const uri = vscode.Uri.joinPath(folder, 'network.bias.yaml');
  const doc = await vscode.workspace.openTextDocument(uri);
  await vscode.window.showTextDocument(doc);
  const report = await waitFor('report of network.bias.yaml', () => qp.lastReport(uri), 20_000, [qp.onDidUpdate]);

  await check('links: go to definition on a from value jumps to the output it names', async () => {
    const from = positionOf(doc, /from: ref_bank\.p_amp/, 'p_amp', 1);
    const locs = await vscode.commands.executeCommand<(vscode.Location | vscode.LocationLink)[]>('vscode.executeDefinitionProvider', uri, from);
    const target = locs.map((l) => ('targetUri' in l ? l.targetRange : l.range))[0];
    const nameLine = positionOf(doc, /- name: p_amp/, 'p_amp');
    assert(target && target.start.isEqual(nameLine), `definition at ${target?.start.line}:${target?.start.character}, expected ${nameLine.line}:${nameLine.character}`);
    const mirrorDef = await vscode.commands.executeCommand<(vscode.Location | vscode.LocationLink)[]>('vscode.executeDefinitionProvider', uri, positionOf(doc, /from: ref_bank\.p_amp/, 'ref_bank', 1));
    assert(mirrorDef.length === 1, 'no definition from the mirror part of the path');
  });

  await check('links: find references on a mirror lists the from values naming it', async () => {
    const refs = await vscode.commands.executeCommand<vscode.Location[]>('vscode.executeReferenceProvider', uri, positionOf(doc, /- name: ref_bank/, 'ref_bank', 1));
    const texts = refs.map((r) => doc.getText(r.range)).sort();
    assert(texts.join(',') === 'ref_bank,ref_bank.p_adc,ref_bank.p_amp', `references: ${texts.join(', ')}`);
  });

  await check('links: hover on a from value and the network lens carry the report', async () => {
    const up = report.mirrors.find((m) => m.name === 'ref_bank.p_amp');
    assert(up?.linkV !== undefined, 'no linked node voltage in the report');
    const text = hoverText(await vscode.commands.executeCommand<vscode.Hover[]>('vscode.executeHoverProvider', uri, positionOf(doc, /from: ref_bank\.p_amp/, 'p_amp', 1)));
    for (const s of [`| **current that arrives** | ${formatSI(up.iout, 'A')} |`, `| **node voltage** | ${formatSI(up.linkV, 'V')} |`, 'margin of']) {
      assert(text.includes(s), `hover on the link lacks "${s}":\n${text}`);
    }
    const lenses = await vscode.commands.executeCommand<vscode.CodeLens[]>('vscode.executeCodeLensProvider', uri);
    const net = report.networks?.[0];
    const title = lenses.map((l) => l.command?.title ?? '').find((t) => t.startsWith('network of'));
    assert(net && title?.includes(`supply ${formatSI(net.supplyCurrent.vdd, 'A')}`) && title.includes(`worst leaf ${net.worstLeaf}`), `network lens: ${title}`);
  });

  await check('links: rename of a mirror renames its links; an invalid name is refused', async () => {
    const at = positionOf(doc, /- name: amp_bank/, 'amp_bank', 1);
    let refused = '';
    try {
      await vscode.commands.executeCommand<vscode.WorkspaceEdit>('vscode.executeDocumentRenameProvider', uri, at, 'amp.bank');
    } catch (e) { refused = e instanceof Error ? e.message : String(e); }
    assert(refused.includes('a dot separates mirror and output'), `invalid name not refused clearly: "${refused}"`);
    // The fixture's one troubled link (adc_src, link-saturation) is a design finding: the rename
    // must leave the link findings as they were, and never make a link unknown.
    const linkCodes = (r: FileReport | undefined): string => (r?.findings ?? []).filter((f) => f.code.startsWith('link-')).map((f) => f.code).sort().join(', ');
    const before = linkCodes(qp.lastReport(uri));
    const edit = await vscode.commands.executeCommand<vscode.WorkspaceEdit>('vscode.executeDocumentRenameProvider', uri, at, 'ota_bank');
    const edits = edit.get(uri);
    assert(edits.length === 2 && edits.every((e) => doc.getText(e.range) === 'amp_bank'), `rename edits: ${JSON.stringify(edits.map((e) => doc.getText(e.range)))}`);
    assert(await vscode.workspace.applyEdit(edit), 'rename edit not applied');
    assert(doc.getText().includes('- name: ota_bank') && doc.getText().includes('from: ota_bank.cmfb') && !doc.getText().includes('amp_bank'), 'rename did not reach the link');
    const after = await waitFor('a report of the renamed spec', () => { const r = qp.lastReport(uri); return r?.mirrors.some((m) => m.name === 'ota_bank.cmfb') ? r : undefined; }, 20_000, [qp.onDidUpdate]);
    assert(before.includes('link-saturation') && linkCodes(after) === before && !after.findings.some((f) => f.code === 'link-unknown'),
      `link findings after the rename: ${linkCodes(after)} (before: ${before})`);
    assert(after.networks?.[0]?.members.includes('ota_bank'), 'the renamed mirror is not in the network');
  });
}

async function variationChecks(folder: vscode.Uri, qp: QpointApi, faulty: vscode.TextDocument): Promise<void> {
  const uri = vscode.Uri.joinPath(folder, 'corner-check.bias.yaml');
  const isCornerDiag = (x: vscode.Diagnostic) => codeOf(x) === 'corner-not-saturated';
  let doc: vscode.TextDocument | undefined;

  await check('a failing corner shows as a diagnostic while typing (qpoint.corners.enabled)', async () => {
    doc = await vscode.workspace.openTextDocument(uri);
    await vscode.window.showTextDocument(doc);
    const d = await waitFor('corner-not-saturated on corner-check', () => qpointDiagnostics(uri).find(isCornerDiag));
    // The engine on the same text and options gives the message the editor must show.
    const expected = analyzeText(doc.getText(), vscode.workspace.asRelativePath(uri, false), { corners: true, limitsDefaults: { margin: 0.1 } })
      .findings.find((f) => f.code === 'corner-not-saturated');
    assert(expected, 'the engine finds no corner-not-saturated on the fixture');
    assert(d.message === expected.message, `message "${d.message}", engine "${expected.message}"`);
    assert(d.severity === vscode.DiagnosticSeverity.Error, `severity ${d.severity}`);
    // Its range is the device key that must change: `out` on the devices line.
    assert(doc.getText(d.range) === 'out', `range covers "${doc.getText(d.range)}"`);
    assert(d.range.start.line === positionOf(doc, /^\s+out: \{ m: 1 \}/, 'out').line, 'not on the out device');
    // Derivation: at the slow corner kp is ×0.6, so VOV = dDiodeVov(0.6) ≈ 0.474 V and `out`
    // held at 0.45 V has margin 0.45 V − VOV (square law; ref is a diode, no gate current).
    const margin = 0.45 - dDiodeVov(0.6);
    const shown = /margin -([\d.]+) mV/.exec(d.message);
    assert(shown, `no margin in "${d.message}"`);
    near(-Number(shown[1]) * 1e-3, margin, 0.02, 'corner margin (square law)');
    const report = qp.lastReport(uri);
    assert(report?.mirrors[0]?.corners?.length === 1 && report.mirrors[0].corners[0].name === 'slow', 'no corner results in the report');
    metrics.cornerMarginMv = Math.round(margin * 1e4) / 10;
  });

  await check('turning qpoint.corners.enabled off drops the corner findings, on brings them back', async () => {
    const config = vscode.workspace.getConfiguration('qpoint', uri);
    try {
      await config.update('corners.enabled', false, vscode.ConfigurationTarget.Workspace);
      await waitFor('corner findings to clear', () => qpointDiagnostics(uri).length > 0 && !qpointDiagnostics(uri).some(isCornerDiag)
        && qp.lastReport(uri)?.mirrors[0]?.corners === undefined, 20_000, [vscode.languages.onDidChangeDiagnostics, qp.onDidUpdate]);
    } finally {
      await config.update('corners.enabled', undefined, vscode.ConfigurationTarget.Workspace);
    }
    await waitFor('corner findings to return', () => qpointDiagnostics(uri).some(isCornerDiag), 20_000);
  });

  await check('qpoint.runMonteCarlo: mc per output, sigma within 15 % of Pelgrom, same seed same mean, dropped on edit', async () => {
    assert(doc, 'corner-check not open');
    const d = doc;
    await vscode.window.showTextDocument(d);
    const run = async () => {
      const summary = await vscode.commands.executeCommand<MonteCarloSummary | undefined>('qpoint.runMonteCarlo', { uri, samples: 4000, seed: 5 });
      assert(summary && !summary.cancelled && summary.adopted, `summary ${JSON.stringify(summary)}`);
      const m = qp.lastReport(uri)?.mirrors[0];
      assert(m?.mc && m.sigma !== undefined, 'the report has no mc after the command');
      return { m, mc: m.mc, ms: summary.ms };
    };
    const first = await run();
    assert(first.mc.samples === 4000 && first.mc.seed === 5, `samples ${first.mc.samples}, seed ${first.mc.seed}`);
    // Pelgrom/Kinget linearized sigma against the sampled one (mc-nonlinear threshold, 15 %).
    near(first.mc.sigma, first.m.sigma!, 0.15, 'Monte Carlo sigma against the linearized sigma');
    const binned = first.mc.histogram?.counts.reduce((a, b) => a + b, 0) ?? 0;
    assert(binned > 0.9 * 4000 && binned <= 4000, `histogram holds ${binned} of 4000 samples`);
    // The Monte Carlo report still carries the corners and their diagnostic.
    assert(first.m.corners?.length === 1 && qpointDiagnostics(uri).some(isCornerDiag), 'corners lost in the Monte Carlo report');
    const second = await run();
    assert(second.mc.mean === first.mc.mean, `same seed, different mean: ${second.mc.mean} vs ${first.mc.mean}`);
    metrics.monteCarlo4000Ms = second.ms;
    // The next edit hands over to the plain live analysis.
    const editor = await vscode.window.showTextDocument(d);
    const line = positionOf(d, /^title: Corner check/, 'check').line;
    const version = d.version;
    await setText(editor, new vscode.Range(line, d.lineAt(line).text.length, line, d.lineAt(line).text.length), ' ');
    await waitFor('the live report without mc after an edit', () => {
      const r = qp.lastReport(uri);
      return d.version > version && r && r.mirrors[0] && r.mirrors[0].mc === undefined && r.mirrors[0].corners?.length === 1;
    }, 20_000, [qp.onDidUpdate]);
  });

  await check('cancelling a 10⁶-sample run stops its thread long before it would finish; a newer run supersedes an older one', async () => {
    await vscode.window.showTextDocument(faulty);
    const cts = new vscode.CancellationTokenSource();
    // 10⁶ samples × 9 outputs of the example: many seconds of work.
    const long = vscode.commands.executeCommand<MonteCarloSummary | undefined>('qpoint.runMonteCarlo', { uri: faulty.uri, samples: 1_000_000, seed: 1, token: cts.token });
    await waitFor('the Monte Carlo thread to start', () => qp.monteCarloBusy(), 10_000, []);
    await waitFor('the worker to report samples', () => (qp.monteCarloProgress()?.done ?? 0) > 0, 10_000, []);
    const t0 = Date.now();
    cts.cancel();
    const summary = await long;
    const stopMs = Date.now() - t0;
    assert(summary?.cancelled === true && !summary.adopted, `summary ${JSON.stringify(summary)}`);
    // The bar was determinate: samples done of 10⁶ per output, heard while it ran.
    const heard = summary.progress;
    assert(heard && heard.total >= 1_000_000 && heard.total % 1_000_000 === 0 && heard.done > 0 && heard.done < heard.total,
      `progress ${JSON.stringify(heard)}`);
    metrics.monteCarloSamplesBeforeCancel = heard.done;
    assert(!qp.monteCarloBusy(), 'the Monte Carlo thread still computes');
    assert(qp.lastReport(faulty.uri)?.mirrors.every((m) => m.mc === undefined), 'a cancelled run left mc in the report');
    metrics.monteCarloCancelMs = stopMs;  // recorded, not asserted: no wall-clock test
    cts.dispose();

    const older = vscode.commands.executeCommand<MonteCarloSummary | undefined>('qpoint.runMonteCarlo', { uri: faulty.uri, samples: 1_000_000, seed: 1 });
    await waitFor('the older run to start', () => qp.monteCarloBusy(), 10_000, []);
    const newer = await vscode.commands.executeCommand<MonteCarloSummary | undefined>('qpoint.runMonteCarlo', { uri, samples: 500, seed: 2 });
    const old = await older;
    assert(old?.cancelled === true, `older run ${JSON.stringify(old)}`);
    assert(newer?.adopted === true && qp.lastReport(uri)?.mirrors[0]?.mc?.samples === 500, `newer run ${JSON.stringify(newer)}`);
  });
}
