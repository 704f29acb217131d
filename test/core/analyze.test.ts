// The editor's default margin (`qpoint.limits.margin`) applies only where the spec sets none; a
// margin written in the spec wins in block and in flow style alike.
import { describe, expect, it } from 'vitest';
import { analyzeText } from '../../src/core/analyze';
import { DEFAULTS } from '../../src/core/defaults';

const spec = (limits: string) => `format: 1
process:
  nmos: { kp: 280u, vt0: 0.45, lambda: 0.08 }
  pmos: { kp: 70u, vt0: 0.48 }
supplies: { vdd: 1.8 }
${limits}mirrors:
  - name: copy
    kind: simple
    type: nmos
    input: 10u
    size: { w: 4u, l: 1u }
    output: { v: 0.2 }
`;

/** The low-margin warning names the margin it was judged against. */
function judgedMargin(text: string): string | undefined {
  const f = analyzeText(text, 'm.bias.yaml', { limitsDefaults: { margin: 0.3 } }).findings.find((x) => x.code === 'low-margin');
  return f?.message.match(/limits\.margin asks for (\S+ \S+)/)?.[1];
}

describe('limitsDefaults.margin', () => {
  it('fills a margin the spec leaves unset', () => {
    expect(DEFAULTS.margin).toBe(0.1);
    expect(judgedMargin(spec(''))).toBe('300 mV');
  });
  it('yields to a margin written in block style', () => {
    expect(judgedMargin(spec('limits:\n  margin: 50m\n'))).toBeUndefined();
  });
  it('yields to a margin written in flow style', () => {
    expect(judgedMargin(spec('limits: { margin: 50m }\n'))).toBeUndefined();
  });
});
