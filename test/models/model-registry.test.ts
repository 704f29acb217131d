/**
 * The device-model registry: total over ModelKind (checked by the compiler through
 * `npm run typecheck`), the names the spec reader accepts, and each model's answers agreeing
 * with its own channel equations (design §3).
 */
import { describe, expect, expectTypeOf, it } from 'vitest';
import { MODELS, MODEL_NAMES, WEAK_INVERSION_MODEL } from '../../src/core/models/registry';
import type { DeviceModel } from '../../src/core/models/model';
import { newChannelEval } from '../../src/core/models/core';
import { prepareDevice, sizingContextOf } from '../../src/core/models/device';
import { forModel } from './table/make-table';
import { thermalVoltage } from '../../src/core/models/thermal';
import { parseSpec } from '../../src/core/spec/index';
import type { ModelKind } from '../../src/core/types';
import { BASE, withText } from '../spec/helpers';
import { RAZAVI_N } from '../analysis/builders';

const D_SIZE = { w: 10e-6, l: 1e-6, m: 1 };          // W/L = 10 (references §2 "D")
const rel = (a: number, b: number): number => Math.abs(a / b - 1);

describe('MODELS: one implementation per model name', () => {
  it('its keys are exactly ModelKind', () => {
    expectTypeOf<keyof typeof MODELS>().toEqualTypeOf<ModelKind>();
    expectTypeOf(MODELS).toExtend<Readonly<Record<ModelKind, DeviceModel>>>();
  });

  it('a model name without an implementation does not compile', () => {
    type WithSpline = ModelKind | 'spline';
    // @ts-expect-error 'spline' has no entry in MODELS, so the table is not total over the names
    const registry: Record<WithSpline, DeviceModel> = MODELS;
    expect(Object.keys(registry)).toEqual([...MODEL_NAMES]);
  });

  it('names the models of design §2 and §11 (process.model: square-law | ekv | table)', () => {
    expect(MODEL_NAMES).toEqual(['square-law', 'ekv', 'table']);
  });

  it('the spec reader accepts every registered name and lists them when one is wrong', () => {
    for (const name of MODEL_NAMES) {
      // The table model takes every device from a table (design §11).
      const text = name === 'table'
        ? withText('  nmos: { kp: 280u, vt0: 0.45 }\n  pmos: { kp: 70u, vt0: 0.48 }\n', '  model: table\n  nmos: { table: n.csv }\n  pmos: { table: n.csv }\n')
        : withText('process:\n', `process:\n  model: ${name}\n`);
      const r = parseSpec(text, 'a.bias.yaml', { tables: { 'n.csv': 'l,vgs,vds,vsb,id\n1e-6,0,1,0,1e-9\n1e-6,1,1,0,1e-3\n1e-6,0,2,0,1e-9\n1e-6,1,2,0,1e-3\n' } });
      expect(r.spec?.process.model).toBe(name);
    }
    const bad = parseSpec(withText('process:\n', 'process:\n  model: level3\n', BASE), 'a.bias.yaml');
    const f = bad.findings.find((x) => x.path.join('.') === 'process.model');
    expect(f?.message).toContain(`must be one of ${MODEL_NAMES.join(', ')}`);
  });

  it('the square law is valid in strong inversion only; EKV from weak to strong (design §3)', () => {
    expect(MODELS['square-law'].coversWeakInversion).toBe(false);
    expect(MODELS.ekv.coversWeakInversion).toBe(true);
    expect(MODELS.table.coversWeakInversion).toBe(true);
    // the suggestion for weak inversion is a model, never the table (it needs the designer's data)
    expect(WEAK_INVERSION_MODEL).toBe('ekv');
  });
});

describe.each(MODEL_NAMES)('%s: the model answers agree with its channel equations (design §3)', (name) => {
  const model = MODELS[name];
  const params = forModel(name, { ...RAZAVI_N, lambda: 0 });
  const dev = prepareDevice(params, D_SIZE, 'nmos', { model: name, temperature: 300, tnom: 300 });
  const ch = newChannelEval();

  it('saturationVoltage(ID) is the channel VDSsat at the gate drive for ID', () => {
    for (const id of [1e-8, 1e-6, 1e-4]) {
      model.channel(dev, model.gateDrive(dev, id, 0), 3, 0, ch);
      expect(ch.region).toBe(2);
      expect(rel(model.saturationVoltage(dev, id), ch.vdsat)).toBeLessThan(1e-9);
    }
  });

  it('saturationShift follows the channel VDSsat with the gate in strong inversion', () => {
    // Finite difference of the channel's VDSsat at ID = 1 mA (IC ≈ 430 for this device); the
    // EKV closed form VDSsat ≈ VP − VS holds there to about 1e-3 (Enz, Krummenacher & Vittoz
    // 1995, from memory), the square law's VDSsat = VOV exactly.
    const vgs = model.gateDrive(dev, 1e-3, 0), h = 1e-4;
    model.channel(dev, vgs + h, 3, 0, ch);
    const up = ch.vdsat;
    model.channel(dev, vgs - h, 3, 0, ch);
    const slope = (up - ch.vdsat) / (2 * h);
    // The table's VDSsat = 2/(gm/ID) of an EKV table follows the gate within 2 % there.
    expect(rel(model.saturationShift(dev, 1), slope)).toBeLessThan(name === 'ekv' ? 2e-3 : name === 'table' ? 2e-2 : 1e-9);
  });

  it('aspectForTarget at a device\'s own IC gives back its size (W/L = 10)', () => {
    const id = 1e-4;
    model.channel(dev, model.gateDrive(dev, id, 0), 3, 0, ch);
    const ctx = sizingContextOf(params, { model: name, temperature: 300, tnom: 300 }, D_SIZE.l);
    expect(model.aspectForTarget(ctx, ch.id, { kind: 'ic', value: ch.ic }, 1)!).toBeCloseTo(10, 9);
  });
});

describe('targetLimit: what a model cannot reach at any size', () => {
  const ctx = { kp: RAZAVI_N.kp, n: 1.3, ut: thermalVoltage(300) };
  it('EKV: gm/ID above 1/(n·U_T) = 29.755 /V at n = 1.3, 300 K (references §6)', () => {
    expect(MODELS.ekv.targetLimit(ctx, { kind: 'gmid', value: 35 })).toMatch(/weak-inversion limit 1\/\(n·U_T\) = 29\.8 \/V/);
    expect(MODELS.ekv.targetLimit(ctx, { kind: 'gmid', value: 29.7 })).toBeUndefined();
    expect(MODELS.ekv.aspectForTarget(ctx, 1e-5, { kind: 'gmid', value: 35 }, 1)).toBeUndefined();
  });
  it('square law: every positive target has a size', () => {
    expect(MODELS['square-law'].targetLimit(ctx, { kind: 'gmid', value: 35 })).toBeUndefined();
    expect(MODELS['square-law'].aspectForTarget(ctx, 1e-5, { kind: 'gmid', value: 35 }, 1)).toBeGreaterThan(0);
  });
});
