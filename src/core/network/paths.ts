/**
 * Link paths (design §9.1): `input: { from: PATH }` names one mirror output, `mirror` (a mirror
 * with one output) or `mirror.output` (an output of a bias bank). This is the one place a path is
 * read: the elaborator's link checks, the network solve and the editor's go-to-definition,
 * references and rename all resolve it here, from the spec's plain data, so a path resolves the
 * same way in a file that still has errors.
 */
import { isRecord } from '../spec/params';

/** What a link may name: one mirror of the file and its outputs. */
export interface LinkTarget {
  name: string;
  /** File index. */
  index: number;
  kind?: string;
  type?: string;
  /** Output names of a mirror written with `outputs:`; undefined for a single-output mirror. */
  outputs?: string[];
}

/** A path that resolves: the mirror's file index and the output's index. */
export interface ResolvedLink { mirror: number; output: number; target: LinkTarget; outputName?: string }

export type LinkResolution =
  | { ok: true; link: ResolvedLink }
  | { ok: false; message: string; word?: string };

/** The mirrors of the plain data, by file index (entries without a string name are skipped). */
export function linkTargets(data: unknown): LinkTarget[] {
  const items = isRecord(data) && Array.isArray(data.mirrors) ? data.mirrors : [];
  const out: LinkTarget[] = [];
  items.forEach((item: unknown, index: number) => {
    if (!isRecord(item) || typeof item.name !== 'string') return;
    const t: LinkTarget = { name: item.name, index };
    if (typeof item.kind === 'string') t.kind = item.kind;
    if (typeof item.type === 'string') t.type = item.type;
    if (Array.isArray(item.outputs)) {
      t.outputs = item.outputs.map((o: unknown) => (isRecord(o) && typeof o.name === 'string' ? o.name : ''));
    }
    out.push(t);
  });
  return out;
}

/** The `from` value of mirror item `index` as written (a string), else undefined. */
export function linkPathOf(data: unknown, index: number): string | undefined {
  const items = isRecord(data) && Array.isArray(data.mirrors) ? data.mirrors : [];
  const item: unknown = items[index];
  if (!isRecord(item) || !isRecord(item.input)) return undefined;
  return typeof item.input.from === 'string' ? item.input.from : undefined;
}

/** Every path a link may write, for did-you-means and completion: `m` for a single-output
 *  mirror, `m.o` for each output of a bank. */
function linkPaths(targets: readonly LinkTarget[]): string[] {
  const out: string[] = [];
  for (const t of targets) {
    if (t.kind === 'netlist') continue;
    if (t.outputs) for (const o of t.outputs) { if (o) out.push(`${t.name}.${o}`); }
    else out.push(t.name);
  }
  return out;
}

/** Resolve `path` among `targets`. A mirror name may itself hold dots: the whole path is tried as
 *  a mirror name first, then split at its last dot. */
const indexes = new WeakMap<readonly LinkTarget[], Map<string, LinkTarget>>();

export function resolveLinkPath(path: string, targets: readonly LinkTarget[], suggest?: (word: string, candidates: string[]) => string | undefined): LinkResolution {
  // One name index per target list: a file of a thousand links resolves in linear time.
  let byName = indexes.get(targets);
  if (!byName) indexes.set(targets, byName = new Map(targets.map((t) => [t.name, t] as const)));
  const fail = (message: string): LinkResolution => {
    const word = suggest?.(path, linkPaths(targets));
    return word === undefined ? { ok: false, message } : { ok: false, message, word };
  };
  const whole = byName.get(path);
  if (whole) {
    if (whole.kind === 'netlist') return { ok: false, message: `\`${path}\` is a netlist mirror; a link takes an output of a template mirror` };
    if (whole.outputs && whole.outputs.length !== 1) {
      const first = whole.outputs.find((o) => o) ?? 'output';
      return { ok: false, message: `\`${path}\` is a bias bank with ${whole.outputs.length} outputs; name one of them (\`${path}.${first}\`)` };
    }
    const outputName = whole.outputs?.[0];
    return { ok: true, link: outputName === undefined ? { mirror: whole.index, output: 0, target: whole } : { mirror: whole.index, output: 0, target: whole, outputName } };
  }
  const dot = path.lastIndexOf('.');
  if (dot > 0) {
    const mirror = byName.get(path.slice(0, dot));
    const out = path.slice(dot + 1);
    if (mirror) {
      if (mirror.kind === 'netlist') return { ok: false, message: `\`${mirror.name}\` is a netlist mirror; a link takes an output of a template mirror` };
      const j = mirror.outputs ? mirror.outputs.indexOf(out) : -1;
      if (j >= 0) return { ok: true, link: { mirror: mirror.index, output: j, target: mirror, outputName: out } };
      const names = mirror.outputs?.filter((o) => o) ?? [];
      return fail(names.length > 0
        ? `mirror \`${mirror.name}\` has no output \`${out}\` (outputs: ${names.join(', ')})`
        : `mirror \`${mirror.name}\` has one output, named by the mirror alone (\`${mirror.name}\`)`);
    }
  }
  return fail(`no mirror output \`${path}\` in this file`);
}
