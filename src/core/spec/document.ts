/**
 * Text → YAML document (positions kept) → plain data. YAML 1.2; JSON goes through the same
 * parser. Never throws: unreadable input, syntax errors, alias bombs and runaway nesting become
 * findings, and `parsed` is false when there is no data to check.
 */
import { isAlias, isMap, isScalar, isSeq, parseDocument, visit } from 'yaml';
import type { Document, Node } from 'yaml';
import type { Finding } from '../types';
import { SPEC_LIMITS } from '../defaults';
import { LineIndex } from '../text/lines';
import { YAML_OPTIONS } from './yaml-options';
import { documentData } from './data';

export { YAML_OPTIONS } from './yaml-options';

export interface ReadDocument {
  doc?: Document;
  data?: unknown;
  parsed: boolean;
  findings: Finding[];
}

// C0 controls other than tab, LF, CR; DEL; U+FFFD (what a decoder leaves for invalid UTF-8).
const BINARY = /[\u0000-\u0008\u000B\u000C\u000E-\u001F\u007F\uFFFD]/;

function at(lines: LineIndex, start: number, end: number, code: string, message: string, severity: Finding['severity'] = 'error'): Finding {
  return { severity, code, message, path: [], range: lines.range(start, end) };
}

/** The parser's message without its position suffix and code excerpt. */
function firstLine(message: string): string {
  return message.split('\n')[0].replace(/ at line \d+, column \d+:?$/, '').trim();
}

function sizeText(n: number): string {
  return n >= 1 << 20 ? `${(n / (1 << 20)).toFixed(1)} MB` : `${Math.ceil(n / 1024)} KB`;
}

/**
 * The `too-large` message for a spec of `size` characters; `over` when a reader stopped at the
 * limit without reaching the end (the CLI on a stream or a device).
 */
export function tooLargeMessage(size: number, over = false): string {
  return `the file is ${over ? 'over ' : ''}${sizeText(size)}; qpoint reads bias specs up to ${sizeText(SPEC_LIMITS.maxChars)} — split it into several files`;
}

/** Duplicate keys: the later one wins in the data, so it is the one flagged. */
export function duplicateKeys(doc: Document, lines: LineIndex, out: Finding[]): void {
  const stack: { node: unknown; depth: number }[] = [{ node: doc.contents, depth: 0 }];
  while (stack.length) {
    const { node, depth } = stack.pop()!;
    if (depth > 10_000) continue;
    if (isMap(node)) {
      // A mapping of one key (most flow mappings) has no duplicate: no map of names for it.
      const first = node.items.length > 1 ? new Map<string, Node>() : undefined;
      for (const pair of node.items) {
        const k = pair.key;
        if (first && isScalar(k)) {
          const name = String(k.value);
          const earlier = first.get(name);
          if (earlier && name !== '<<' && k.range && earlier.range) {
            const line = lines.position(earlier.range[0]).line + 1;
            out.push(at(lines, k.range[0], k.range[1], 'duplicate-key',
              `\`${name}\` is given twice in this mapping (first on line ${line}); the later one is used — remove one`));
          } else if (!earlier) {
            first.set(name, k);
          }
        }
        stack.push({ node: pair.value, depth: depth + 1 });
      }
    } else if (isSeq(node)) {
      for (const item of node.items) stack.push({ node: item, depth: depth + 1 });
    }
  }
}

/** Span of the first alias in the document (where an alias bomb starts), else 0:0. */
function firstAlias(doc: Document): [number, number] {
  let span: [number, number] = [0, 0];
  visit(doc, {
    Alias(_key, node) {
      if (isAlias(node) && node.range) {
        span = [node.range[0], node.range[1]];
        return visit.BREAK;
      }
      return undefined;
    },
  });
  return span;
}

/**
 * Offset of the first `[` or `{` that opens more than `max` nested flow collections, else -1.
 * Quoted strings and comments are skipped; a bracket inside a plain scalar counts, which can only
 * over-count, and only a text with hundreds of them would notice.
 */
function flowTooDeep(text: string, max: number): number {
  let depth = 0;
  // Only these characters act; the regular expression skips the rest at native speed (a cold
  // start runs this scan in the interpreter).
  const marks = /[{}[\]"'#]/g;
  for (let m = marks.exec(text); m !== null; m = marks.exec(text)) {
    let i = m.index;
    const c = text.charCodeAt(i);
    if (c === 123 || c === 91) { // { [
      if (++depth > max) return i;
    } else if (c === 125 || c === 93) { // } ]
      if (depth > 0) depth--;
    } else if (c === 34) { // "…" with \ escapes
      for (i++; i < text.length && text.charCodeAt(i) !== 34; i++) if (text.charCodeAt(i) === 92) i++;
    } else if (c === 39) { // '…' ('' is a quote inside)
      for (i++; i < text.length; i++) {
        if (text.charCodeAt(i) === 39) {
          if (text.charCodeAt(i + 1) === 39) i++;
          else break;
        }
      }
    } else if (c === 35 && (i === 0 || text.charCodeAt(i - 1) === 32 || text.charCodeAt(i - 1) === 9 || text.charCodeAt(i - 1) === 10)) { // # comment
      const nl = text.indexOf('\n', i);
      i = nl < 0 ? text.length : nl;
    }
    marks.lastIndex = i + 1;
  }
  return -1;
}

/**
 * What refuses a text before YAML reads it (too large, a bare CR, a control byte, runaway flow
 * nesting): its finding, else undefined. A linear scan of the text.
 */
export function refusal(text: string, lines: LineIndex): Finding | undefined {
  if (text.length > SPEC_LIMITS.maxChars) {
    return at(lines, 0, 0, 'too-large', tooLargeMessage(text.length));
  }
  // A carriage return alone ends a line for YAML and for editors (LSP), but not for the line
  // arithmetic of every tool that reads the positions back; such files come from old editors or
  // broken conversions, so say so instead of reporting positions some reader would misplace.
  // Whichever comes first is reported: positions before a bare CR are the same for everyone.
  const bin = BINARY.exec(text);
  const cr = /\r(?!\n)/.exec(text);
  if (cr && (!bin || cr.index < bin.index)) {
    const start = lines.lineStart(cr.index);
    return at(lines, start, cr.index, 'bare-cr',
      `line ${lines.position(cr.index).line + 1} ends with a bare carriage return (CR without LF); save the file with LF or CRLF line breaks`);
  }
  if (bin) {
    const code = bin[0].charCodeAt(0).toString(16).toUpperCase().padStart(4, '0');
    return at(lines, bin.index, bin.index + 1, 'binary-input',
      `the file holds a control or invalid byte (U+${code}); a bias spec is UTF-8 text`);
  }
  const deepAt = flowTooDeep(text, SPEC_LIMITS.maxFlowDepth);
  if (deepAt >= 0) {
    return at(lines, deepAt, deepAt + 1, 'too-deep',
      'the file nests deeper than qpoint reads (a bias spec needs about 6 levels); flatten it');
  }
  return undefined;
}

/**
 * An edited text is refused (`refusal`) exactly as the text `old` it was edited from — not at all,
 * for a text read without refusal — when it is no longer than the limit and the edit (between the
 * common prefix `a` and suffix `s`) writes and removes only plain characters on one line, beside
 * neighbours that no scan reads differently: no line break (but after the edit), carriage return,
 * control or invalid character, nothing the flow-depth scan acts on (brackets, quotes, `#`) or an
 * escape, so every scan of the text reads the same marks in the same states. Anything else is
 * scanned whole, as before (spec/incremental.ts, and the EKV fix's re-read: spec/fragment.ts).
 */
export function refusesAsBefore(old: string, text: string, a: number, s: number): boolean {
  if (text.length > SPEC_LIMITS.maxChars) return false;
  if (a > 0 && !quiet(text.charCodeAt(a - 1))) return false;
  // A line break after the edit is read the same: only its own character and the one after it
  // (a CR's) decide what a scan makes of it, and neither changed.
  if (s > 0 && !quiet(text.charCodeAt(text.length - s)) && !lineBreak(text.charCodeAt(text.length - s))) return false;
  for (let i = a; i < text.length - s; i++) if (!quiet(text.charCodeAt(i))) return false;
  for (let i = a; i < old.length - s; i++) if (!quiet(old.charCodeAt(i))) return false;
  return true;
}

function lineBreak(c: number): boolean {
  return c === 10 || c === 13;
}

/** A character no refusal scan acts on or looks behind: printable, a tab, or a space. */
function quiet(c: number): boolean {
  if (c === 9) return true;
  if (c < 0x20 || c === 0x7f || c === 0xfffd) return false;
  // " # ' [ \ ] { }
  return c !== 34 && c !== 35 && c !== 39 && c !== 91 && c !== 92 && c !== 93 && c !== 123 && c !== 125;
}

export function readDocument(text: string, lines: LineIndex): ReadDocument {
  const refused = refusal(text, lines);
  if (refused) return { parsed: false, findings: [refused] };
  const findings: Finding[] = [];
  let doc: Document;
  try {
    doc = parseDocument(text, YAML_OPTIONS);
  } catch (e) {
    return { parsed: false, findings: [at(lines, 0, 0, 'yaml-syntax', `the file cannot be read as YAML: ${e instanceof Error ? e.message : String(e)}`)] };
  }
  if (doc.errors.length) {
    const deep = doc.errors.find((e) => e.code === 'RESOURCE_EXHAUSTION');
    if (deep) {
      findings.push(at(lines, deep.pos[0], deep.pos[1], 'too-deep',
        'the file nests deeper than qpoint reads (a bias spec needs about 6 levels); flatten it'));
    } else {
      const max = SPEC_LIMITS.maxSyntaxFindings;
      for (const e of doc.errors.slice(0, max)) findings.push(at(lines, e.pos[0], e.pos[1], 'yaml-syntax', firstLine(e.message)));
      if (doc.errors.length > max) findings[findings.length - 1].message += ` (and ${doc.errors.length - max} more syntax errors)`;
    }
    return { doc, parsed: false, findings };
  }
  if (doc.contents === null || (isScalar(doc.contents) && doc.contents.value === null)) {
    return { doc, parsed: true, findings: [at(lines, 0, 0, 'empty-spec', 'the file is empty; a bias spec starts with `format: 1`, then `process`, `supplies` and `mirrors`')] };
  }
  for (const w of doc.warnings) findings.push(at(lines, w.pos[0], w.pos[1], 'yaml-warning', firstLine(w.message), 'warning'));
  duplicateKeys(doc, lines, findings);
  let data: unknown;
  try {
    data = documentData(doc, SPEC_LIMITS.maxAliasCount);
  } catch (e) {
    const msg = e instanceof Error ? e.message : String(e);
    if (/alias/i.test(msg)) {
      const first = firstAlias(doc);
      findings.push(at(lines, first[0], first[1], 'too-many-aliases', `the file expands more than ${SPEC_LIMITS.maxAliasCount} aliases; qpoint stops there (an alias bomb?)`));
    } else if (e instanceof RangeError) {
      findings.push(at(lines, 0, 0, 'too-deep', 'the file nests deeper than qpoint reads (a bias spec needs about 6 levels); flatten it'));
    } else {
      findings.push(at(lines, 0, 0, 'yaml-syntax', `the file cannot be converted to data: ${msg}`));
    }
    return { doc, parsed: false, findings };
  }
  return { doc, data, parsed: true, findings };
}
