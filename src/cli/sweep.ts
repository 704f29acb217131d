import type { Command } from './args';
import type { MirrorOutput } from '../core/types';
import { resolveText } from '../core/resolve';
import { sweepVout } from '../core/analysis/index';
import { escapeControls, formatSI } from '../core/text/format';
import { findingLine } from '../core/report/text';
import { readOne } from './io';
import { readTables } from '../node/tables';

type SweepCommand = Extract<Command, { cmd: 'sweep' }>;

/** Iout and Rout of one mirror output versus Vout. NAME is a mirror, or `bank.output`. The spec
 *  is resolved as `check` resolves it (design targets sized), so both report the same mirror. */
export function runSweep(c: SweepCommand): number {
  const read = readOne(c.file);
  if (!read) return 2;
  const name = read.name;
  const { parsed } = resolveText(read.text, name, { tables: readTables(c.file, read.text) });
  if (!parsed.spec) {
    for (const f of parsed.findings) process.stderr.write(findingLine(name, f) + '\n');
    return 2;
  }
  const spec = parsed.spec;
  const names: string[] = [];
  for (const mirror of spec.mirrors) {
    const outputs: (MirrorOutput | undefined)[] = mirror.kind === 'netlist' ? [undefined] : mirror.outputs;
    for (let j = 0; j < outputs.length; j++) {
      const o = outputs[j];
      const full = !o || o.path.length === 2 ? mirror.name : `${mirror.name}.${o.name}`;
      names.push(full);
      if (full !== c.mirror && !(o && o.name === c.mirror && o.path.length > 2)) continue;
      const points = sweepVout({ spec, mirror, outputIndex: j }, voutGrid(c.vout));
      if (c.csv) {
        process.stdout.write('vout_V,iout_A,rout_ohm,converged\n');
        for (const p of points) process.stdout.write(`${p.vout},${p.iout},${p.rout},${p.converged}\n`);
      } else {
        process.stdout.write(`${escapeControls(full)}: Iout and Rout versus Vout\n${'Vout'.padEnd(10)}${'Iout'.padEnd(12)}Rout\n`);
        for (const p of points) {
          if (!p.converged) {
            process.stdout.write(`${formatSI(p.vout, 'V', 4).padEnd(10)}${'—'.padEnd(12)}—  (no operating point found)\n`);
            continue;
          }
          process.stdout.write(`${formatSI(p.vout, 'V', 4).padEnd(10)}${formatSI(p.iout, 'A', 4).padEnd(12)}${formatSI(p.rout, 'Ω', 3)}\n`);
        }
      }
      return 0;
    }
  }
  process.stderr.write(escapeControls(`qpoint: no mirror '${c.mirror}' in ${name} (there are: ${names.join(', ')})`) + '\n');
  return 2;
}

/** FROM, FROM+STEP, … TO, each rounded to the decimals of FROM and STEP, so 0.1 + 5·0.1 is
 *  the 0.6 it stands for (not 0.6000000000000001) in the solve and in the CSV. */
function voutGrid(v: { from: number; to: number; step: number }): number[] {
  const d = Math.max(decimals(v.from), decimals(v.step));
  const n = Math.floor((v.to - v.from) / v.step + 1e-9) + 1;
  return Array.from({ length: n }, (_, k) => Number((v.from + k * v.step).toFixed(d)));
}

/** Decimal places of a number as JavaScript writes it shortest (0.05 → 2, 1e-7 → 7), at most 15. */
function decimals(x: number): number {
  const [mantissa, exponent] = Math.abs(x).toExponential().split('e');
  const frac = mantissa.split('.')[1]?.length ?? 0;
  return Math.min(15, Math.max(0, frac - Number(exponent)));
}
