import { parseArgs } from 'node:util';
import { MC_SAMPLES } from '../core/defaults';

export type Command =
  | { cmd: 'help' } | { cmd: 'version' }
  | { cmd: 'check'; files: string[]; format: 'text' | 'json' | 'sarif'; corners: boolean; mc?: number; seed: number }
  | { cmd: 'fix'; file: string; apply: boolean }
  | { cmd: 'report'; file: string; html: string; mc?: number; seed: number }
  | { cmd: 'sweep'; file: string; mirror: string; vout: { from: number; to: number; step: number }; csv: boolean };

export type Parsed = { ok: true; command: Command } | { ok: false; error: string };

/** Parse argv (without node and script). Wrong command lines are data, not exceptions. */
export function parseCommandLine(argv: string[]): Parsed {
  try {
    return { ok: true, command: parse(argv) };
  } catch (err) {
    return { ok: false, error: (err as Error).message };
  }
}

function parse(argv: string[]): Command {
  if (argv.length === 0 || argv[0] === '--help' || argv[0] === '-h' || argv[0] === 'help') return { cmd: 'help' };
  if (argv[0] === '--version' || argv[0] === '-V') return { cmd: 'version' };
  const [cmd, ...rest] = argv;
  const { values, positionals } = parseArgs({
    args: rest, allowPositionals: true, strict: true,
    options: {
      format: { type: 'string' }, corners: { type: 'boolean' }, mc: { type: 'string' }, seed: { type: 'string' },
      apply: { type: 'boolean' }, 'dry-run': { type: 'boolean' }, html: { type: 'string' },
      mirror: { type: 'string' }, vout: { type: 'string' }, csv: { type: 'boolean' }, help: { type: 'boolean' },
    },
  });
  if (values.help) return { cmd: 'help' };
  const allowed: Record<string, string[]> = {
    check: ['format', 'corners', 'mc', 'seed'], fix: ['apply', 'dry-run'], report: ['html', 'mc', 'seed'],
    sweep: ['mirror', 'vout', 'csv'],
  };
  if (!(cmd in allowed)) throw new Error(`unknown command '${cmd}' (check, fix, report, sweep)`);
  for (const key of Object.keys(values)) {
    if (!allowed[cmd].includes(key)) throw new Error(`option --${key} does not apply to '${cmd}'`);
  }
  if (positionals.length === 0) throw new Error(`'${cmd}' needs a FILE`);
  if (cmd !== 'check' && positionals.length > 1) throw new Error(`'${cmd}' takes one FILE`);
  const file = positionals[0];
  switch (cmd) {
    case 'check': {
      const format = values.format ?? 'text';
      if (format !== 'text' && format !== 'json' && format !== 'sarif') throw new Error(`--format must be text, json or sarif, not '${format}'`);
      const mc = values.mc !== undefined ? samples(values.mc) : undefined;
      const seed = values.seed !== undefined ? positiveInt(values.seed, '--seed', true) : 1;
      return { cmd, files: positionals, format, corners: values.corners ?? false, mc, seed };
    }
    case 'fix':
      return { cmd, file, apply: (values.apply ?? false) && !(values['dry-run'] ?? false) };
    case 'report':
      if (!values.html) throw new Error(`'report' needs --html OUT.html`);
      return { cmd, file, html: values.html, mc: values.mc !== undefined ? samples(values.mc) : undefined,
        seed: values.seed !== undefined ? positiveInt(values.seed, '--seed', true) : 1 };
    default: {
      if (!values.mirror) throw new Error(`'sweep' needs --mirror NAME`);
      if (!values.vout) throw new Error(`'sweep' needs --vout FROM:TO:STEP`);
      return { cmd: 'sweep', file, mirror: values.mirror, vout: voutRange(values.vout), csv: values.csv ?? false };
    }
  }
}

function positiveInt(text: string, flag: string, allowZero = false): number {
  const n = Number(text);
  if (!Number.isInteger(n) || n < (allowZero ? 0 : 1)) throw new Error(`${flag} takes a whole number, not '${text}'`);
  return n;
}

/** Monte Carlo samples per output, bounded as the editor's qpoint.monteCarlo.samples is. */
function samples(text: string): number {
  const n = positiveInt(text, '--mc');
  if (n > MC_SAMPLES.max) throw new Error(`--mc takes at most ${MC_SAMPLES.max} samples per output (as the editor's qpoint.monteCarlo.samples), not '${text}'`);
  return n;
}

function voutRange(text: string): { from: number; to: number; step: number } {
  const parts = text.split(':').map(Number);
  if (parts.length !== 3 || parts.some((x) => !Number.isFinite(x)) || parts[2] <= 0 || parts[1] < parts[0]) {
    throw new Error(`--vout takes FROM:TO:STEP in volts with FROM ≤ TO and STEP > 0, not '${text}'`);
  }
  if ((parts[1] - parts[0]) / parts[2] > 100_000) throw new Error('--vout asks for more than 100000 points');
  return { from: parts[0], to: parts[1], step: parts[2] };
}
