// The host↔panel protocol guards: every well-formed message passes, anything malformed is
// rejected before either side acts on it (a webview message is untrusted input).
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import {
  describeMessage, isClearMessage, isFileReport, isHostMessage, isLogMessage, isPageMessage,
  isReadyMessage, isReportMessage, isRevealMessage, fromWire, toWire,
} from '../../src/protocol/messages';
import { fixtureReport } from './fixtures';

const range = { start: { line: 3, character: 2 }, end: { line: 3, character: 8 } };

describe('host → page messages', () => {
  it('accepts a report message carrying a full report', () => {
    const m = { type: 'report', uri: 'file:///a.bias.yaml', report: fixtureReport(), version: 3 };
    expect(isReportMessage(m)).toBe(true);
    expect(isHostMessage(m)).toBe(true);
    expect(isPageMessage(m)).toBe(false);
  });

  it('accepts non-finite figures (an ideal Rout is Infinity, an unmeasured one NaN)', () => {
    const report = fixtureReport();
    report.mirrors[0].rout = Infinity;
    report.mirrors[0].sigma = Number.NaN;
    expect(isFileReport(report)).toBe(true);
  });

  it('accepts clear with and without a message', () => {
    expect(isClearMessage({ type: 'clear' })).toBe(true);
    expect(isClearMessage({ type: 'clear', message: 'closed' })).toBe(true);
    expect(isClearMessage({ type: 'clear', message: 42 })).toBe(false);
  });

  it.each([
    ['no version', { type: 'report', uri: 'u', report: fixtureReport() }],
    ['negative version', { type: 'report', uri: 'u', report: fixtureReport(), version: -1 }],
    ['fractional version', { type: 'report', uri: 'u', report: fixtureReport(), version: 1.5 }],
    ['uri not a string', { type: 'report', uri: 7, report: fixtureReport(), version: 1 }],
    ['report missing', { type: 'report', uri: 'u', version: 1 }],
    ['unknown type', { type: 'reports', uri: 'u', report: fixtureReport(), version: 1 }],
    ['null', null],
    ['a string', 'report'],
    ['an array', [{ type: 'clear' }]],
  ])('rejects %s', (_name, m) => {
    expect(isHostMessage(m)).toBe(false);
  });

  it('rejects reports whose parts are malformed', () => {
    const cases: ((r: ReturnType<typeof fixtureReport>) => void)[] = [
      (r) => { (r.mirrors[0] as unknown as Record<string, unknown>).devices = undefined; },
      (r) => { (r.mirrors[0].devices[0] as unknown as Record<string, unknown>).id = '10u'; },
      (r) => { (r.mirrors[0].devices[0] as unknown as Record<string, unknown>).region = 'linear'; },
      (r) => { (r.mirrors[0] as unknown as Record<string, unknown>).kind = 'bandgap'; },   // no such kind
      (r) => { (r.findings[0] as unknown as Record<string, unknown>).severity = 'fatal'; },
      (r) => { r.findings[0].range.start.line = -1; },
      (r) => { (r.anchors[0] as unknown as Record<string, unknown>).kind = 'node'; },
      (r) => { (r.mirrors[0].curve![0] as unknown as Record<string, unknown>).converged = 1; },
      (r) => { r.mirrors[0].mc!.histogram!.counts.push(1); },  // edges must be counts + 1
      (r) => { (r.mirrors[0].nodes as Record<string, unknown>).A = null; },
      (r) => { (r.mirrors[0].path as unknown[]).push({}); },
      (r) => { (r.mirrors[0].require as Record<string, unknown>).rout = '20M'; },
    ];
    for (const mutate of cases) {
      const report = fixtureReport();
      mutate(report);
      expect(isReportMessage({ type: 'report', uri: 'u', report, version: 1 })).toBe(false);
    }
  });

  it('accepts the bias-network fields (design §9.3) and rejects them malformed', () => {
    const networked = (): ReturnType<typeof fixtureReport> => {
      const r = fixtureReport();
      Object.assign(r.mirrors[0], { feeds: 'dist', network: 'tail', intended: 4e-5, chainError: 0.003, chainSigma: 0.004, linkV: 0.8, headroom: 0.2 });
      Object.assign(r.mirrors[1], { fedBy: 'tail', network: 'tail' });
      r.networks = [{ root: 'tail', rootIndex: 0, members: ['tail', 'load'], converged: true, supplyCurrent: { vdd: 1e-4, vss: 1e-4 }, power: 1.8e-4, leaves: ['load.a'], worstLeaf: 'load.a' }];
      return r;
    };
    expect(isFileReport(networked())).toBe(true);
    const cases: ((r: ReturnType<typeof fixtureReport>) => void)[] = [
      (r) => { (r.mirrors[0] as unknown as Record<string, unknown>).chainError = '0.3%'; },
      (r) => { (r.mirrors[0] as unknown as Record<string, unknown>).feeds = 3; },
      (r) => { (r.mirrors[1] as unknown as Record<string, unknown>).fedBy = null; },
      (r) => { (r.networks![0] as unknown as Record<string, unknown>).rootIndex = -1; },
      (r) => { (r.networks![0].supplyCurrent as unknown as Record<string, unknown>).vdd = undefined; },
      (r) => { (r.networks![0] as unknown as Record<string, unknown>).members = 'tail'; },
      (r) => { (r as unknown as Record<string, unknown>).networks = {}; },
    ];
    for (const mutate of cases) {
      const report = networked();
      mutate(report);
      expect(isFileReport(report)).toBe(false);
    }
  });

  it('rejects a report with any required field of a mirror removed (property)', () => {
    // `iin` and `ratio` are optional: a self-biased mirror or netlist has no input (design §14).
    const required = ['name', 'mirror', 'kind', 'type', 'converged', 'iterations', 'residual', 'vout',
      'iout', 'rout', 'compliance', 'nodes', 'devices', 'path'];
    fc.assert(fc.property(fc.constantFrom(...required), fc.nat(2), (key, index) => {
      const report = fixtureReport();
      delete (report.mirrors[index] as unknown as Record<string, unknown>)[key];
      return !isFileReport(report);
    }));
  });

  it('accepts no arbitrary JSON value as a host message (property)', () => {
    fc.assert(fc.property(fc.jsonValue(), (v) => {
      const ok = isHostMessage(v);
      // The only small JSON values that are valid are clear messages.
      return !ok || (typeof v === 'object' && v !== null && (v as Record<string, unknown>).type === 'clear');
    }), { numRuns: 500 });
  });
});

describe('page → host messages', () => {
  it('accepts ready, reveal and log', () => {
    expect(isReadyMessage({ type: 'ready' })).toBe(true);
    expect(isRevealMessage({ type: 'reveal', uri: 'file:///a.bias.yaml', range })).toBe(true);
    expect(isLogMessage({ type: 'log', level: 'warning', message: 'x' })).toBe(true);
    for (const m of [{ type: 'ready' }, { type: 'reveal', uri: 'u', range }, { type: 'log', level: 'info', message: '' }]) {
      expect(isPageMessage(m)).toBe(true);
      expect(isHostMessage(m)).toBe(false);
    }
  });

  it.each([
    ['reveal without uri', { type: 'reveal', range }],
    ['reveal without range', { type: 'reveal', uri: 'u' }],
    ['reveal with a fractional line', { type: 'reveal', uri: 'u', range: { start: { line: 1.5, character: 0 }, end: range.end } }],
    ['reveal with a string position', { type: 'reveal', uri: 'u', range: { start: '1:2', end: range.end } }],
    ['log with an unknown level', { type: 'log', level: 'debug', message: 'x' }],
    ['log without message', { type: 'log', level: 'error' }],
    ['a command-style message', { command: 'reveal', uri: 'u', range }],
    ['undefined', undefined],
  ])('rejects %s', (_name, m) => {
    expect(isPageMessage(m)).toBe(false);
  });
});

describe('describeMessage', () => {
  it('bounds the logged text and survives values JSON cannot print', () => {
    expect(describeMessage({ type: 'x'.repeat(500) }, 50)).toHaveLength(51);
    const cyclic: Record<string, unknown> = {};
    cyclic.self = cyclic;
    expect(describeMessage(cyclic)).toBe('[object Object]');
    expect(describeMessage(undefined)).toBe('undefined');
  });
});

describe('transport through JSON (VS Code posts webview messages as JSON)', () => {
  it('keeps NaN and ±Infinity of a report, so the page guard still accepts it', () => {
    const report = fixtureReport();
    const first = report.mirrors[0]!;
    report.mirrors[0] = { ...first, rout: Infinity, compliance: NaN, curve: [{ vout: 0, iout: -Infinity, rout: NaN, converged: false }] };
    const message = { type: 'report' as const, uri: 'file:///a.bias.yaml', report, version: 2 };
    const plain = JSON.parse(JSON.stringify(message)) as unknown;
    expect(isHostMessage(plain)).toBe(false);            // what the page saw before tagging
    const received = fromWire(JSON.parse(JSON.stringify(toWire(message))));
    expect(isHostMessage(received)).toBe(true);
    const m = (received as typeof message).report.mirrors[0]!;
    expect(m.rout).toBe(Infinity);
    expect(m.compliance).toBeNaN();
    expect(m.curve![0]!.iout).toBe(-Infinity);
    expect(received).toEqual(message);
  });

  it('leaves ordinary values and look-alike objects alone', () => {
    const v = { a: 1, b: [2, 'x', null], c: { $qpointNumber: 'hello' } };
    expect(fromWire(toWire(v))).toEqual(v);
  });
});
