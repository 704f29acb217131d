import type { Command } from './args';
import type { MirrorOutput } from '../core/types';
import { parseSpec } from '../core/spec/index';
import { sweepVout } from '../core/analysis/index';
import { formatSI } from '../core/text/format';
import { findingLine } from '../core/report/text';
import { readOne } from './io';

type SweepCommand = Extract<Command, { cmd: 'sweep' }>;

/** Iout and Rout of one mirror output versus Vout. NAME is a mirror, or `bank.output`. */
export function runSweep(c: SweepCommand): number {
  const read = readOne(c.file);
  if (!read) return 2;
  const name = read.name;
  const parsed = parseSpec(read.text, name);
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
      const { from, to, step } = c.vout;
      const n = Math.floor((to - from) / step + 1e-9) + 1;
      const vouts = Array.from({ length: n }, (_, k) => from + k * step);
      const points = sweepVout({ spec, mirror, outputIndex: j }, vouts);
      if (c.csv) {
        process.stdout.write('vout_V,iout_A,rout_ohm,converged\n');
        for (const p of points) process.stdout.write(`${p.vout},${p.iout},${p.rout},${p.converged}\n`);
      } else {
        process.stdout.write(`${full}: Iout and Rout versus Vout\n${'Vout'.padEnd(10)}${'Iout'.padEnd(12)}Rout\n`);
        for (const p of points) {
          const mark = p.converged ? '' : '  (did not converge)';
          process.stdout.write(`${formatSI(p.vout, 'V', 4).padEnd(10)}${formatSI(p.iout, 'A', 4).padEnd(12)}${formatSI(p.rout, 'Ω', 3)}${mark}\n`);
        }
      }
      return 0;
    }
  }
  process.stderr.write(`qpoint: no mirror '${c.mirror}' in ${name} (there are: ${names.join(', ')})\n`);
  return 2;
}
