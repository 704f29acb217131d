/** The extension's settings (package.json `contributes.configuration`), read in one place. */
import * as vscode from 'vscode';
import { DEFAULTS } from '../core/defaults';

export const SECTION = 'qpoint';

export interface Settings {
  /** ms between the last keystroke and the re-analysis. */
  debounceMs: number;
  codeLens: boolean;
  /** V, the margin used when a spec's `limits` sets none. */
  margin: number;
}

function finiteOr(x: unknown, fallback: number, min: number, max: number): number {
  return typeof x === 'number' && Number.isFinite(x) ? Math.min(Math.max(x, min), max) : fallback;
}

export function readSettings(scope?: vscode.Uri): Settings {
  const c = vscode.workspace.getConfiguration(SECTION, scope);
  return {
    debounceMs: finiteOr(c.get('debounceMs'), 120, 0, 10_000),
    codeLens: c.get('codeLens.enabled') !== false,
    margin: finiteOr(c.get('limits.margin'), DEFAULTS.margin, 0, 10),
  };
}
