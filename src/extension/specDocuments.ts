/** Which documents are bias specs: the qpoint-bias language, or a spec file name in another
 *  language mode (a user may have mapped the files to YAML or JSON). */
import * as vscode from 'vscode';

const LANGUAGE_ID = 'qpoint-bias';
export const SPEC_GLOBS = ['**/*.bias.yaml', '**/*.bias.yml', '**/*.bias.json'] as const;
const SPEC_NAME = /\.bias\.(ya?ml|json)$/i;
/** Read-only views of a file (history, diffs, logs) get no diagnostics of their own. */
const NOT_SOURCES = new Set(['output', 'git', 'vscode-scm', 'vscode-diff']);

export const SPEC_SELECTOR: vscode.DocumentSelector = [
  { language: LANGUAGE_ID },
  ...SPEC_GLOBS.map((pattern) => ({ pattern })),
];

function isSpecName(path: string): boolean {
  return SPEC_NAME.test(path);
}

export function isSpecDocument(doc: vscode.TextDocument): boolean {
  if (NOT_SOURCES.has(doc.uri.scheme)) return false;
  return doc.languageId === LANGUAGE_ID || isSpecName(doc.uri.path);
}
