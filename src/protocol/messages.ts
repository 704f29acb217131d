/**
 * The typed protocol between the extension host and the bias panel (webview). One union per
 * direction, keyed on `type`, and one runtime guard per message. Both sides compile against this
 * file and check every message on arrival: a webview message is untrusted input (a page can be
 * stale after an update, or scripted), so nothing is acted on before its guard accepts it.
 *
 * Pure TypeScript: no `vscode`, no DOM, no Node — it is bundled into both sides.
 */
import { BIPOLAR_TYPES, DEVICE_TYPES, MOS_TYPES } from '../core/device-types';
import type {
  Anchor, CornerResult, CurvePoint, DeviceReport, FileReport, Finding, MirrorReport,
  MonteCarloResult, NetworkReport, Position, Range, Requirements, SpecPath,
} from '../core/types';
import { MIRROR_KINDS } from '../core/kinds/names';

// ───────────────────────────── host → page ─────────────────────────────

/** A finished analysis of one bias spec. `version` rises with every report the host sends during
 *  one page lifetime; the page drops a report older than the one it shows for the same uri. */
export interface ReportMessage { type: 'report'; uri: string; report: FileReport; version: number }
/** Nothing to show (no bias spec is active); `message` says why, in one line. */
export interface ClearMessage { type: 'clear'; message?: string }

export type HostMessage = ReportMessage | ClearMessage;

// ───────────────────────────── page → host ─────────────────────────────

/** The page has loaded its script and listens: the host answers with the current report. */
export interface ReadyMessage { type: 'ready' }
/** Show `range` of `uri` in the editor (a device, mirror or finding was activated). */
export interface RevealMessage { type: 'reveal'; uri: string; range: Range }
/** Something went wrong inside the page; the host writes it to its log. */
export interface LogMessage { type: 'log'; level: 'error' | 'warning' | 'info'; message: string }

/** The designer asked for a Monte Carlo run of `uri` (the spec the panel shows). */
export interface RunMonteCarloMessage { type: 'runMonteCarlo'; uri: string }

export type PageMessage = ReadyMessage | RevealMessage | LogMessage | RunMonteCarloMessage;

// ───────────────────────────── guards: messages ─────────────────────────────

export function isReportMessage(m: unknown): m is ReportMessage {
  return isRecord(m) && m.type === 'report' && isString(m.uri) && isCount(m.version) && isFileReport(m.report);
}

export function isClearMessage(m: unknown): m is ClearMessage {
  return isRecord(m) && m.type === 'clear' && optional(m.message, isString);
}

export function isHostMessage(m: unknown): m is HostMessage {
  return isReportMessage(m) || isClearMessage(m);
}

export function isReadyMessage(m: unknown): m is ReadyMessage {
  return isRecord(m) && m.type === 'ready';
}

export function isRevealMessage(m: unknown): m is RevealMessage {
  return isRecord(m) && m.type === 'reveal' && isString(m.uri) && isRange(m.range);
}

const LOG_LEVELS: readonly string[] = ['error', 'warning', 'info'];

export function isLogMessage(m: unknown): m is LogMessage {
  return isRecord(m) && m.type === 'log' && isString(m.level) && LOG_LEVELS.includes(m.level) &&
    isString(m.message);
}

export function isRunMonteCarloMessage(m: unknown): m is RunMonteCarloMessage {
  return isRecord(m) && m.type === 'runMonteCarlo' && isString(m.uri);
}

export function isPageMessage(m: unknown): m is PageMessage {
  return isReadyMessage(m) || isRevealMessage(m) || isLogMessage(m) || isRunMonteCarloMessage(m);
}

/** A short, bounded description of a rejected message for the host's log. */
export function describeMessage(m: unknown, max = 200): string {
  let text: string;
  try {
    text = JSON.stringify(m) ?? String(m);
  } catch {
    text = Object.prototype.toString.call(m);
  }
  return text.length > max ? `${text.slice(0, max)}…` : text;
}

// ───────────────────────────── guards: report data ─────────────────────────────
// Deep enough that the page can render whatever passes without a type error.

const KINDS: readonly string[] = MIRROR_KINDS;
const POLARITIES: readonly string[] = DEVICE_TYPES;
const SEVERITIES: readonly string[] = ['error', 'warning', 'info'];
const REGIONS: readonly string[] = ['cutoff', 'triode', 'saturation'];
const BIPOLAR_REGIONS: readonly string[] = ['cutoff', 'saturation', 'forward-active'];
const INVERSIONS: readonly string[] = ['weak', 'moderate', 'strong'];
const ANCHOR_KINDS: readonly string[] = ['mirror', 'output', 'device'];

function isPosition(v: unknown): v is Position {
  return isRecord(v) && isCount(v.line) && isCount(v.character);
}

function isRange(v: unknown): v is Range {
  return isRecord(v) && isPosition(v.start) && isPosition(v.end);
}

function isSpecPath(v: unknown): v is SpecPath {
  return Array.isArray(v) && v.every((s) => isString(s) || isCount(s));
}

function isFinding(v: unknown): v is Finding {
  return isRecord(v) && oneOf(v.severity, SEVERITIES) && isString(v.code) && isString(v.message) &&
    isSpecPath(v.path) && isRange(v.range) &&
    optional(v.related, (r) => arrayOf(r, (x) => isRecord(x) && isSpecPath(x.path) && isRange(x.range) && isString(x.message))) &&
    optional(v.fixes, (fs) => arrayOf(fs, (f) => isRecord(f) && isString(f.title) &&
      arrayOf(f.edits, (e) => isRecord(e) && isRange(e.range) && isString(e.newText))));
}

function isAnchor(v: unknown): v is Anchor {
  return isRecord(v) && oneOf(v.kind, ANCHOR_KINDS) && isSpecPath(v.path) && isRange(v.range) &&
    isString(v.report) && optional(v.device, isString);
}

const DEVICE_NUMBERS = ['w', 'l', 'm', 'id', 'vgs', 'vds', 'vbs', 'vth', 'vov', 'vdsat', 'margin', 'ic',
  'gm', 'gds', 'gmb', 'ro', 'gmId'] as const;

const BIPOLAR_NUMBERS = ['area', 'm', 'ic', 'ib', 'vbe', 'vce', 'vcesat', 'margin', 'gm', 'rpi', 'ro', 'gds', 'beta'] as const;

function isDeviceReport(v: unknown): v is DeviceReport {
  if (isRecord(v) && oneOf(v.type, BIPOLAR_TYPES)) {
    return isString(v.name) && isString(v.role) && oneOf(v.region, BIPOLAR_REGIONS) && BIPOLAR_NUMBERS.every((k) => isNumber(v[k]));
  }
  return isRecord(v) && isString(v.name) && isString(v.role) && oneOf(v.type, MOS_TYPES) &&
    oneOf(v.region, REGIONS) && oneOf(v.inversion, INVERSIONS) && optional(v.sized, isBoolean) &&
    DEVICE_NUMBERS.every((k) => isNumber(v[k]));
}

function isCurvePoint(v: unknown): v is CurvePoint {
  return isRecord(v) && isNumber(v.vout) && isNumber(v.iout) && isNumber(v.rout) && isBoolean(v.converged);
}

function isCornerResult(v: unknown): v is CornerResult {
  return isRecord(v) && isString(v.name) && isBoolean(v.converged) &&
    ['iin', 'iout', 'ratio', 'error', 'rout', 'compliance'].every((k) => isNumber(v[k])) &&
    optional(v.sigma, isNumber) && optional(v.minMargin, isNumber) && optional(v.minMarginDevice, isString);
}

function isMonteCarloResult(v: unknown): v is MonteCarloResult {
  return isRecord(v) && ['samples', 'seed', 'mean', 'sigma', 'min', 'max', 'yield'].every((k) => isNumber(v[k])) &&
    optional(v.failed, isNumber) &&
    optional(v.histogram, (h) => isRecord(h) && arrayOf(h.edges, isNumber) && arrayOf(h.counts, isNumber) &&
      (h.edges as number[]).length === (h.counts as number[]).length + 1);
}

function isRequirements(v: unknown): v is Requirements {
  return isRecord(v) && ['ratio', 'rout', 'compliance', 'sigma'].every((k) => optional(v[k], isNumber));
}

const MIRROR_NUMBERS = ['iterations', 'residual', 'vout', 'iout', 'rout', 'compliance', 'mirrorIndex', 'outputIndex'] as const;
/** `iin` and `ratio` are absent for a self-biased netlist (it has no input). */
const MIRROR_OPTIONAL_NUMBERS = ['iin', 'ratio', 'ratioIdeal', 'error', 'routApprox', 'sigma', 'vbias', 'intended', 'chainError', 'chainSigma', 'linkV', 'headroom'] as const;

function isReferenceReport(v: unknown): boolean {
  return isRecord(v) && isNumber(v.current) && optional(v.loopGain, isNumber) &&
    isRecord(v.startup) && isBoolean(v.startup.zeroState) && isBoolean(v.startup.element) &&
    optional(v.startup.conducts, isBoolean) && optional(v.startup.current, isNumber) && optional(v.startup.limit, isNumber);
}
/** Bias networks (design §9.3): the names an output's links and network go by. */
const MIRROR_OPTIONAL_STRINGS = ['feeds', 'fedBy', 'network'] as const;

export function isMirrorReport(v: unknown): v is MirrorReport {
  return isRecord(v) && isString(v.name) && isString(v.mirror) && optional(v.output, isString) &&
    oneOf(v.kind, KINDS) && oneOf(v.type, POLARITIES) && isBoolean(v.converged) &&
    MIRROR_NUMBERS.every((k) => isNumber(v[k])) &&
    MIRROR_OPTIONAL_NUMBERS.every((k) => optional(v[k], isNumber)) &&
    MIRROR_OPTIONAL_STRINGS.every((k) => optional(v[k], isString)) &&
    optional(v.solveNote, isString) && optional(v.vbiasPicked, isBoolean) &&
    optional(v.noCompliance, (c) => isRecord(c) && isString(c.device)) &&
    optional(v.beyondRails, (b) => isRecord(b) && isString(b.node) && isNumber(b.v) && oneOf(b.rail, ['vdd', 'vss'] as const) &&
      arrayOf(b.stack, isString) && isNumber(b.need)) &&
    optional(v.reference, isReferenceReport) &&
    optional(v.errorSplit, (s) => isRecord(s) && isNumber(s.geometry) && (s.base !== undefined
      ? isNumber(s.base) && isNumber(s.vce)
      : isNumber(s.vds) && isNumber(s.body) && optional(s.gate, isNumber))) &&
    isRecord(v.nodes) && Object.values(v.nodes).every(isNumber) &&
    arrayOf(v.devices, isDeviceReport) && isSpecPath(v.path) &&
    optional(v.corners, (c) => arrayOf(c, isCornerResult)) &&
    optional(v.mc, isMonteCarloResult) &&
    optional(v.curve, (c) => arrayOf(c, isCurvePoint)) &&
    optional(v.require, isRequirements);
}

function isNetworkReport(v: unknown): v is NetworkReport {
  return isRecord(v) && isString(v.root) && isCount(v.rootIndex) && arrayOf(v.members, isString) &&
    isBoolean(v.converged) && isRecord(v.supplyCurrent) && isNumber(v.supplyCurrent.vdd) && isNumber(v.supplyCurrent.vss) &&
    isNumber(v.power) && arrayOf(v.leaves, isString) && optional(v.worstLeaf, isString);
}

export function isFileReport(v: unknown): v is FileReport {
  return isRecord(v) && isString(v.file) && isBoolean(v.parsed) && optional(v.title, isString) &&
    arrayOf(v.mirrors, isMirrorReport) && arrayOf(v.findings, isFinding) && arrayOf(v.anchors, isAnchor) &&
    optional(v.limits, (l) => isRecord(l) && isNumber(l.error) && isNumber(l.margin)) &&
    optional(v.networks, (n) => arrayOf(n, isNetworkReport));
}

// ───────────────────────────── primitives ─────────────────────────────

function isRecord(v: unknown): v is Record<string, unknown> {
  return typeof v === 'object' && v !== null && !Array.isArray(v);
}
function isString(v: unknown): v is string { return typeof v === 'string'; }
function isBoolean(v: unknown): v is boolean { return typeof v === 'boolean'; }
/** Any number, including ±Infinity (an ideal Rout) and NaN (a figure that could not be measured). */
function isNumber(v: unknown): v is number { return typeof v === 'number'; }
function isCount(v: unknown): v is number { return typeof v === 'number' && Number.isInteger(v) && v >= 0; }
function oneOf(v: unknown, allowed: readonly string[]): boolean { return isString(v) && allowed.includes(v); }
function optional(v: unknown, guard: (x: unknown) => boolean): boolean { return v === undefined || guard(v); }
function arrayOf(v: unknown, guard: (x: unknown) => boolean): boolean { return Array.isArray(v) && v.every(guard); }

// ───────────────────────────── transport ─────────────────────────────

/** Tag for numbers JSON cannot carry (an ideal Rout is Infinity, an unmeasured figure NaN). */
const WIRE_NUMBER = '$qpointNumber';

/** VS Code sends webview messages as JSON, which turns NaN and ±Infinity into null and would make
 *  a report fail its guard. The host tags them before posting; the page restores them with
 *  `fromWire` before the guard runs. Plain values pass through both unchanged. */
export function toWire(value: unknown): unknown {
  if (typeof value === 'number') return Number.isFinite(value) ? value : { [WIRE_NUMBER]: String(value) };
  if (Array.isArray(value)) return value.map(toWire);
  if (isRecord(value)) {
    const out: Record<string, unknown> = {};
    for (const [k, v] of Object.entries(value)) out[k] = toWire(v);
    return out;
  }
  return value;
}

export function fromWire(value: unknown): unknown {
  if (Array.isArray(value)) return value.map(fromWire);
  if (isRecord(value)) {
    const keys = Object.keys(value);
    const tag = value[WIRE_NUMBER];
    if (keys.length === 1 && typeof tag === 'string' && ['NaN', 'Infinity', '-Infinity'].includes(tag)) return Number(tag);
    const out: Record<string, unknown> = {};
    for (const [k, v] of Object.entries(value)) out[k] = fromWire(v);
    return out;
  }
  return value;
}
