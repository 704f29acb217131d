/**
 * Go to definition, find references and rename across links (design §9.1), as plain ranges and
 * edits over the core's link sites (src/core/network/link-sites.ts). Pure (no `vscode`), tested
 * without an editor; providers.ts wraps the results.
 */
import type { FileReport, Position, Range, TextEdit } from '../core/types';
import type { LinkSite, LinkSites, NameSite } from '../core/network/link-sites';
import { contains, linkHoverMarkdown, reportAt } from './present';

/** What the cursor is on: a `from` value (and which part of it), or a name. */
export type LinkSpot =
  | { kind: 'link'; link: LinkSite; part: 'mirror' | 'output' | 'whole' }
  | { kind: 'name'; name: NameSite };

function spotAt(sites: LinkSites, pos: Position): LinkSpot | undefined {
  for (const link of sites.links) {
    if (!contains(link.range, pos)) continue;
    const part = link.outputPart && contains(link.outputPart, pos) && !(link.mirrorPart && contains(link.mirrorPart, pos)) ? 'output'
      : link.mirrorPart ? 'mirror' : 'whole';
    return { kind: 'link', link, part };
  }
  const name = sites.names.find((n) => contains(n.range, pos));
  return name ? { kind: 'name', name } : undefined;
}

function mirrorName(sites: LinkSites, mirror: number): NameSite | undefined {
  return sites.names.find((n) => n.mirror === mirror && n.output === undefined);
}

function outputName(sites: LinkSites, mirror: number, output: number): NameSite | undefined {
  return sites.names.find((n) => n.mirror === mirror && n.output === output);
}

/** The name a `from` value resolves to: the output's `name` for `mirror.output` (or a bank of one
 *  output), else the mirror's `name`. */
function definitionOf(sites: LinkSites, link: LinkSite): NameSite | undefined {
  const t = link.target;
  if (!t) return undefined;
  return (t.outputName !== undefined ? outputName(sites, t.mirror, t.output) : undefined) ?? mirrorName(sites, t.mirror);
}

export function definitionAt(sites: LinkSites, pos: Position): Range | undefined {
  const spot = spotAt(sites, pos);
  if (spot?.kind !== 'link') return undefined;
  return definitionOf(sites, spot.link)?.range;
}

/** The name a spot stands for: a name itself, or what a `from` value's part names. */
function nameOf(sites: LinkSites, spot: LinkSpot): NameSite | undefined {
  if (spot.kind === 'name') return spot.name;
  const t = spot.link.target;
  if (!t) return undefined;
  if (spot.part === 'output') return outputName(sites, t.mirror, t.output);
  return spot.part === 'mirror' ? mirrorName(sites, t.mirror) : definitionOf(sites, spot.link);
}

/** The `from` values naming `name`: for a mirror, every link into it (any of its outputs); for an
 *  output, the links into that output. */
function linksTo(sites: LinkSites, name: NameSite): LinkSite[] {
  return sites.links.filter((l) => l.target && l.target.mirror === name.mirror
    && (name.output === undefined || l.target.output === name.output));
}

export function referencesAt(sites: LinkSites, pos: Position, includeDeclaration: boolean): Range[] {
  const spot = spotAt(sites, pos);
  const name = spot && nameOf(sites, spot);
  if (!name) return [];
  const refs = linksTo(sites, name).map((l) => l.range);
  return includeDeclaration ? [name.range, ...refs] : refs;
}

/** Where a rename may start: the name's characters and the name as placeholder, or why not. */
export function prepareRenameAt(sites: LinkSites, pos: Position): { range: Range; placeholder: string } | { error: string } | undefined {
  const spot = spotAt(sites, pos);
  if (!spot) return undefined;
  const name = nameOf(sites, spot);
  if (!name) return { error: 'this link names no mirror output of the file; fix the path first' };
  if (!name.inner) return { error: `\`${name.name}\` is not written as plain text here (an alias or an escape); rename it by hand` };
  if (spot.kind === 'link') {
    const part = spot.part === 'output' ? spot.link.outputPart : spot.link.mirrorPart;
    if (!part) return { error: 'this link is not written as plain text (an escape); rename it by hand' };
    return { range: part, placeholder: name.name };
  }
  return { range: name.inner, placeholder: name.name };
}

/** A name a link can spell: letters, digits, `_` and `-`, starting with a letter or `_` (a dot
 *  would split `mirror.output` in the wrong place; other characters would need quoting). */
const NAME = /^[A-Za-z_][A-Za-z0-9_-]*$/;

export function renameAt(sites: LinkSites, pos: Position, newName: string): { edits: TextEdit[] } | { error: string } | undefined {
  const spot = spotAt(sites, pos);
  if (!spot) return undefined;
  const name = nameOf(sites, spot);
  if (!name) return { error: 'this link names no mirror output of the file; fix the path first' };
  const what = name.output === undefined ? 'mirror' : 'output';
  if (!NAME.test(newName)) {
    return { error: `\`${newName}\` cannot name a ${what} used in links: use letters, digits, \`_\` and \`-\`, starting with a letter or \`_\` (a dot separates mirror and output in \`from\`)` };
  }
  if (newName === name.name) return { edits: [] };
  const clash = sites.names.find((n) => n !== name && n.name === newName
    && (name.output === undefined ? n.output === undefined : n.mirror === name.mirror && n.output !== undefined));
  if (clash) return { error: name.output === undefined ? `a mirror named \`${newName}\` already exists in this file` : `this bank already has an output named \`${newName}\`` };
  if (!name.inner) return { error: `\`${name.name}\` is not written as plain text here (an alias or an escape); rename it by hand` };
  const edits: TextEdit[] = [{ range: name.inner, newText: newName }];
  for (const l of linksTo(sites, name)) {
    if (!l.mirrorPart) return { error: `the link \`${l.from}\` is not written as plain text (an escape); rename it by hand` };
    if (name.output === undefined) edits.push({ range: l.mirrorPart, newText: newName });
    // `from: bank` names a bank of one output by the mirror alone: an output's new name leaves it.
    else if (l.outputPart) edits.push({ range: l.outputPart, newText: newName });
  }
  return { edits };
}

/** Hover markdown on a `from` value, from the upstream output's report (absent until the link is
 *  solved). */
export function linkHoverAt(file: FileReport, sites: LinkSites, pos: Position): string | undefined {
  const spot = spotAt(sites, pos);
  const t = spot?.kind === 'link' ? spot.link.target : undefined;
  if (!spot || spot.kind !== 'link' || !t) return undefined;
  const up = reportAt(file, t.mirror, t.output);
  if (!up) return undefined;
  return linkHoverMarkdown(up, file.mirrors.find((m) => m.mirrorIndex === spot.link.mirror));
}
