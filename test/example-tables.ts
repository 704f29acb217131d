/** The characterisation tables the shipped example names (examples/*.devtable.csv), read as
 *  the CLI reads them: what a test passes to the core along with the example's text. */
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { readTables } from '../src/node/tables';
import type { TableTexts } from '../src/core/spec/index';

export const EXAMPLE_PATH = fileURLToPath(new URL('../examples/sensor-afe.bias.yaml', import.meta.url));

let cached: TableTexts | undefined;
export function exampleTables(): TableTexts {
  cached ??= readTables(EXAMPLE_PATH, readFileSync(EXAMPLE_PATH, 'utf8'));
  return cached;
}
