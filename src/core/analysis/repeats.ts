/**
 * Identical mirrors are solved once per spec. A bias network repeats itself: the same tail
 * source in every channel, the same cascode load in every column. Two mirrors that differ only
 * in their name and place in the file have the same circuit and, within one spec (one process,
 * supply and temperature), the same figures, so the second gets a copy of the first's report
 * with its own identity. A bank's output names stay in the key: they name its devices.
 * The copy shares the first report's devices, nodes and curve: reports are values that nothing
 * changes after analysis.
 */
import { isBank } from '../circuit/templates';
import type { MirrorReport, ResolvedMirror } from '../types';
import { reportIdentity, type ReportIdentity } from './measure';
import type { MirrorContext } from './index';

/** The mirror without what says where it is (paths, its name; an output's name outside a bank). */
function circuitKey(mirror: ResolvedMirror, outputIndex: number, curve: boolean): string {
  const what: Record<string, unknown> = { ...mirror, name: undefined, path: undefined };
  if (mirror.kind !== 'netlist' && Array.isArray(mirror.outputs)) {
    const bank = isBank(mirror);
    what.outputs = mirror.outputs.map((o) => ({ ...o, path: undefined, name: bank ? o.name : undefined }));
  }
  return `${outputIndex}|${curve ? 1 : 0}|${JSON.stringify(what)}`;
}

export class RepeatedMirrors {
  private readonly solved = new Map<string, MirrorReport>();

  constructor(private readonly curve: boolean) {}

  /** The report of ctx: measured by `measure` the first time its circuit is seen, copied after. */
  report(ctx: MirrorContext, measure: () => MirrorReport): MirrorReport {
    const key = circuitKey(ctx.mirror, ctx.outputIndex, this.curve);
    const known = this.solved.get(key);
    if (!known) {
      const r = measure();
      this.solved.set(key, r);
      return r;
    }
    return withIdentity({ ...known }, reportIdentity(ctx));
  }
}

function withIdentity(r: MirrorReport, id: ReportIdentity): MirrorReport {
  r.name = id.name;
  r.mirror = id.mirror;
  r.path = id.path;
  r.mirrorIndex = id.mirrorIndex;
  r.outputIndex = id.outputIndex;
  if (id.output !== undefined) r.output = id.output;
  else delete r.output;
  return r;
}

