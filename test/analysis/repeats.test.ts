/**
 * Identical mirrors are solved once (src/core/analysis/repeats.ts), and network members alike but
 * for what feeds them share their own figures. The check is against the engine solving every
 * mirror on its own (`repeats: false`): same figures, own identity.
 */
import { describe, expect, it } from 'vitest';
import { analyzeSpec } from '../../src/core/analysis/index';
import type { ResolvedMirror, TemplateMirror } from '../../src/core/types';
import { makeSpec, sz, template, type TemplateOptions } from './builders';
import { parseSpec } from '../../src/core/spec/index';
import { provisionalLinks, solveNetworks } from '../../src/core/network/index';
import { networkTreeText } from '../../scripts/spec-texts';

/** A template mirror placed at list index i (paths follow). */
function at(i: number, m: TemplateMirror): ResolvedMirror {
  return {
    ...m, path: ['mirrors', i],
    outputs: m.outputs.map((o, j) => ({ ...o, path: m.outputs.length > 1 || o.path.length > 2 ? ['mirrors', i, 'outputs', j] : ['mirrors', i] })),
  };
}

const cascode = (name: string, o: Partial<TemplateOptions> = {}) => template('cascode', { name, vout: 1.2, input: 20e-6, size: sz(4e-6, 1e-6), ...o });

describe('repeated mirrors', () => {
  const spec = makeSpec([
    at(0, cascode('ch0')),
    at(1, cascode('ch1')),
    at(2, cascode('ch2', { vout: 0.9 })),          // a different output voltage: solved on its own
    at(3, template('wide-swing', { name: 'ws0', vout: 0.8, input: 20e-6 })),
    at(4, template('wide-swing', { name: 'ws1', vout: 0.8, input: 20e-6 })),
    at(5, cascode('ch3')),
  ], { vdd: 1.8 });

  it('give the same figures as solving each mirror on its own', () => {
    // Fresh copies: the wide-swing vbias pick is cached per mirror object (vbias.ts).
    const once = analyzeSpec(structuredClone(spec));
    const each = analyzeSpec(structuredClone(spec), { repeats: false });
    expect(once).toEqual(each);
  });

  it('keep their own name and path, and share the first one\'s solve', () => {
    const r = analyzeSpec(spec);
    expect(r.map((x) => x.name)).toEqual(['ch0', 'ch1', 'ch2', 'ws0', 'ws1', 'ch3']);
    expect(r[5]!.path).toEqual(['mirrors', 5]);
    expect(r[1]).not.toBe(r[0]);
    expect(r[1]!.devices).toBe(r[0]!.devices);       // copied, not re-solved
    expect(r[5]!.devices).toBe(r[0]!.devices);
    expect(r[4]!.devices).toBe(r[3]!.devices);
    expect(r[2]!.devices).not.toBe(r[0]!.devices);   // other vout
    expect(r[2]!.vout).toBe(0.9);
  });

  it('banks with other output names are solved apart (the names name their devices)', () => {
    const bank = (name: string, a: string, b: string, i: number) => at(i, template('cascode', {
      name, vout: 0, input: 20e-6, outputs: [{ name: a, v: 1.2 }, { name: b, v: 1.0, devices: { out: { m: 2 }, outc: { m: 2 } } }],
    }));
    const s = makeSpec([bank('left', 'o1', 'o2', 0), bank('right', 'p1', 'p2', 1), bank('again', 'o1', 'o2', 2)], { vdd: 1.8 });
    const r = analyzeSpec(structuredClone(s));
    expect(r).toEqual(analyzeSpec(structuredClone(s), { repeats: false }));
    expect(r.map((x) => x.name)).toEqual(['left.o1', 'left.o2', 'right.p1', 'right.p2', 'again.o1', 'again.o2']);
    expect(r[3]!.devices.map((d) => d.name)).toEqual(['ref', 'refc', 'p2.out', 'p2.outc']);
    expect(r[3]!.devices).not.toBe(r[1]!.devices);
    expect(r[5]!.devices).toBe(r[1]!.devices);
    expect(r[5]!.path).toEqual(['mirrors', 2, 'outputs', 1]);
  });
});

describe('network members alike', () => {
  // A binary tree of 31 one-to-one banks: the members of a level get the same current and are
  // held at the same voltages, so they share their own figures; drift and noise come through
  // everything above each one and stay its own.
  const solved = () => solveNetworks(provisionalLinks(parseSpec(networkTreeText(31), 'tree.bias.yaml').spec!));

  it('read exactly as each member measured on its own, field for field and in order', () => {
    const shared = analyzeSpec(solved());
    const each = analyzeSpec(solved(), { repeats: false });
    expect(JSON.stringify(shared)).toBe(JSON.stringify(each));
  });

  it('share the first member\'s solve and keep their own noise path', () => {
    const r = analyzeSpec(solved());
    const t3 = r.find((x) => x.name === 't3.a')!, t5 = r.find((x) => x.name === 't5.a')!; // fed by t1 and by t2
    expect(t5.devices).toBe(t3.devices);
    expect(t5.path).toEqual(['mirrors', 5, 'outputs', 0]);
    // Each names its own devices plainly and the other's by path.
    expect(Object.keys(t3.noise!.shares)).toEqual(expect.arrayContaining(['ref', 't5/ref']));
    expect(Object.keys(t3.noise!.shares)).not.toContain('t3/ref');
    expect(Object.keys(t5.noise!.shares)).toEqual(expect.arrayContaining(['ref', 't3/ref']));
    expect(Object.keys(t5.noise!.shares)).not.toContain('t5/ref');
  });
});
