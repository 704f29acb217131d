/**
 * Device sizes of template mirrors: the mirror `size` is the unit device of every role; per-role
 * `devices` overrides (mirror level, then bank output level) replace only the keys they give.
 * `auto` marks a dimension the sizing pass computes; until then it holds a provisional value
 * (PROVISIONAL_SIZE: l = lref or 1 µm, w = 10·l but at least wmin).
 */
import { DEFAULTS, PROVISIONAL_SIZE } from '../defaults';
import type { BulkTie, DeviceParams, DeviceSize, SpecPath } from '../types';
import { missing, readEnum, readMap } from './read';
import { resolveNumber, resolveValue } from './values';
import type { ValueScope } from './values';

/** What one layer (size, or one `devices` entry) says, with where each dimension was written. */
export interface SizeLayer {
  w?: number | 'auto';
  l?: number | 'auto';
  m?: number;
  bulk?: BulkTie;
  /** Bipolar: emitter-area multiple. */
  area?: number;
  /** Where a w, l or bulk was written (a bipolar device takes none of them). */
  mosPath?: SpecPath;
  /** Where an area was written (a MOSFET takes none). */
  areaPath?: SpecPath;
  wPath?: SpecPath;
  lPath?: SpecPath;
  /** A value was written but could not be read (its finding is made; no "missing" follows). */
  bad?: boolean;
}

export function readSizeLayer(scope: ValueScope, raw: unknown, path: SpecPath): SizeLayer | undefined {
  if (typeof raw === 'string' && raw.trim() === 'auto') return { w: 'auto', l: 'auto', wPath: path, lPath: path };
  const d = readMap(scope.sink, raw, path, 'a mapping { w, l, m, bulk }');
  if (!d) return undefined;
  const layer: SizeLayer = {};
  if (d.w !== undefined) {
    const w = resolveValue(scope, d.w, [...path, 'w'], 'length', { auto: true, positive: true });
    if (w !== undefined) { layer.w = w; layer.wPath = [...path, 'w']; } else layer.bad = true;
  }
  if (d.l !== undefined) {
    const l = resolveValue(scope, d.l, [...path, 'l'], 'length', { auto: true, positive: true });
    if (l !== undefined) { layer.l = l; layer.lPath = [...path, 'l']; } else layer.bad = true;
  }
  if (d.m !== undefined) {
    const m = resolveNumber(scope, d.m, [...path, 'm'], 'plain', { positive: true, integer: true });
    if (m !== undefined) layer.m = m;
  }
  if (d.bulk !== undefined) {
    const b = readEnum<BulkTie>(scope.sink, d.bulk, [...path, 'bulk'], ['rail', 'source']);
    if (b) layer.bulk = b;
  }
  if (d.area !== undefined) {
    layer.areaPath = [...path, 'area'];
    const a = resolveNumber(scope, d.area, [...path, 'area'], 'plain', { positive: true });
    if (a !== undefined) layer.area = a; else layer.bad = true;
  }
  for (const k of ['w', 'l', 'bulk'] as const) if (d[k] !== undefined && !layer.mosPath) layer.mosPath = [...path, k];
  return layer;
}

export interface SizeContext {
  scope: ValueScope;
  params?: DeviceParams;
  /** The mirror has a `design` target. */
  hasDesign: boolean;
  /** Where a missing w/l is reported. */
  sizePath: SpecPath;
}

/** Merge layers (later wins) into a bipolar device's size (area default 1, m), or undefined
 *  (findings made): a w, l or bulk written for it is an error at that key. */
export function buildBipolarSize(ctx: SizeContext, layers: (SizeLayer | undefined)[]): DeviceSize | undefined {
  let area: number = DEFAULTS.area, m: number = DEFAULTS.m;
  for (const layer of layers) {
    if (!layer) continue;
    if (layer.mosPath) {
      ctx.scope.sink.error('bad-value', `a bipolar device is sized by \`area\` (emitter-area multiple) and \`m\`; \`${String(layer.mosPath[layer.mosPath.length - 1])}\` is a MOSFET's`, layer.mosPath, 'key');
      return undefined;
    }
    if (layer.bad) return undefined;
    if (layer.area !== undefined) area = layer.area;
    if (layer.m !== undefined) m = layer.m;
  }
  return { w: 0, l: 0, m, bulk: 'rail', area };
}

/** Merge layers (later wins) into a full size, or undefined (findings made). */
export function buildSize(ctx: SizeContext, layers: (SizeLayer | undefined)[]): DeviceSize | undefined {
  const s: SizeLayer = {};
  for (const layer of layers) {
    if (!layer) continue;
    if (layer.areaPath) {
      ctx.scope.sink.error('bad-value', '`area` sizes a bipolar device (type npn or pnp); a MOSFET is sized by `w`, `l` and `m`', layer.areaPath, 'key');
      return undefined;
    }
    if (layer.bad) return undefined;
    if (layer.w !== undefined) { s.w = layer.w; s.wPath = layer.wPath; }
    if (layer.l !== undefined) { s.l = layer.l; s.lPath = layer.lPath; }
    if (layer.m !== undefined) s.m = layer.m;
    if (layer.bulk !== undefined) s.bulk = layer.bulk;
  }
  if (s.w === undefined || s.l === undefined) {
    if (s.w === undefined) missing(ctx.scope.sink, ctx.sizePath, 'w', ' (width, m)');
    if (s.l === undefined) missing(ctx.scope.sink, ctx.sizePath, 'l', ' (length, m)');
    return undefined;
  }
  const autoW = s.w === 'auto';
  const autoL = s.l === 'auto';
  if ((autoW || autoL) && !ctx.hasDesign) {
    const at = (autoW ? s.wPath : s.lPath) ?? ctx.sizePath;
    ctx.scope.sink.error('auto-without-design', '`auto` sizes need a mirror `design` target: `design: { vov: 0.2 }`, `{ gmid: 12 }` or `{ ic: 5 }`', at);
    return undefined;
  }
  const p = ctx.params;
  const l = autoL ? Math.max(p?.lref ?? PROVISIONAL_SIZE.l, p?.lmin ?? 0) : (s.l as number);
  const w = autoW ? Math.max(PROVISIONAL_SIZE.wOverL * l, p?.wmin ?? 0) : (s.w as number);
  const size: DeviceSize = { w, l, m: s.m ?? DEFAULTS.m, bulk: s.bulk ?? 'rail' };
  if (autoW || autoL) size.auto = { ...(autoW ? { w: true } : {}), ...(autoL ? { l: true } : {}) };
  return size;
}
