/**
 * What a network reports (design §9.3), attached to the measured outputs: feeds / fedBy,
 * intended (root current × each stage's design ratio along the path — a Widlar's law at its
 * intended input), chainError, chainSigma, the linked
 * node's voltage and its headroom; and one NetworkReport per group (root, members, supply
 * currents, power, leaves and the worst of them).
 *
 * chainSigma: a leaf's comes from the joint linearized circuit (network/index.ts); a linked
 * output's compounds its own sigma with its mirror's input: sqrt(chainSigma_in² + sigma²).
 */
import type { MirrorReport, NetworkReport, ResolvedSpec, TemplateMirror } from '../types';
import { designRatio } from '../circuit/templates';
import { mirrorAt } from '../mirror-at';
import { key } from './joint';
import { sinksCurrent } from '../device-types';

export interface NetworkFigures { reports: MirrorReport[]; networks: NetworkReport[] }

/** The network figures of every group of `spec`, added to `reports` themselves (the caller's
 *  own: analyzeSpec's, or copies of them — analyze.ts's carry each output's requirements), which
 *  come back as `reports`. A copy here would be a third of the figures' cost: every copy of a
 *  report made by assignment outgrows V8's fast properties and is kept as a hash table. */
export function attachNetworks(spec: ResolvedSpec, reports: MirrorReport[]): NetworkFigures {
  const nets = spec.networks;
  if (!nets || nets.length === 0) return { reports, networks: [] };
  // Each output's report by (mirror, output), without a key string per look-up.
  let stride = 1;
  for (const r of reports) stride = Math.max(stride, r.outputIndex + 1);
  const byOutput = new Map<number, MirrorReport>();
  for (const r of reports) byOutput.set(r.mirrorIndex * stride + r.outputIndex, r);
  const reportOf = (i: number, j: number): MirrorReport | undefined => (j < stride ? byOutput.get(i * stride + j) : undefined);
  const at = (i: number): TemplateMirror | undefined => { const m = mirrorAt(spec, i); return m && m.kind !== 'netlist' ? m : undefined; };
  const networks: NetworkReport[] = [];
  const T = spec.process.temperature;
  for (const net of nets) {
    const root = at(net.root);
    if (!root) continue;
    const intendedIn = new Map<number, number>([[net.root, net.rootCurrent]]);
    const chainIn = new Map<number, number>([[net.root, 0]]);
    const leaves: string[] = [];
    let worst: { name: string; e: number } | undefined;
    for (const i of net.members) {
      const m = at(i);
      if (!m) continue;
      const fedBy = m.input.kind === 'link' ? m.input : undefined;
      if (fedBy) {
        const up = at(fedBy.mirror);
        const upIn = intendedIn.get(fedBy.mirror) ?? NaN;
        intendedIn.set(i, upIn * (up ? designRatio(up, fedBy.output, upIn, T) ?? 1 : 1));
        chainIn.set(i, reportOf(fedBy.mirror, fedBy.output)?.chainSigma ?? NaN);
      }
      m.outputs.forEach((o, j) => {
        const r = reportOf(i, j);
        if (!r) return;
        r.network = root.name;
        if (fedBy) r.fedBy = reportOf(fedBy.mirror, fedBy.output)?.name ?? fedBy.from;
        const ownIn = intendedIn.get(i) ?? NaN;
        const intended = ownIn * (designRatio(m, j, ownIn, T) ?? NaN);
        if (Number.isFinite(intended)) {
          r.intended = intended;
          if (r.converged && net.converged) r.chainError = r.iout / intended - 1;
        }
        const solved = net.outputs[key(i, j)];
        if (o.feeds !== undefined) {
          const fed = at(o.feeds);
          if (fed) r.feeds = fed.name;
          if (solved?.v !== undefined) {
            r.linkV = solved.v;
            if (Number.isFinite(r.compliance) && !r.noCompliance) r.headroom = sinksCurrent(m.type) ? solved.v - r.compliance : r.compliance - solved.v;
          }
          const up = chainIn.get(i) ?? 0;
          if (r.sigma !== undefined && Number.isFinite(up)) r.chainSigma = Math.sqrt(up * up + r.sigma * r.sigma);
        } else {
          if (solved?.chainSigma !== undefined && net.converged) r.chainSigma = solved.chainSigma;
          leaves.push(r.name);
          if (r.chainError !== undefined && (!worst || Math.abs(r.chainError) > Math.abs(worst.e))) worst = { name: r.name, e: r.chainError };
        }
      });
    }
    const report: NetworkReport = {
      root: root.name, rootIndex: net.root, members: net.members.map((i) => at(i)?.name ?? `mirror ${i + 1}`),
      converged: net.converged, supplyCurrent: net.supplyCurrent, power: net.power, leaves,
    };
    if (worst) report.worstLeaf = worst.name;
    networks.push(report);
  }
  return { reports, networks };
}
