/**
 * Process corners: a named set of parameter shifts, a temperature and supplies (spec `corners:`),
 * applied to the resolved spec and solved by the same engine as the nominal point.
 *
 * Conventions (spec format, `corners:`):
 * - `{ add }` adds a signed value to the parameter (`vt0: +50m`); PMOS vt0 is stored as the
 *   threshold magnitude, so +50 mV raises |VT| of either type — a slow corner is `+` for both.
 * - `{ scale }` multiplies by (1 + scale) (`kp: -10%` → kp·0.9).
 * - `temperature`, `vdd`, `vss` replace the nominal values; `tnom` never changes, so kp(T) and
 *   VT0(T) move from the corner's parameters as at the nominal point.
 * - Output voltages, requirements and a given wide-swing `vbias` are absolute and stay put. A
 *   `vbias` that qpoint picks is picked again at each corner by the same rule (the reference at
 *   VDSsat + limits.margin): it models a bias generator that tracks the process.
 */
import type { CornerResult, CornerSpec, DeviceParams, NumericParam, ParamDelta, ResolvedSpec } from '../types';
import { measureMirror } from '../analysis/index';
import { mirrorAt } from '../mirror-at';
import { solveNetworks } from '../network/index';

/** Corner specs with their linked groups re-solved, per spec and corner: every output of a
 *  network sees the same corner solution of the whole group (design §9.1). */
const cornerSpecs = new WeakMap<ResolvedSpec, Map<CornerSpec, ResolvedSpec>>();

function cornerSpec(spec: ResolvedSpec, corner: CornerSpec): ResolvedSpec {
  if (!spec.networks) return applyCorner(spec, corner);
  let byCorner = cornerSpecs.get(spec);
  if (!byCorner) cornerSpecs.set(spec, byCorner = new Map());
  let cs = byCorner.get(corner);
  if (!cs) byCorner.set(corner, cs = solveNetworks(applyCorner(spec, corner), undefined, { chainSigma: false }));
  return cs;
}


function applyDelta(value: number, delta: ParamDelta): number {
  return 'add' in delta ? value + delta.add : value * (1 + delta.scale);
}

function shiftParams(p: DeviceParams, deltas: CornerSpec['nmos'], table: DeviceParams['table']): DeviceParams {
  const out: DeviceParams = { ...p };
  if (table) out.table = table;
  for (const key of Object.keys(deltas) as NumericParam[]) {
    const delta = deltas[key];
    const value = out[key];
    // A parameter the process leaves unset (e.g. lref, avt) has nothing to shift.
    if (delta === undefined || value === undefined) continue;
    out[key] = applyDelta(value, delta);
  }
  return out;
}

/** Apply one corner to a spec: signed deltas add, percentages scale (kp·(1 + scale)); PMOS vt0 is
 *  the magnitude (+50m raises |VT|); temperature, vdd, vss replace; T_nom unchanged. */
export function applyCorner(spec: ResolvedSpec, corner: CornerSpec): ResolvedSpec {
  return {
    ...spec,
    process: {
      ...spec.process,
      temperature: corner.temperature ?? spec.process.temperature,
      nmos: shiftParams(spec.process.nmos, corner.nmos, corner.tables?.nmos),
      pmos: shiftParams(spec.process.pmos, corner.pmos, corner.tables?.pmos),
      ...(corner.resistors ? { resistors: corner.resistors } : {}),
      // A corner's nmos/pmos changes move every flavour of that type (a slow corner is slow for
      // thin and thick oxide alike); a corner table replaces the base table only.
      ...(spec.process.devices ? { devices: Object.fromEntries(Object.entries(spec.process.devices).map(([k, f]) =>
        [k, { type: f.type, params: shiftParams(f.params, corner[f.type], undefined) }])) } : {}),
    },
    supplies: { vdd: corner.vdd ?? spec.supplies.vdd, vss: corner.vss ?? spec.supplies.vss },
  };
}

/** Every corner of the spec solved for one output of one mirror, in the order of `corners:`. */
export function runCorners(spec: ResolvedSpec, mirrorIndex: number, outputIndex: number): CornerResult[] {
  const results: CornerResult[] = [];
  if (!mirrorAt(spec, mirrorIndex)) return results;
  for (const corner of spec.corners) {
    const cs = cornerSpec(spec, corner);
    const mirror = mirrorAt(cs, mirrorIndex);
    if (!mirror) continue;
    const r = measureMirror({ spec: cs, mirror, outputIndex }, { drift: false });
    let minMargin: number | undefined;
    let minMarginDevice: string | undefined;
    for (const d of r.devices) {
      if (d.role === 'startup') continue;   // off by design at the operating point
      if (minMargin === undefined || d.margin < minMargin) { minMargin = d.margin; minMarginDevice = d.name; }
    }
    results.push({
      name: corner.name, converged: r.converged,
      iin: r.iin ?? NaN, iout: r.iout, ratio: r.ratio ?? NaN, error: r.error ?? Number.NaN,
      rout: r.rout, compliance: r.compliance, sigma: r.sigma,
      minMargin, minMarginDevice,
    });
  }
  return results;
}
