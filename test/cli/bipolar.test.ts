/**
 * Every bipolar kind in both polarities end to end through the CLI (design §10): each solves in
 * forward-active, reports its devices in the bipolar fields, and the text report prints them in
 * their own table (VBE, VCE for NPN; magnitudes for PNP). Check values: docs/references.md §12.
 */
import { describe, expect, it } from 'vitest';
import { useCli } from './harness';

const qpoint = useCli('bipolar');

const KINDS = ['simple', 'cascode', 'wilson', 'wilson-balanced', 'beta-helper', 'widlar'];

function spec(): string {
  const lines = [
    'format: 1',
    'process:',
    '  npn: { is: 1e-16, bf: 100, vaf: 100, ais: 1%, abf: 2% }',
    '  pnp: { is: 1e-16, bf: 50, vaf: 50, ais: 1%, abf: 2% }',
    'supplies: { vdd: 5 }',
    'mirrors:',
  ];
  for (const type of ['npn', 'pnp']) {
    for (const kind of KINDS) {
      lines.push(`  - name: ${kind}_${type}`, `    kind: ${kind}`, `    type: ${type}`, '    input: 50u',
        ...(kind === 'widlar' ? ['    degeneration: 2k'] : []), `    output: { v: ${type === 'npn' ? 3 : 2} }`);
    }
  }
  return lines.join('\n');
}

describe('qpoint check on bipolar mirrors', () => {
  const run = (): { mirrors: Record<string, unknown>[]; findings: { code: string; severity: string }[] } => {
    const r = qpoint(['check', '-', '--format', 'json'], spec());
    expect([0, 1]).toContain(r.code);
    return JSON.parse(r.stdout).files[0];
  };
  it('every kind in both polarities converges with every device forward-active', () => {
    const file = run();
    expect(file.mirrors).toHaveLength(2 * KINDS.length);
    for (const m of file.mirrors) {
      expect(m.converged, String(m.name)).toBe(true);
      for (const d of m.devices as Record<string, unknown>[]) {
        expect(d.region, `${String(m.name)}.${String(d.name)}`).toBe('forward-active');
        expect(d.vce as number).toBeGreaterThan(0.2);    // magnitudes: VEC for a PNP
        expect(d.vbe as number).toBeGreaterThan(0.5);    // the beta helper runs at IB-level currents
      }
      expect(m.sigma as number).toBeGreaterThan(0);
      expect(m.routApprox as number).toBeGreaterThan(0);
    }
    expect(file.findings.filter((f) => f.severity === 'error' && f.code !== 'ratio-error')).toEqual([]);
  });
  it('the text report prints the bipolar table', () => {
    const r = qpoint(['check', '-'], spec());
    expect(r.stdout).toMatch(/device\s+area·m\s+IC\s+IB\s+VBE\s+VCE\s+margin\s+region\s+beta/);
    expect(r.stdout).toContain('widlar_pnp  widlar pnp');
  });
  it('a device in saturation is a not-forward-active error at its line', () => {
    const text = spec().replace('output: { v: 3 }', 'output: { v: 0.1 }');
    const r = qpoint(['check', '-', '--format', 'json'], text);
    expect(r.code).toBe(1);
    const f = JSON.parse(r.stdout).files[0].findings.find((x: { code: string }) => x.code === 'not-forward-active');
    expect(f.message).toContain('`out` is saturated: VCE 100 mV < vcesat 200 mV');
  });
});
