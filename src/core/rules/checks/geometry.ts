/** below-lmin / below-wmin: drawn sizes the process cannot make. One finding per written token. */
import type { SpecPath } from '../../types';
import type { Draft, RuleContext } from '../model';
import { draftKey } from '../model';
import { deviceRange, sizeToken, type Site } from '../sites';
import { allDevices, sizeOf, type DeviceRef } from '../../sizing/devices';
import { quantizeSize } from '../../sizing/quantize';
import { setSizePlans } from '../plans';
import { code, formatSI } from '../../text/format';
import { mirrorParams } from '../../flavours';

export function checkGeometry(rc: RuleContext, site: Site): Draft[] {
  // Sizes belong to the mirror: check once per mirror, on its first output.
  if (site.outputIndex !== 0) return [];
  const m = site.mirror;
  const drafts: Draft[] = [];
  for (const key of ['l', 'w'] as const) {
    const groups = new Map<string, { refs: DeviceRef[]; path?: SpecPath; value: number; min: number; type: string }>();
    for (const ref of allDevices(rc.spec, site.mirrorIndex)) {
      const s = sizeOf(rc.spec, ref);
      if (!s || (s.auto && s.auto[key === 'l' ? 'l' : 'w'])) continue;
      const type = m.kind === 'netlist' ? m.devices.find((d) => d.name === ref.role)?.type ?? m.type : m.type;
      if (type !== 'nmos' && type !== 'pmos') continue;   // a bipolar device has an area, no W or L
      const p = mirrorParams(rc.spec.process, m, type);
      const min = key === 'l' ? p.lmin : p.wmin;
      if (min === undefined || s[key] >= min * (1 - 1e-9)) continue;
      const tok = sizeToken(rc.parsed, rc.spec, ref, key);
      const id = tok ? tok.path.join('/') : `${ref.role}/${ref.output ?? ''}`;
      const g = groups.get(id) ?? { refs: [], path: tok?.path, value: s[key], min, type };
      g.refs.push(ref);
      groups.set(id, g);
    }
    for (const [id, g] of groups) {
      const code_ = key === 'l' ? 'below-lmin' : 'below-wmin';
      const at = g.path ? { path: g.path, range: rc.parsed.source.rangeFor(g.path) } : deviceRange(rc.parsed, rc.spec, g.refs[0], [key]);
      const names = g.refs.map((r) => code(r.output !== undefined && m.kind !== 'netlist' && m.outputs.length > 1 ? `${m.outputs[r.output].name}.${r.role}` : r.role));
      const k = g.min / g.value;
      const grid = rc.spec.process.grid;
      drafts.push({
        key: draftKey(code_, ['mirrors', site.mirrorIndex], id),
        mirrorIndex: site.mirrorIndex,
        finding: {
          severity: 'error', code: code_, path: at.path, range: at.range,
          message: `${key === 'l' ? 'L' : 'W'} ${formatSI(g.value, 'm')} of ${names.join(', ')} is below the ${g.type} ${key === 'l' ? 'lmin' : 'wmin'} ${formatSI(g.min, 'm')}`,
        },
        plan: () => setSizePlans(rc, site, () => g.refs.flatMap((ref) => {
          const s = sizeOf(rc.spec, ref)!;
          const other = key === 'l' ? 'w' : 'l';
          return [
            { ref, key, value: quantizeSize(Math.max(g.min, s[key] * k), grid, 'up') },
            { ref, key: other, value: quantizeSize(s[other] * k, grid, 'up') },
          ];
        }), (notes) => `Raise ${key === 'l' ? 'L to lmin' : 'W to wmin'} at constant W/L: ${notes}`, code_),
      });
    }
  }
  return drafts;
}
