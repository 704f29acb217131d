/** The extension's settings (package.json `contributes.configuration`), read in one place. */
import * as vscode from 'vscode';
import { DEFAULTS, MC_SAMPLES } from '../core/defaults';
import { MC_SEED_DEFAULT } from './monteCarloText';

const SECTION = 'qpoint';

export interface Settings {
  /** ms between the last keystroke and the re-analysis. */
  debounceMs: number;
  codeLens: boolean;
  /** V, the margin used when a spec's `limits` sets none. */
  margin: number;
  /** Solve the spec's `corners:` in every live analysis. */
  corners: boolean;
  /** Monte Carlo mismatch (command qpoint.runMonteCarlo): samples per output and the seed. */
  monteCarlo: { samples: number; seed: number };
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
    corners: c.get('corners.enabled') !== false,
    monteCarlo: {
      samples: Math.round(finiteOr(c.get('monteCarlo.samples'), MC_SAMPLES.default, MC_SAMPLES.min, MC_SAMPLES.max)),
      seed: Math.round(finiteOr(c.get('monteCarlo.seed'), MC_SEED_DEFAULT, 0, 2 ** 32 - 1)),
    },
  };
}
