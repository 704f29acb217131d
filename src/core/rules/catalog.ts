/**
 * The design checks qpoint runs after solving, one entry per stable code. The same words go into
 * docs/findings.md (one `## code` section each) and into SARIF's rule metadata, so the editor,
 * CI and the docs describe a finding the same way.
 */
import type { Severity } from '../types';

export interface RuleInfo {
  code: string;
  severity: Severity;
  /** One line: what the check looks for. */
  summary: string;
  /** Why it matters to the circuit. */
  why: string;
  /** The usual fix (and whether qpoint offers it as a quick fix). */
  fix: string;
  /**
   * Its fix changes the drawn geometry every other fix is computed on (a length below lmin):
   * fix-all applies it before the others, so a ratio trim is not sized on a length that must change.
   */
  fixFirst?: true;
}

export const DESIGN_RULES: readonly RuleInfo[] = [
  {
    code: 'not-saturated', severity: 'error',
    summary: 'A device of the mirror is not in saturation (triode or cut off) at the nominal output voltage, or leaves saturation inside output.range.',
    why: 'A mirror copies its current only while every device is saturated; in triode the output current follows the output voltage and the ratio is lost.',
    fix: 'Lower the overdrive by widening the mirror (every device by the same factor, so the ratios hold), or move the output voltage away from the rail. The quick fix widens to restore limits.margin.',
  },
  {
    code: 'not-forward-active', severity: 'error',
    summary: 'A bipolar device is saturated (VCE below process vcesat) or cut off at the nominal output voltage.',
    why: 'A bipolar mirror copies its current only while every device is forward-active; a saturated device takes base current and its collector current follows VCE.',
    fix: 'Give the collector more voltage: move the output voltage away from the rail, or use a kind with fewer VBE in the output stack. No size restores it, so no quick fix is offered.',
  },
  {
    code: 'low-margin', severity: 'warning',
    summary: 'A device is saturated but its margin VDS − VDSsat is below limits.margin.',
    why: 'A small margin is eaten by process, temperature and supply variation; the device slips into triode at a corner.',
    fix: 'Widen the mirror (lower overdrive) or, for a wide-swing cascode with a written vbias, use the bias qpoint picks. Both are offered as quick fixes.',
  },
  {
    code: 'ratio-error', severity: 'error',
    summary: 'The current ratio iout/iin misses require.ratio (or the geometric ratio when none is required) by more than limits.error.',
    why: 'The copied current is off target; the message splits the error into VDS mismatch (length modulation), body effect and geometry.',
    fix: 'For a VDS mismatch, remove the cause: the balanced Wilson, a longer channel at constant W/L, a cascode, or an integer m; a width trim of the output device (including length modulation) is the last option. For a sizing error, size the output device (m, or W).',
  },
  {
    code: 'vds-mismatch', severity: 'warning',
    summary: 'The VDS of the mirror pair differs enough to move the ratio by half the error budget or more.',
    why: 'Length modulation turns a VDS difference into a current error that changes with the output voltage.',
    fix: 'Wilson: switch to the balanced Wilson (quick fix). Simple mirror: a cascode holds the output device at the reference VDS.',
  },
  {
    code: 'low-rout', severity: 'error',
    summary: 'The output resistance is below require.rout.',
    why: 'The output current changes with the output voltage by ΔV/Rout; too little Rout costs gain or supply rejection downstream.',
    fix: 'Lengthen the devices at constant W/L (ro grows with L, a cascode as L²); the quick fix computes the length.',
  },
  {
    code: 'compliance', severity: 'error',
    summary: 'The output voltage limit (lowest for NMOS, highest for PMOS, where every device is still saturated) is worse than require.compliance or than the far end of output.range.',
    why: 'Below the compliance voltage the mirror stops being a current source, so the circuit it feeds loses its bias.',
    fix: 'Widen the mirror to lower the overdrives (the quick fix computes the factor), or use a wide-swing cascode.',
  },
  {
    code: 'high-sigma', severity: 'error',
    summary: 'The 1σ random error of the output current (Pelgrom) is above require.sigma.',
    why: 'Random mismatch sets how far two nominally equal copies differ on silicon; it shrinks only with area.',
    fix: 'Scale the gate area at constant W/L: σ ∝ 1/√(W·L) (Pelgrom 1989); the quick fix computes the area and verifies it.',
  },
  {
    code: 'noise-high', severity: 'error',
    summary: 'The output current noise density at analysis.noise.f is above require.noise.',
    why: 'A bias line carries its devices\' thermal and flicker noise into the circuit it biases (an LNA, an ADC); the finding names the device with the largest share.',
    fix: 'Flicker: enlarge the dominant device\'s gate area at constant W/L (flicker ∝ 1/(W·L)); thermal: lower gm (longer L); a gate filter\'s capacitor when its resistor dominates. Quick fixes lengthen at constant W/L or set the filter c, verified by re-solving.',
  },
  {
    code: 'filter-adds-noise', severity: 'warning',
    summary: 'A gate filter raises the output noise at analysis.noise.f instead of lowering it.',
    why: 'Below the filter pole the series resistor\'s own noise 4kT·R reaches the output gates; it is usually far above the diode\'s 4kT·γ/gm that the filter was meant to block.',
    fix: 'A larger c (pole well below f) or a smaller r; the quick fix computes the c, verified by re-solving.',
  },
  {
    code: 'tc-high', severity: 'error',
    summary: 'The output current\'s temperature coefficient (or its box figure over process.trange) is above require.tc.',
    why: 'A bias current that drifts moves every gm and slew rate it sets over temperature.',
    fix: 'Move the overdrive toward the zero-TC point 2·|tcv|·T/|bex|, or cancel the drift with a resistor tc1; the quick fix widens the mirror when that meets the limit (verified).',
  },
  {
    code: 'supply-sensitivity-high', severity: 'error',
    summary: 'The output current\'s supply sensitivity (vdd/iout)·∂iout/∂vdd is above require.supplySensitivity.',
    why: 'Supply ripple and droop reach the biased circuit as current changes; a resistor from the supply sets a current that follows the supply almost one for one.',
    fix: 'A longer output device or a cascode (higher output resistance), or a self-biased reference instead of a resistor; the quick fix lengthens at constant W/L when that meets the limit (verified).',
  },
  {
    code: 'input-headroom', severity: 'error',
    summary: 'The input branch needs more voltage than the supply leaves: the input node is within limits.sourceHeadroom of the opposite rail, or a resistor input is left with less than that across it.',
    why: 'The current source feeding the mirror needs voltage across it to stay a current source; a resistor with little voltage across it sets a current that follows the threshold voltage, not the resistor.',
    fix: 'Widen the input devices (lower VGS) or use a stack with fewer gate-source drops; the quick fix widens the mirror.',
  },
  {
    code: 'square-law-weak-inversion', severity: 'info',
    summary: 'A square-law device runs at an inversion coefficient below 1 (moderate or weak inversion).',
    why: 'The square law overestimates gm/ID and misplaces VDSsat there; the numbers are less trustworthy.',
    fix: 'Use `model: ekv` in process (offered as a quick fix when the whole file still checks clean with it).',
  },
  {
    code: 'table-range', severity: 'warning',
    summary: 'A device given by a characterisation table operates outside the table\'s grid (vgs, vds, vsb, l or temperature).',
    why: 'Outside the grid qpoint clamps: the interpolant continues along its end tangent, so the figures are not from the designer\'s data.',
    fix: 'Extend the table\'s grid to cover the operating point (or move the device into it: another length, another overdrive). No quick fix.',
  },
  {
    code: 'below-lmin', severity: 'error', fixFirst: true,
    summary: 'A drawn length is below the process lmin.',
    why: 'The process cannot draw it, and the models are not valid there.',
    fix: 'Raise L to lmin at constant W/L (quick fix).',
  },
  {
    code: 'below-wmin', severity: 'error', fixFirst: true,
    summary: 'A drawn width is below the process wmin.',
    why: 'The process cannot draw it, and narrow-width effects are outside the models.',
    fix: 'Raise W to wmin at constant W/L (quick fix).',
  },
  {
    code: 'vbias-triode', severity: 'error',
    summary: 'The written vbias of a wide-swing cascode leaves a device in triode.',
    why: 'Too low a cascode bias starves the mirror devices of VDS; too high a bias starves the cascodes.',
    fix: 'Use the value qpoint picks (ref at VDS = VDSsat + limits.margin), offered as a quick fix, or remove vbias to let qpoint pick it.',
  },
  {
    code: 'stack-over-supply', severity: 'error',
    summary: 'The solve puts a node outside the rails: the devices stacked between the mirror\'s rail and that node need more voltage to carry their current than the supply gives. The message names the stack, the voltage it needs and the supply.',
    why: 'No operating point exists (the current source feeding the stack would leave its own compliance), so no figure of this mirror means anything and no other finding is raised for it.',
    fix: 'Lower the gate-source drops: wider or shorter devices, fewer stacked devices (a wide-swing instead of a plain cascode), or less current. No quick fix: the right change is a design choice.',
  },
  {
    code: 'output-beyond-reach', severity: 'error',
    summary: 'A Wilson (plain or balanced) has no operating point because its output voltage lies where its output stack cannot conduct: on the rail side of the diode node `out` stands on, or — the solve having run a node past a rail — so far short of `out`\'s saturation that in triode it needs more gate drive than the supply gives. The message gives both edges in numbers.',
    why: 'The output device passes the output current into the reference diode; with the output on the wrong side of that diode\'s VGS it cannot pass it forwards, the reference starves and no DC operating point exists — the solver is right not to find one.',
    fix: 'Move the output voltage (the load sets it) past the saturation edge, lower the diode\'s VGS (wider or shorter devices, or less current: the message says when no sizing can reach), or use a kind that reaches nearer the rail (a wide-swing cascode needs two VDSsat, a simple mirror one). No quick fix: the output voltage is the load\'s, not the mirror\'s.',
  },
  {
    code: 'no-convergence', severity: 'error',
    summary: 'The DC solve of the mirror did not converge; the message says what was tried.',
    why: 'No operating point, no checks: the other figures of this mirror are not reported.',
    fix: 'Check supplies, currents and sizes for something the circuit cannot carry (a current larger than the devices pass at the supply, a floating node in a netlist).',
  },
  {
    code: 'no-startup', severity: 'error',
    summary: 'A self-biased circuit (a reference kind, or a netlist without input) has a consistent zero-current state and no start-up element.',
    why: 'Every self-biased loop can also rest with no current in any branch; the solver never shows that state (gmin and weak-inversion current hide it), but a powered-up chip may sit there.',
    fix: 'Add a start-up element that conducts while the loop is off. For the reference kinds the quick fix adds `startup: { w, l }`, a narrow long device diode-connected from the closing mirror\'s gate line into the loop.',
  },
  {
    code: 'startup-inactive', severity: 'error',
    summary: 'The start-up element stays off in the zero-current state.',
    why: 'A start-up element that does not conduct when every loop device is off leaves the zero-current state consistent: the loop is not started.',
    fix: 'Connect it across nodes that sit at opposite rails while the loop is off, or raise the supply above |VTp| + VTn + its own threshold. No quick fix.',
  },
  {
    code: 'startup-leak', severity: 'warning',
    summary: 'The start-up element carries more than 1 % of the smallest loop branch current at the operating point.',
    why: 'A start-up element that stays on adds its current to the loop and moves the reference current.',
    fix: 'A longer start-up device (offered as a quick fix, verified by re-solving), or a connection whose gate drive falls below its threshold once the loop runs.',
  },
];

export const RULES_BY_CODE: ReadonlyMap<string, RuleInfo> = new Map(DESIGN_RULES.map((r) => [r.code, r]));
