import { test } from 'vitest';
import { parseSpec } from '../../src/core/spec/index';
import { parseDocument } from 'yaml';
test('x', () => {
  let text = 'format: 1\nprocess:\n  nmos: { kp: 280u, vt0: 0.45 }\nsupplies: { vdd: 1.8 }\nmirrors:\n';
  let i = 0;
  const item = (k: number) => `  - { name: m${k}, kind: simple, type: nmos, input: 10u, size: { w: 2u, l: 1u }, output: { v: 0.9 } }\n`;
  while (text.length + item(i).length < 131072) text += item(i++);
  for (let k = 0; k < 4; k++) {
    let t = performance.now(); parseSpec(text); console.log('spec', performance.now() - t);
    t = performance.now(); parseDocument(text); console.log('yaml', performance.now() - t);
  }
});
