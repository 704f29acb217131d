/**
 * The start-up check of a self-biased circuit (design §9.2, §13): `no-startup` when an all-off
 * state is consistent and no start-up element is written; `startup-inactive` when the element
 * does not conduct in that state (the loop can still rest at zero); `startup-leak` when it still
 * carries more than its limit at the operating point, fixed by a longer start-up device (its
 * current there goes as 1/L), verified by re-solving.
 */
import type { ReferenceReport, SpecPath } from '../../types';
import { isBipolarDevice, isBipolarType } from '../../device-types';
import type { Draft, RuleContext } from '../model';
import { draftKey } from '../model';
import { kindRange, valueRange, type Site } from '../sites';
import { replaceValueEdit } from '../../spec/edit';
import { formatValue } from '../size-edits';
import { buildEdits } from '../build-edits';
import { quantizeSize } from '../../sizing/quantize';
import { code, formatPercent, formatSI } from '../../text/format';
import { isTemplateKind, KINDS } from '../../kinds/index';
import { paramsOf } from '../../flavours';

/** Where a start-up size is written: the template's `startup`, or the netlist's first entry. */
function startupPath(site: Site): { path: SpecPath; l: number } | undefined {
  const m = site.mirror;
  if (m.kind === 'netlist') {
    const d = m.startup?.[0];
    // A bipolar start-up device has no length to change.
    return d && !isBipolarDevice(d) ? { path: ['mirrors', site.mirrorIndex, 'startup', d.name], l: d.l } : undefined;
  }
  return m.startup ? { path: ['mirrors', site.mirrorIndex, 'startup'], l: m.startup.l } : undefined;
}

/** Where a template's start-up device sits, for the messages. */
function startupWhere(site: Site): string {
  const m = site.mirror;
  if (!isTemplateKind(m.kind)) return 'a `startup:` device that conducts while every loop device is off';
  const s = KINDS[m.kind].loop?.startup;
  const mos = m.type === 'npn' ? ' nmos' : m.type === 'pnp' ? ' pmos' : '';
  return s ? `\`startup: { w, l }\`, a diode-connected${mos} device from ${code(s.d)} into ${code(s.s)}` : '`startup:`';
}

export function checkStartup(rc: RuleContext, site: Site): Draft[] {
  // The loop belongs to the mirror: check it once, on its first output.
  if (site.outputIndex !== 0) return [];
  const ref: ReferenceReport | undefined = site.report.reference;
  if (!ref) return [];
  const s = ref.startup;
  const i = site.mirrorIndex;
  const drafts: Draft[] = [];
  if (s.zeroState && !s.element) {
    const at = kindRange(rc.parsed, i);
    drafts.push({
      key: draftKey('no-startup', ['mirrors', i]),
      mirrorIndex: i,
      finding: {
        severity: 'error', code: 'no-startup', path: at.path, range: at.range,
        message: `the loop has a zero-current state: with every device off no branch conducts and nothing starts it (the solver finds only the operating point); add ${startupWhere(site)}`,
      },
      plan: function* () {
        // A narrow, long start-up device: it conducts at zero current whatever its size, and a
        // weak one leaks least once the loop runs (the startup-leak check judges that next).
        const m = site.mirror;
        if (m.kind === 'netlist' || !KINDS[m.kind].loop) return;
        // A MOSFET of the mirror's side, in a bipolar reference too (kinds/kind.ts), of the
        // mirror's device flavour where it has one (as circuit/templates.ts builds it).
        const own = m.type === 'nmos' || m.type === 'npn' ? 'nmos' : 'pmos';
        const p = paramsOf(rc.spec.process, own, isBipolarType(m.type) ? undefined : m.device);
        const grid = rc.spec.process.grid;
        const unit = isBipolarType(m.type) ? undefined : m.devices.ref;
        const w = quantizeSize(Math.max(p.wmin ?? 0, (unit?.w ?? 1e-6) / 4), grid, 'up');
        const l = quantizeSize(Math.max(p.lmin ?? 0, 4 * (unit?.l ?? 1e-6)), grid, 'up');
        const parent: SpecPath = ['mirrors', i, 'startup'];
        yield {
          family: 'startup-add',
          build: () => {
            const edits = buildEdits(rc.parsed, [], [
              { parent, key: 'w', text: formatValue('w', w, undefined, rc.json) },
              { parent, key: 'l', text: formatValue('l', l, undefined, rc.json) },
            ], rc.file, rc.fragments);
            return edits ? {
              title: `Add a start-up device (W ${formatSI(w, 'm')}, L ${formatSI(l, 'm')})`, edits, scope: 'mirror', mirrorIndex: i, family: 'startup-add',
            } : undefined;
          },
        };
      },
    });
    return drafts;
  }
  const where = startupPath(site);
  if (s.element && s.conducts === false && where) {
    const at = valueRange(rc.parsed, where.path);
    drafts.push({
      key: draftKey('startup-inactive', ['mirrors', i]),
      mirrorIndex: i,
      finding: {
        severity: 'error', code: 'startup-inactive', path: at.path, range: at.range,
        message: 'the start-up element stays off in the zero-current state, so the loop can still rest at zero current; connect it across a node pair that sits at the rails while the loop is off',
      },
    });
  }
  const leak = s.current, limit = s.limit;
  if (s.element && leak !== undefined && limit !== undefined && leak > limit && where) {
    const lPath = [...where.path, 'l'];
    const at = valueRange(rc.parsed, lPath);
    const share = ref.current > 0 ? ` (${formatPercent(leak / ref.current)} of the loop current)` : '';
    drafts.push({
      key: draftKey('startup-leak', ['mirrors', i]),
      mirrorIndex: i,
      finding: {
        severity: 'warning', code: 'startup-leak', path: at.path, range: at.range,
        message: `the start-up element still carries ${formatSI(leak, 'A')} at the operating point${share}, above its limit ${formatSI(limit, 'A')} (1 % of the smallest loop branch); a longer start-up device, or one that turns off fully there`,
      },
      plan: function* () {
        // Its current at the operating point goes about as W/L; a longer device also lets the
        // loop current fall and its own VGS rise, so the first length tried leaves half the limit
        // and longer ones follow until one verifies.
        for (const margin of [2, 4, 10]) {
          const l = quantizeSize(where.l * (margin * leak) / limit, rc.spec.process.grid, 'up');
          yield {
            family: 'startup-length',
            build: () => {
              const token = rc.parsed.source.text(rc.parsed.source.value(lPath) ?? at.range);
              const edit = replaceValueEdit(rc.parsed, lPath, formatValue('l', l, token, rc.json));
              return edit ? {
                title: `Lengthen the start-up device to L = ${formatSI(l, 'm')}`, edits: [edit], scope: 'mirror', mirrorIndex: i, family: 'startup-length',
              } : undefined;
            },
          };
        }
      },
    });
  }
  return drafts;
}
