/**
 * Drift and noise findings (docs/findings.md): each at its exact range, with a verified fix
 * where a size or value fixes it, gone once the fix is applied; and the spec keys' own findings.
 */
import { describe, expect, it } from 'vitest';
import { RULES_BY_CODE } from '../../../src/core/rules/catalog';
import { apply, check, header, owner, preferred, textOf } from '../../rules/helpers';

const FLICKER = ', kf: 1e-25, cox: 8.5m';
/** The Halden header with flicker constants on nmos and an `analysis:` block (lines 0–8). */
function text(lines: string[], analysis = '{ noise: { f: 1k } }'): string {
  const head = header().replace(/( {2}nmos: \{[^}]*)\}/, `$1${FLICKER} }`).replace('mirrors:', `analysis: ${analysis}\nmirrors:`);
  return `${head}\n${lines.join('\n')}\n`;
}

interface Row { name: string; text: string; code: string; at: [number, number, number, string]; fix: boolean; message: RegExp; title?: RegExp }

const rows: Row[] = [
  {
    // Flicker of two 2 µm² devices at 1 kHz (about 11 pA/√Hz) is far above their thermal floor
    // (1.5 pA/√Hz); ×2.3 on W and L (area ×5.3, gm kept) brings it below 5 pA/√Hz.
    name: 'noise-high: flicker-dominated simple mirror, at the mirror (the unit size is shared), area fix',
    text: text(['  - name: quiet', '    kind: simple', '    type: nmos', '    input: 10u', '    size: { w: 2u, l: 1u }', '    output: { v: 0.9 }', '    require: { noise: 5p }']),
    code: 'noise-high', at: [8, 10, 15, 'quiet'], fix: true,
    message: /^quiet: output noise \d+(\.\d+)? pA\/√Hz at 1 kHz is above the required 5 pA\/√Hz; `(ref|out)` carries \d+(\.\d+)? % of it \(flicker: the corner is/,
    title: /^Lengthen the mirror ×\d/,
  },
  {
    name: 'filter-adds-noise: 1 MΩ on the gate line below its pole, at r, the c that fixes it',
    text: text(['  - name: filt', '    kind: simple', '    type: nmos', '    input: 10u', '    size: { w: 20u, l: 10u }', '    filter: { r: 1M, c: 10p }', '    output: { v: 0.9 }'], '{ noise: { f: 100k } }'),
    code: 'filter-adds-noise', at: [13, 17, 19, '1M'], fix: true,
    message: /^filt: the gate filter raises the output noise at 100 kHz from .* to .*: its resistor's noise \(4kT·R\) reaches the output gates below the pole at 15\.9 kHz/,
    title: /^Set the gate filter's c to \d/,
  },
  {
    // Resistor-referenced: S ≈ 1.4 whatever the sizes (references §13 (b)).
    name: 'supply-sensitivity-high: resistor input, at the resistor, no size fixes it',
    text: text(['  - name: rb', '    kind: simple', '    type: nmos', '    input: { resistor: 120k }', '    size: { w: 2u, l: 1u }', '    output: { v: 0.9 }', '    require: { supplySensitivity: 1 }']),
    code: 'supply-sensitivity-high', at: [11, 23, 27, '120k'], fix: false,
    message: /^rb: supply sensitivity \(vdd\/iout\)·∂iout\/∂vdd is 1\.4\d, above the required 1; a resistor from the supply sets the current itself/,
  },
  {
    name: 'tc-high: resistor input drifting -391 ppm/°C (tcv 0, bex -1.5), at the resistor',
    text: text(['  - name: rt', '    kind: simple', '    type: nmos', '    input: { resistor: 120k }', '    size: { w: 2u, l: 1u }', '    output: { v: 0.9 }', '    require: { tc: 100 }']),
    code: 'tc-high', at: [11, 23, 27, '120k'], fix: false,
    message: /^rt: output current drifts -3\d\d ppm\/°C, above the required 100 ppm\/°C/,
  },
];

describe('drift and noise findings: present at the exact range, gone after the preferred fix', () => {
  for (const row of rows) {
    it(row.name, () => {
      const { findings, specErrors } = check(row.text);
      expect(specErrors).toEqual([]);
      const f = findings.find((x) => x.code === row.code);
      expect(f, `${row.code} in ${findings.map((x) => x.code).join(', ')}`).toBeDefined();
      const [line, c0, c1, token] = row.at;
      expect(textOf(row.text, f!.range)).toBe(token);
      expect(f!.range).toEqual({ start: { line, character: c0 }, end: { line, character: c1 } });
      expect(f!.message).toMatch(row.message);
      expect(f!.severity).toBe(RULES_BY_CODE.get(row.code)!.severity);
      const fix = preferred(f!);
      if (!row.fix) { expect(fix).toBeUndefined(); return; }
      expect(fix, 'a verified preferred fix').toBeDefined();
      if (row.title) expect(fix!.title).toMatch(row.title);
      const after = check(apply(row.text, fix!));
      expect(after.findings.filter((x) => x.code === row.code && owner(x) === owner(f!))).toEqual([]);
    });
  }
});
