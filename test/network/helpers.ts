/** Shared pieces of the network tests: the Halden 180 header of the rules tests. */
import { header as rulesHeader } from '../rules/helpers';
export { textOf } from '../rules/helpers';
export { marked } from '../spec/helpers';

/** The Halden 180 process header followed by the given mirror lines. */
export function header(lines: string[]): string {
  return `${rulesHeader()}\n${lines.join('\n')}\n`;
}
