/**
 * The schematic as one SVG element tree: the only place that knows how a symbol, a wire or a
 * label looks. The report serialises it (svg.ts), the panel builds it as DOM; both style it
 * with SCHEMATIC_CSS through classes (the panel's CSP allows no inline style), in the theme's
 * own colours. A device short of margin gets a dashed outline and says so in words; a device
 * out of its working region the same in the error colour.
 */
import type { Box, Schematic, SchematicLabel, SchematicPart, SymbolKind } from './model';
import { TEXT } from './symbols';

export interface SvgElement { tag: string; attrs: Record<string, string>; children: (SvgElement | string)[] }

const el = (tag: string, attrs: Record<string, string | number>, ...children: (SvgElement | string)[]): SvgElement =>
  ({ tag, attrs: Object.fromEntries(Object.entries(attrs).map(([k, v]) => [k, String(v)])), children });
const path = (d: string, cls = 'sch-sym'): SvgElement => el('path', { class: cls, d });

/** Each symbol's strokes in its own box (symbols.ts gives the box and pins). IEC/IEEE style:
 *  the arrow on the source (emitter) points out for NMOS/NPN and in for PMOS/PNP. */
const STROKES: Record<SymbolKind, () => SvgElement[]> = {
  nmos: () => [path('M0,28H12M12,16V40M17,14V42M17,18H26V0M17,38H26V56'), path('M25,38L19.5,35L19.5,41Z', 'sch-fill')],
  pmos: () => [path('M0,28H12M12,16V40M17,14V42M17,18H26V0M17,38H26V56'), path('M18,18L23.5,15L23.5,21Z', 'sch-fill')],
  npn: () => [path('M0,28H14M14,16V40M14,22L26,12V0M14,34L26,44V56'), path('M25.4,43.5L18.6,41.7L22.4,37.1Z', 'sch-fill')],
  pnp: () => [path('M0,28H14M14,16V40M14,22L26,12V0M14,34L26,44V56'), path('M15.4,21.1L22.5,18.8L18.7,14.2Z', 'sch-fill')],
  isrc: () => [el('circle', { class: 'sch-sym', cx: 12, cy: 24, r: 10 }), path('M12,0V14M12,34V48M12,17V27'), path('M12,32L8.5,26L15.5,26Z', 'sch-fill')],
  res: () => [path('M12,0V10M12,38V48'), el('rect', { class: 'sch-sym', x: 6, y: 10, width: 12, height: 28 })],
  'held-top': () => [el('circle', { class: 'sch-sym', cx: 6, cy: 5, r: 4 }), path('M6,9V26')],
  'held-bottom': () => [path('M6,0V17'), el('circle', { class: 'sch-sym', cx: 6, cy: 21, r: 4 })],
  'link-top': () => [path('M1,1H13V9L7,14L1,9Z'), path('M7,14V26')],
  'link-bottom': () => [path('M7,0V12'), path('M7,12L13,17V25H1V17Z')],
  'rail-top': () => [path('M0,2H20', 'sch-sym sch-rail'), path('M10,2V14')],
  'rail-bottom': () => [path('M10,0V12'), path('M0,12H20', 'sch-sym sch-rail')],
};

function label(l: SchematicLabel): SvgElement {
  const lines = l.lines.map((line, i) => el('tspan', { x: l.x + 1, y: r1(l.y + 1 + (i + 1) * TEXT.line - 3), ...(i === 0 && l.tone !== 'net' && l.tone !== 'rail' ? { class: 'sch-name' } : {}) }, line));
  return el('text', { class: `sch-label sch-label-${l.tone}`, 'data-box': `${r1(l.x)} ${r1(l.y)} ${r1(l.w)} ${r1(l.h)}` }, ...lines);
}

function symbol(p: SchematicPart): SvgElement {
  return el('g', { transform: `translate(${r1(p.box.x)},${r1(p.box.y)})` }, ...STROKES[p.symbol]());
}

function union(a: Box, b: Box): Box {
  const x = Math.min(a.x, b.x), y = Math.min(a.y, b.y);
  return { x, y, w: Math.max(a.x + a.w, b.x + b.w) - x, h: Math.max(a.y + a.h, b.y + b.h) - y };
}

function device(p: SchematicPart, l: SchematicLabel | undefined): SvgElement {
  const hit = l ? union(p.box, l) : p.box;
  const kids: SvgElement[] = [];
  if (p.tip) kids.push(el('title', {}, p.tip));
  kids.push(el('rect', { class: 'sch-hit', x: r1(hit.x - 2), y: r1(hit.y - 2), width: r1(hit.w + 4), height: r1(hit.h + 4), rx: 3 }));
  if (p.short) kids.push(el('rect', { class: 'sch-outline', x: r1(p.box.x - 3), y: r1(p.box.y + 8), width: r1(p.box.w + 6), height: r1(p.box.h - 16), rx: 4 }));
  kids.push(symbol(p));
  if (l) kids.push(label(l));
  const cls = `sch-device${p.short ? ` sch-short sch-short-${p.short}` : ''}`;
  return el('g', { class: cls, 'data-device': p.device ?? '', role: 'button', tabindex: '0', 'aria-label': p.tip?.split('\n').join(', ') ?? p.device ?? '' }, ...kids);
}

/** The whole drawing. `name` goes into `data-schematic` so tests and scripts find it. */
export function drawSchematic(s: Schematic): SvgElement {
  const deviceLabels = new Map(s.labels.filter((l) => l.device).map((l) => [l.device!, l]));
  const kids: SvgElement[] = [el('title', {}, `Schematic of ${s.name}`)];
  kids.push(el('g', { class: 'sch-wires' }, ...s.wires.map((w) => el('polyline', { class: 'sch-wire', 'data-net': w.net, points: w.points.map((p) => `${p.x},${p.y}`).join(' ') }))));
  kids.push(el('g', { class: 'sch-dots' }, ...s.dots.map((d) => el('circle', { class: 'sch-dot', cx: r1(d.x), cy: r1(d.y), r: 2.5 }))));
  for (const p of s.parts) {
    if (p.device) kids.push(device(p, deviceLabels.get(p.device)));
    else kids.push(el('g', { class: `sch-part sch-${p.symbol}` }, symbol(p)));
  }
  kids.push(el('g', { class: 'sch-labels' }, ...s.labels.filter((l) => !l.device).map(label)));
  return el('svg', {
    xmlns: 'http://www.w3.org/2000/svg', class: 'schematic', 'data-schematic': s.name, role: 'img',
    'aria-label': `Schematic of ${s.name}`, viewBox: `0 0 ${s.width} ${s.height}`, width: s.width, height: s.height,
  }, ...kids);
}

const r1 = (v: number): number => Math.round(v * 10) / 10;

/** The drawing's styles: theme variables only (VS Code's, or the report's own set). */
export const SCHEMATIC_CSS = `
svg.schematic { overflow: visible; max-width: none; }
svg.schematic text { font-family: var(--vscode-editor-font-family, monospace); font-size: ${TEXT.size}px; fill: var(--vscode-editor-foreground, currentColor); }
svg.schematic .sch-name { font-weight: 600; }
svg.schematic .sch-label-net, svg.schematic .sch-label-rail { fill: var(--vscode-descriptionForeground, currentColor); }
svg.schematic .sch-wire, svg.schematic .sch-sym { fill: none; stroke: var(--vscode-editor-foreground, currentColor); stroke-width: 1.3; stroke-linejoin: round; }
svg.schematic .sch-rail { stroke-width: 2.5; }
svg.schematic .sch-fill, svg.schematic .sch-dot { fill: var(--vscode-editor-foreground, currentColor); stroke: none; }
svg.schematic .sch-hit { fill: transparent; stroke: none; }
svg.schematic .sch-outline { fill: none; stroke: var(--vscode-editorWarning-foreground); stroke-width: 1.5; stroke-dasharray: 4 3; }
svg.schematic .sch-short-margin text { fill: var(--vscode-editorWarning-foreground); }
svg.schematic .sch-short-region .sch-outline { stroke: var(--vscode-errorForeground); }
svg.schematic .sch-short-region text { fill: var(--vscode-errorForeground); }
svg.schematic .sch-device { cursor: pointer; outline: none; }
svg.schematic .sch-device:hover .sch-hit, svg.schematic .sch-device:focus-visible .sch-hit { stroke: var(--vscode-focusBorder); stroke-width: 1; }
svg.schematic .sch-device.selected .sch-hit { stroke: var(--vscode-focusBorder); stroke-width: 1.5; }
body.vscode-high-contrast svg.schematic .sch-device:hover .sch-hit { stroke: var(--vscode-contrastActiveBorder, var(--vscode-focusBorder)); }
@media print { svg.schematic { break-inside: avoid; } }
`;
