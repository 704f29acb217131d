/**
 * The kinds registry (src/core/kinds/) is the one description of each mirror kind: every
 * description is complete and self-consistent, and the schema, the panel's message guard, the
 * README and docs/design.md say what it says. Each check reads the registry, never a list typed
 * out again here.
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { BANK_KINDS, KINDS, MIRROR_KINDS, TEMPLATE_KINDS, VBIAS_KINDS, referenceRoles, type TemplateKind } from '../../src/core/kinds/index';
import { isMirrorReport } from '../../src/protocol/messages';
import { fixtureReport } from '../webview/fixtures';

const ROOT = join(__dirname, '..', '..');
const read = (path: string): string => readFileSync(join(ROOT, path), 'utf8');
const sorted = (xs: Iterable<string>): string[] => [...xs].sort();
/** Words in backticks. */
const ticked = (text: string): string[] => [...text.matchAll(/`([^`]+)`/g)].map((m) => m[1]!);
/** "a, b and c", as the docs list kinds. */
const prose = (xs: readonly string[]): string => (xs.length < 2 ? xs.join('') : `${xs.slice(0, -1).join(', ')} and ${xs.at(-1)}`);
/** Rows of the markdown table whose header row starts with `header`, as cells. */
function table(text: string, header: string): string[][] {
  const lines = text.split('\n');
  const start = lines.findIndex((l) => l.startsWith(header));
  expect(start, `table "${header}"`).toBeGreaterThanOrEqual(0);
  const rows: string[][] = [];
  for (const line of lines.slice(start + 2)) {
    if (!line.startsWith('|')) break;
    rows.push(line.split('|').slice(1, -1).map((c) => c.trim()));
  }
  return rows;
}
/** The roles a docs cell names: its backticked words, less `vbias` (a held node, not a role). */
const namedRoles = (cell: string, kind: TemplateKind): string[] =>
  sorted(new Set(ticked(cell).filter((w) => !(KINDS[kind].vbias && w === 'vbias'))));

describe.each(TEMPLATE_KINDS)('the description of %s', (kind) => {
  const k = KINDS[kind];
  it('wires every role once: reference and output connections cover the roles, output roles are the output side', () => {
    expect(sorted([...Object.keys(k.reference), ...Object.keys(k.output)])).toEqual(sorted(k.roles));
    expect(sorted(Object.keys(k.output))).toEqual(sorted(k.outputRoles));
    expect(sorted(referenceRoles(kind))).toEqual(sorted(Object.keys(k.reference)));
  });
  it('has its input stack on the reference side, its top device draining into the input node', () => {
    for (const role of k.inputStack) expect(Object.keys(k.reference)).toContain(role);
    expect(k.reference[k.inputStack.at(-1)!]!.d).toBe(k.inputNode);
    expect(k.reference[k.inputStack[0]!]!.s).toBe('R');
  });
  it('names a mirror pair among its roles, and a reference device on its reference side', () => {
    expect(k.roles).toContain(k.pair.out);
    expect(Object.keys(k.reference)).toContain(k.pair.ref);
  });
  it('takes vbias exactly when a connection uses the held vbias node; is built from MOSFETs or bipolar devices', () => {
    const conns = [...Object.values(k.reference), ...Object.values(k.output)];
    expect(conns.some((c) => c.g === 'vbias' || c.d === 'vbias' || c.s === 'vbias')).toBe(k.vbias);
    expect(k.families.length).toBeGreaterThan(0);
    for (const f of k.families) expect(['mosfet', 'bipolar']).toContain(f);
  });
  it('has a textbook Rout for every family it is built from', () => {
    // `rout` is written for the first family; a kind of both families carries the bipolar form too.
    if (k.families.length > 1) expect(k.bipolarRout?.formula).toBeTruthy();
    else expect(k.bipolarRout).toBeUndefined();
  });
  it('names its degeneration node among its connections', () => {
    if (k.degeneration === undefined) return;
    const conns = [...Object.values(k.reference), ...Object.values(k.output)];
    expect(conns.some((c) => c.s === k.degeneration)).toBe(true);
  });
});

describe('the schema says what the registry says', () => {
  const mirror = JSON.parse(read('schema/qpoint-bias.schema.json')).definitions.mirror.properties;
  it('kind: the enum and its description list every kind, in order', () => {
    expect(mirror.kind.enum).toEqual([...MIRROR_KINDS]);
    expect(mirror.kind.description).toBe(`Topology: ${MIRROR_KINDS.join(' | ')}.`);
  });
  it('devices: the roles of each kind', () => {
    for (const kind of TEMPLATE_KINDS) expect(mirror.devices.description).toContain(`${kind} ${KINDS[kind].roles.join('/')}`);
  });
  it('vbias and outputs: the kinds that take them', () => {
    expect(mirror.vbias.description.toLowerCase().startsWith(`${prose(VBIAS_KINDS)} only:`)).toBe(true);
    expect(mirror.outputs.description.startsWith(`${prose(BANK_KINDS)}:`)).toBe(true);
  });
});

describe('the panel accepts a report of every kind', () => {
  it.each(MIRROR_KINDS)('%s', (kind) => {
    const m = { ...fixtureReport().mirrors[0]!, kind };
    expect(isMirrorReport(m)).toBe(true);
  });
  it('and no other', () => {
    expect(isMirrorReport({ ...fixtureReport().mirrors[0]!, kind: 'bandgap' })).toBe(false);
  });
});

describe('README', () => {
  const text = read('README.md');
  const rows = table(text, '| kind | roles | ratioIdeal |');
  it('the kinds table has one row per kind, in order', () => {
    expect(rows.map((r) => r[0])).toEqual(MIRROR_KINDS.map((k) => `\`${k}\``));
  });
  it.each(TEMPLATE_KINDS)('%s: roles, mirror pair and textbook Rout', (kind) => {
    const [, roles, pair, rout] = rows.find((r) => r[0] === `\`${kind}\``)!;
    const k = KINDS[kind];
    expect(namedRoles(roles!, kind)).toEqual(sorted(k.roles));
    expect(pair).toBe(`${k.pair.out} / ${k.pair.ref}`);
    const as = /^as (\S+)$/.exec(rout!);
    if (as) expect(k.rout.formula).toBe(KINDS[as[1] as TemplateKind].rout.formula);
    else expect(rout!.startsWith(k.rout.formula)).toBe(true);
  });
  it('bias banks and the example comment', () => {
    const banks = /\*\*Bias banks\.\*\* ([^\n]*) take `outputs:`/.exec(text);
    expect(ticked(banks![1]!)).toEqual([...BANK_KINDS]);
    expect(text).toContain(`# ${MIRROR_KINDS.join(' | ')}`);
  });
  it('the example it points to uses every kind', () => {
    const example = read('examples/sensor-afe.bias.yaml');
    for (const kind of MIRROR_KINDS) expect(example).toMatch(new RegExp(`kind: ${kind}\\s`));
  });
});

describe('docs/design.md', () => {
  const text = read('docs/design.md');
  const rows = table(text, '| kind | devices and connections |');
  const row = (field: string): string => text.split('\n').find((l) => l.startsWith(`| \`${field}\` |`))!;
  it('the kinds table has one row per kind, in order, naming each kind\'s roles', () => {
    expect(rows.map((r) => r[0])).toEqual(MIRROR_KINDS.map((k) => `\`${k}\``));
    for (const kind of TEMPLATE_KINDS) expect(namedRoles(rows.find((r) => r[0] === `\`${kind}\``)![1]!, kind)).toEqual(sorted(KINDS[kind].roles));
  });
  it('bias banks', () => {
    const banks = /\n([^\n]*) take `outputs:`/.exec(text);
    expect(ticked(banks![1]!)).toEqual([...BANK_KINDS]);
  });
  it('ratioIdeal names each kind\'s mirror pair, routApprox its formula', () => {
    const pairs = new Map<string, string>();
    for (const g of row('ratioIdeal').matchAll(/`(\w+)`\/`(\w+)` for ([^;|]+)/g)) {
      for (const kind of g[3]!.trim().split(/, | and /)) pairs.set(kind, `${g[1]}/${g[2]}`);
    }
    for (const kind of TEMPLATE_KINDS) expect(pairs.get(kind), kind).toBe(`${KINDS[kind].pair.out}/${KINDS[kind].pair.ref}`);
    for (const kind of TEMPLATE_KINDS) expect(row('routApprox'), kind).toContain(KINDS[kind].rout.formula);
  });
});
