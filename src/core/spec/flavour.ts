/**
 * A `device:` value: the name of a device flavour of `process.devices`, written on a template
 * mirror (every device of it) or on one netlist device. One reader for both, so both say the
 * same thing about a name that is not there.
 */
import type { DeviceType, SpecPath } from '../types';
import type { FindingSink } from './findings';
import type { ProcessRead } from './process';
import { readString } from './read';
import { askIf, suggestion } from './suggest';

/** The flavour's name, undefined when not given, null when it names no flavour of type `type`
 *  (a finding says so, with a did-you-mean the editor offers as a quick fix). With `type`
 *  undefined, any flavour is taken (a netlist device without `type` takes its flavour's). */
export function readFlavour(
  sink: FindingSink, raw: unknown, path: SpecPath, proc: ProcessRead | undefined, type: DeviceType | undefined,
  whose: 'mirror' | 'device',
): string | null | undefined {
  if (raw === undefined) return undefined;
  const name = readString(sink, raw, path);
  if (name === undefined) return null;
  if (!proc?.flavourNames.has(name)) {
    const known = [...(proc?.flavourNames ?? [])];
    const word = suggestion(name, known);
    sink.error('unknown-name', `no device flavour \`${name}\` in \`process.devices\`${known.length ? ` (it has ${known.map((k) => `\`${k}\``).join(', ')})` : ''}${askIf(word)}`, path, undefined, undefined, word);
    return null;
  }
  const f = proc.devices?.[name];
  if (!f) return null;   // the flavour has its own error
  if (type !== undefined && f.type !== type) {
    sink.error('bad-value', `device flavour \`${name}\` is ${f.type}, but this ${whose} is ${type}`, path);
    return null;
  }
  return name;
}
