/**
 * Plain, JSON-serialisable types shared by every part of the core and the front ends.
 * Units: SI base units throughout (A, V, m, Ω, S, K) unless a doc comment says otherwise.
 * Positions are 0-based lines and UTF-16 characters, as in the Language Server Protocol.
 */
import type { MirrorKind, TemplateKind } from './kinds/names';

// ───────────────────────────── positions, findings, edits ─────────────────────────────

export interface Position { line: number; character: number }
export interface Range { start: Position; end: Position }

/** Path into the spec document, e.g. ['mirrors', 0, 'devices', 'out', 'w']. */
export type SpecPath = (string | number)[];

export type Severity = 'error' | 'warning' | 'info';

/** A minimal text replacement: `range` (in the original text) becomes `newText`. */
export interface TextEdit { range: Range; newText: string }

export interface Fix {
  title: string;
  edits: TextEdit[];
  /** The one fix a "fix all" applies for this finding. */
  preferred?: boolean;
}

export interface RelatedLocation { path: SpecPath; range: Range; message: string }

export interface Finding {
  severity: Severity;
  /** Stable kebab-case code, documented in docs/findings.md. */
  code: string;
  /** One line: what is wrong, in numbers, and what would fix it. */
  message: string;
  path: SpecPath;
  /** The narrowest range: the value that must change, else its key. */
  range: Range;
  related?: RelatedLocation[];
  fixes?: Fix[];
}

// ───────────────────────────── resolved spec (after elaboration) ─────────────────────────────

export type Polarity = 'nmos' | 'pmos';
/** Bipolar device types (design §10): an NPN sits where an NMOS would, a PNP where a PMOS would. */
export type BipolarType = 'npn' | 'pnp';
/** Every device type a mirror or a netlist device may name. */
export type DeviceType = Polarity | BipolarType;
/** The kinds are described once, in src/core/kinds/. */
export type { MirrorKind, TemplateKind };
export type ModelKind = 'square-law' | 'ekv' | 'table';

/** A characterisation table as read (design §11): every axis ascending, a full grid. Not
 *  JSON-serialisable (a typed array); it stays inside the core. */
export interface DeviceTable {
  /** The `table:` value as written (a file name relative to the spec). */
  file: string;
  l: number[];       // m
  vgs: number[];     // V (magnitudes for PMOS)
  vds: number[];     // V
  vsb: number[];     // V
  /** K, when the table has a temperature column (or several files, one per temperature). */
  temperature?: number[];
  /** A per metre of width at [t][l][vsb][vds][vgs] (vgs fastest); 0 on a vds = 0 row. */
  id: Float64Array;
}

/** Process parameters of one device type, every default filled. PMOS vt0 is a magnitude. */
export interface DeviceParams {
  kp: number;        // A/V², µ·Cox at tnom
  vt0: number;       // V, at tnom (magnitude for PMOS)
  lambda: number;    // 1/V, at lref when lref is given
  lref?: number;     // m; λ(L) = lambda·lref/L when present
  gamma: number;     // √V
  phi: number;       // V (2φF)
  n: number;         // EKV slope factor
  tcv: number;       // V/K
  bex: number;       // mobility temperature exponent
  avt?: number;      // V·m, Pelgrom threshold coefficient (pair)
  abeta?: number;    // m, Pelgrom current-factor coefficient (pair, relative)
  lmin?: number;     // m
  wmin?: number;     // m
  /** The device's characterisation table: its devices follow the table model (kp and vt0 are
   *  then not read). */
  table?: DeviceTable;
}

/** Bipolar process parameters of one type (design §10), every default filled. */
export interface BipolarParams {
  is: number;        // A, saturation current of one unit-area device at tnom
  bf: number;        // forward current gain βF at tnom
  br: number;        // reverse current gain βR
  vaf?: number;      // V, forward Early voltage; absent: no Early effect
  eg: number;        // eV, band gap for IS(T)
  xti: number;       // IS temperature exponent
  xtb: number;       // βF temperature exponent
  vcesat: number;    // V, the VCE below which a device counts as saturated
  ais?: number;      // relative, σ(ΔIS/IS) of a pair of unit-area devices
  abf?: number;      // relative, σ(Δβ/β) of a pair of unit-area devices
}
/** The numeric device parameters (every key but `table`): what corners shift and the spec reads by rule. */
export type NumericParam = Exclude<keyof DeviceParams, 'table'>;

/** A named device flavour of the process (`process.devices`): thin- or thick-oxide, low-VT… */
export interface DeviceFlavour { type: Polarity; params: DeviceParams }

export interface ProcessSpec {
  model: ModelKind;
  tnom: number;         // K
  temperature: number;  // K
  grid?: number;        // m
  nmos: DeviceParams;
  pmos: DeviceParams;
  /** Present when the spec gives them (a mirror or a netlist device of that type needs them). */
  npn?: BipolarParams;
  pnp?: BipolarParams;
  /** Device flavours by name; a template mirror picks one with `device:`. */
  devices?: Record<string, DeviceFlavour>;
}

export interface Supplies { vdd: number; vss: number }

export interface Limits {
  margin: number;          // V, minimum VDS − VDSsat counted as safely saturated
  error: number;           // relative, allowed systematic ratio error
  sourceHeadroom: number;  // V, what an input current source needs across it
  /** relative: allowed total (systematic + random) ratio deviation of one Monte Carlo sample;
   *  the Monte Carlo yield counts the samples within it. */
  tolerance: number;
  /** A, optional budget for the current the whole spec draws from the supply (`supply-budget`). */
  supplyCurrent?: number;
}

export type BulkTie = 'rail' | 'source';

/** One device's size. `auto` marks a value qpoint computes (design targets); until the sizing
 *  pass runs, an auto value holds a provisional number. */
export interface DeviceSize {
  w: number;
  l: number;
  m: number;
  bulk: BulkTie;
  auto?: { w?: boolean; l?: boolean };
  /** Bipolar devices: emitter-area multiple of the unit device (w and l are unused, 0). */
  area?: number;
}

export type InputSource =
  | { kind: 'current'; i: number }            // A, ideal
  | { kind: 'resistor'; r: number }           // Ω, to the opposite rail
  | { kind: 'self' }                          // a self-biased reference: its loop sets the current
  | LinkInput;                                // fed by another mirror's output (design §9.1)

/** `input: { from: PATH }`: this mirror's input node is the named output's node. `i` is the current
 *  that arrives (A): the intended current until the network is solved (src/core/network/), the
 *  solved link current after; a mirror measured alone sees it as an ideal input. */
export interface LinkInput {
  kind: 'link';
  /** The path as written: `mirror` or `mirror.output`. */
  from: string;
  /** File index of the feeding mirror and the index of its output. */
  mirror: number;
  output: number;
  i: number;
}

export interface OutputSpec {
  v: number;                     // V, nominal output voltage (absolute)
  range?: [number, number];      // V, must work across it
}

export interface Requirements {
  ratio?: number;
  rout?: number;        // Ω, minimum
  compliance?: number;  // V, absolute: NMOS must work down to it, PMOS up to it
  sigma?: number;       // relative, maximum
}

/** Design target for auto sizing. */
export type DesignTarget =
  | { kind: 'vov'; value: number }
  | { kind: 'gmid'; value: number }
  | { kind: 'ic'; value: number };

/** One measured output of a mirror. A mirror without `outputs:` has exactly one, named like
 *  the mirror, whose path is the mirror's path. */
export interface MirrorOutput {
  name: string;
  /** Sizes of this output's roles (the kind's outputRoles), every default filled. */
  devices: Record<string, DeviceSize>;
  output: OutputSpec;
  require: Requirements;
  /** ['mirrors', i] or ['mirrors', i, 'outputs', j]. */
  path: SpecPath;
  /** File index of the mirror whose input this output feeds; its `output.v` is then the solved
   *  node voltage (the supplies' midpoint until the network is solved), not a written one. */
  feeds?: number;
}

export interface TemplateMirror {
  kind: TemplateKind;
  name: string;
  type: DeviceType;
  input: InputSource;
  /** Sizes of the reference roles (the kind's roles minus its outputRoles), every default filled. */
  devices: Record<string, DeviceSize>;
  /** Wide-swing only: the cascode gate voltage (absolute V); absent = picked by qpoint. */
  vbias?: number;
  /** The process device flavour its devices are (`process.devices`); absent = process.nmos/pmos. */
  device?: string;
  design?: DesignTarget;
  /** Widlar only: the resistor in the output device's emitter (Ω). */
  degeneration?: number;
  /** Reference kinds: the loop resistor (Ω, `resistor:`). */
  resistor?: number;
  /** Reference kinds: the start-up device (`startup:`), absent when none is written. */
  startup?: DeviceSize;
  outputs: MirrorOutput[];
  path: SpecPath;  // ['mirrors', i]
}

export interface NetlistMosDevice {
  name: string;
  type: Polarity;
  d: string; g: string; s: string; b: string;
  w: number; l: number; m: number;
}
/** A bipolar device of a netlist (BiCMOS): collector, base, emitter, emitter-area multiple. */
export interface NetlistBipolarDevice {
  name: string;
  type: BipolarType;
  c: string; b: string; e: string;
  area: number; m: number;
}
export type NetlistDevice = NetlistMosDevice | NetlistBipolarDevice;
export interface NetlistCurrentSource { name: string; from: string; to: string; i: number }
export interface NetlistVoltageSource { name: string; node: string; v: number }
export interface NetlistResistor { name: string; a: string; b: string; r: number }

/** Node names `vdd`, `vss` (and `0`, `gnd` = vss) are the supply rails. */
export interface NetlistMirror {
  kind: 'netlist';
  name: string;
  type: DeviceType;
  devices: NetlistDevice[];
  currents: NetlistCurrentSource[];
  voltages: NetlistVoltageSource[];
  resistors: NetlistResistor[];
  /** The measured output: node held at v by an ideal source. */
  output: { node: string; v: number; range?: [number, number] };
  /** The current source whose current is iin; absent for a self-biased netlist (then iin,
   *  ratio and error are absent). */
  input?: { source: string };
  /** Extra devices judged as the start-up element (`startup:`), in the netlist's device format. */
  startup?: NetlistDevice[];
  /** Optional mirror pair for ratioIdeal: names of the reference and output devices. */
  pair?: { ref: string; out: string };
  require: Requirements;
  path: SpecPath;
}

export type ResolvedMirror = TemplateMirror | NetlistMirror;

export type ParamDelta = { add: number } | { scale: number };  // scale: multiply by (1 + scale)

export interface CornerSpec {
  name: string;
  nmos: Partial<Record<NumericParam, ParamDelta>>;
  pmos: Partial<Record<NumericParam, ParamDelta>>;
  /** Tables the corner puts in place of the process's (a foundry's ss/ff characterisation). */
  tables?: { nmos?: DeviceTable; pmos?: DeviceTable };
  temperature?: number;  // K
  vdd?: number;
  vss?: number;
  path: SpecPath;
}

export interface ResolvedSpec {
  format: 1;
  title?: string;
  process: ProcessSpec;
  supplies: Supplies;
  limits: Limits;
  params: Record<string, number>;
  mirrors: ResolvedMirror[];
  corners: CornerSpec[];
  /** Linked groups of mirrors, solved as one circuit each (src/core/network/); absent when the
   *  spec has no links. */
  networks?: SolvedNetwork[];
}

/** One connected group of linked mirrors after its joint solve. */
export interface SolvedNetwork {
  /** File index of the root mirror (its input is a current or a resistor) and of every member,
   *  root first, each after the mirror that feeds it. */
  root: number;
  members: number[];
  converged: boolean;
  solveNote?: string;
  /** A, the root's input current at the joint solution. */
  rootCurrent: number;
  /** A, the current each supply delivers, each leaf output's current counted as flowing
   *  between the rails through its load. */
  supplyCurrent: { vdd: number; vss: number };
  /** W. */
  power: number;
  /** Per output of every member, by `mirrorIndex:outputIndex`. */
  outputs: Record<string, SolvedNetworkOutput>;
}

export interface SolvedNetworkOutput {
  /** A, the output's current in the joint circuit. */
  i: number;
  /** V, the solved voltage of a linked output's node. */
  v?: number;
  /** Relative 1σ of the output's current from every device on its path, joint linearized
   *  circuit (leaf outputs); absent when the process has no Pelgrom coefficients. */
  chainSigma?: number;
}

// ───────────────────────────── reports ─────────────────────────────

/** MOSFET: cutoff, triode, saturation (the working region). Bipolar: cutoff, saturation,
 *  forward-active (the working region). */
export type Region = 'cutoff' | 'triode' | 'saturation' | 'forward-active';
export type Inversion = 'weak' | 'moderate' | 'strong';

/** Operating point of one MOSFET. Voltages are magnitudes in the device's own polarity
 *  (VSG, VSD, VSB for PMOS). */
export interface MosDeviceReport {
  name: string;
  role: string;
  type: Polarity;
  w: number; l: number; m: number;
  /** True when w or l was computed by qpoint (auto sizing). */
  sized?: boolean;
  id: number;
  vgs: number; vds: number; vbs: number;
  vth: number; vov: number; vdsat: number;
  margin: number;          // vds − vdsat
  region: Region;
  inversion: Inversion;
  ic: number;              // inversion coefficient
  gm: number; gds: number; gmb: number;
  ro: number;
  gmId: number;            // gm/ID, 1/V
  // A bipolar device's own fields never appear on a MOSFET's report (the union reads by key).
  area?: never; ib?: never; vbe?: never; vce?: never; vcesat?: never; rpi?: never; beta?: never;
  /** The characterisation table the device's figures come from (its `table:` value), when
   *  it is a table device. */
  table?: string;
}

/** Operating point of one bipolar device (design §10). Voltages are magnitudes in the device's
 *  own polarity (VEB, VEC for PNP); `ic` is the collector current (not an inversion
 *  coefficient as for a MOSFET). */
export interface BipolarDeviceReport {
  name: string;
  role: string;
  type: BipolarType;
  area: number; m: number;
  ic: number; ib: number;
  vbe: number; vce: number;
  /** V, process.<type>.vcesat: the VCE the margin is counted from. */
  vcesat: number;
  margin: number;          // vce − vcesat
  region: Region;          // forward-active | saturation | cutoff
  gm: number;              // ∂IC/∂VBE, S
  rpi: number;             // ∂VBE/∂IB, Ω
  ro: number;              // ∂VCE/∂IC, Ω
  gds: number;             // 1/ro, S (the output conductance under its MOSFET name)
  beta: number;            // IC/IB
  // A MOSFET's own fields never appear on a bipolar report.
  w?: never; l?: never; sized?: never; id?: never; vgs?: never; vds?: never; vbs?: never; vth?: never;
  vov?: never; vdsat?: never; inversion?: never; gmb?: never; gmId?: never; table?: never;
}

export type DeviceReport = MosDeviceReport | BipolarDeviceReport;

/** Split of the systematic ratio error into its causes (relative, they add up to ≈ error). */
/** Causes of the systematic ratio error (analysis/errorSplit.ts); `gate` only when the pair's
 *  VGS differ (a netlist pair on different gate or source nodes). */
export interface MosErrorSplit { vds: number; body: number; geometry: number; gate?: number; base?: never; vce?: never }
/** Causes of a bipolar mirror's systematic error: base currents, the VCE mismatch through the
 *  Early effect, and what the area ratio alone does not explain. */
export interface BipolarErrorSplit { base: number; vce: number; geometry: number; vds?: never; body?: never; gate?: never }
export type ErrorSplit = MosErrorSplit | BipolarErrorSplit;

export interface CornerResult {
  name: string; converged: boolean;
  iin: number; iout: number; ratio: number; error: number;
  rout: number; compliance: number; sigma?: number;
  /** Worst device margin at this corner (V) and which device. */
  minMargin?: number; minMarginDevice?: string;
}

export interface MonteCarloResult {
  samples: number; seed: number;
  mean: number;     // A, mean of iout
  sigma: number;    // relative 1σ of iout
  min: number; max: number;   // A
  yield: number;    // fraction meeting every requirement
  /** Histogram of iout for plots: bin edges (A, length bins+1) and counts. */
  histogram?: { edges: number[]; counts: number[] };
  /** Samples whose solve did not converge (counted as failing the yield); absent when none. */
  failed?: number;
  /** Why samples failed the yield, each counted once at its first failing check: solve did not
   *  converge, a device out of saturation at the nominal output, ratio outside limits.error,
   *  not saturated at require.compliance. */
  failures?: { convergence: number; saturation: number; ratio: number; compliance: number };
}

/** The start-up check of a self-biased circuit (design §9.2, analysis/startup.ts). */
export interface StartupReport {
  /** An all-off state is consistent without the start-up element: every loop device can sit in
   *  cutoff with zero current in every branch. */
  zeroState: boolean;
  /** A start-up element is written. */
  element: boolean;
  /** With an element: it conducts in every zero-current state (so that state is no longer
   *  consistent and the loop is started). */
  conducts?: boolean;
  /** With an element: A, its current at the operating point, and the limit it must stay below
   *  (1 % of the smallest branch current of the loop). */
  current?: number;
  limit?: number;
}

/** What a self-biased reference (a reference kind, or a netlist without input) reports. */
export interface ReferenceReport {
  /** A, the loop current: a reference kind's resistor current (the current the loop sets; iin
   *  is `ref`'s, which the taps copy); a netlist's smallest branch current. */
  current: number;
  /** Loop gain at the operating point (< 1: the operating point is stable), from the return
   *  difference of the loop's breaking device; absent for a netlist. */
  loopGain?: number;
  startup: StartupReport;
}

export interface CurvePoint { vout: number; iout: number; rout: number; converged: boolean }

export interface MirrorReport {
  /** Output name: the mirror's name, or `mirror.output` for an output of a bias bank. */
  name: string;
  mirror: string;
  output?: string;
  kind: MirrorKind;
  type: DeviceType;
  converged: boolean;
  iterations: number;
  residual: number;
  /** When not converged: what the solver tried, for the finding. */
  solveNote?: string;
  /** Not converged because the solve put a node outside the rails: that node, the rail it
   *  passes, the chain of devices from the mirror's own rail to it (input stack first) and the
   *  voltage (V) that chain takes to carry its current, against the supply. */
  beyondRails?: { node: string; v: number; rail: 'vdd' | 'vss'; stack: string[]; need: number };
  vout: number;        // V, nominal output voltage (absolute)
  /** Absent for a self-biased netlist (it has no input). */
  iin?: number;
  iout: number;
  ratio?: number;
  ratioIdeal?: number;
  error?: number;
  errorSplit?: ErrorSplit;
  rout: number;
  routApprox?: number;
  compliance: number;  // V, absolute
  /** Set when no output voltage within the supplies saturates every device: `device` is out of
   *  saturation at every Vout (an input-side device in triode, say). There is no compliance
   *  figure then; `compliance` holds the far rail only as design §4's placeholder. */
  noCompliance?: { device: string };
  sigma?: number;
  /** A self-biased reference: its current, loop gain and start-up check. */
  reference?: ReferenceReport;
  /** Wide-swing: the cascode gate voltage used (V, absolute) and whether qpoint picked it. */
  vbias?: number;
  vbiasPicked?: boolean;
  /** Absolute node voltages of the nominal solve. */
  nodes: Record<string, number>;
  /** The measured circuit's devices; a bank output lists the shared reference and its own
   *  devices (`<output>.<role>`), not its siblings'. */
  devices: DeviceReport[];
  /** Where the measured output is written: ['mirrors', i] or ['mirrors', i, 'outputs', j]. */
  path: SpecPath;
  /** The mirror's index in the file's `mirrors` list (look it up with `mirrorAt`). */
  mirrorIndex: number;
  /** The output's index in the mirror's outputs (0 for a single-output mirror and a netlist). */
  outputIndex: number;
  corners?: CornerResult[];
  mc?: MonteCarloResult;
  /** Iout and Rout versus Vout across the supply (for plots), when requested. */
  curve?: CurvePoint[];
  /** The requirements this output is checked against (design §2 `require`), for the panel and
   *  reports; whether each is met follows from the findings on this output. */
  require?: Requirements;
  // ── bias networks (design §9.3): present on outputs of linked mirrors ──
  /** The mirror this output feeds (its name). */
  feeds?: string;
  /** The output feeding this mirror's input, as `mirror` or `mirror.output` (report name). */
  fedBy?: string;
  /** A, the root current times the ideal ratios along the path (a resistor-fed root starts from
   *  its solved input current). */
  intended?: number;
  /** iout/intended − 1: every stage's systematic error compounded. */
  chainError?: number;
  /** Relative 1σ of iout from every device on the path from the root. */
  chainSigma?: number;
  /** V, the solved node voltage of a linked output (the fed mirror's input node). */
  linkV?: number;
  /** V, how far linkV lies inside the output's own compliance limit (< 0: out of saturation). */
  headroom?: number;
  /** The root mirror's name of the network this output belongs to. */
  network?: string;
}

/** Where a mirror, output or device sits in the source, for hover and the panel's reveal. */
export interface Anchor {
  kind: 'mirror' | 'output' | 'device';
  path: SpecPath;
  /** The key's range (the mirror's `name` value for a mirror). */
  range: Range;
  /** MirrorReport.name this anchor belongs to (the first output's name for a bank's mirror). */
  report: string;
  /** DeviceReport.name, for a device anchor. */
  device?: string;
}

export interface FileReport {
  file: string;
  /** False when the text could not be parsed at all (YAML syntax error): CLI exit 2. */
  parsed: boolean;
  title?: string;
  mirrors: MirrorReport[];
  findings: Finding[];
  anchors: Anchor[];
  /** The limits the findings judged against (V and fraction), for front ends that mark values
   *  against requirements (the panel's corner table). Not part of the CLI's JSON. */
  limits?: { error: number; margin: number };
  /** Mirrors left unsolved because they have errors (the rest are solved); fixes are offered
   *  once there are none. Not part of the CLI's JSON. */
  withheld?: WithheldMirror[];
  /** What a schematic needs beyond the figures, per mirror: how a template's input is driven
   *  and a netlist's own wiring (src/core/schematic/). Not part of the CLI's JSON. */
  wiring?: MirrorWiring[];
  /** Linked groups of mirrors (design §9.3), root first; absent without links. */
  networks?: NetworkReport[];
}

/** One mirror's wiring for its schematic: a template kind's input source, or a netlist's parts
 *  on their nodes. */
export interface MirrorWiring {
  mirrorIndex: number;
  input?: InputSource;
  /** A Widlar's emitter resistor (Ω), drawn from its kind's degeneration node to the rail. */
  degeneration?: number;
  /** A reference kind's loop resistor (Ω): every resistor of its loop takes this value. */
  loopResistor?: number;
  netlist?: {
    devices: { name: string; d: string; g: string; s: string }[];
    currents: NetlistCurrentSource[];
    voltages: NetlistVoltageSource[];
    resistors: NetlistResistor[];
    /** The measured output node. */
    output: string;
  };
}

/** One bias network: a root and the mirrors it feeds, solved as one circuit. */
export interface NetworkReport {
  /** Root mirror's name and file index. */
  root: string;
  rootIndex: number;
  /** Member mirrors' names, root first, each after the mirror feeding it. */
  members: string[];
  converged: boolean;
  /** A, the current drawn from each supply (each leaf's current counted through its load). */
  supplyCurrent: { vdd: number; vss: number };
  /** W. */
  power: number;
  /** Report names (`MirrorReport.name`) of the leaf outputs, and the one with the largest
   *  |chainError|. */
  leaves: string[];
  worstLeaf?: string;
}

/** A mirror set aside for its errors: its place in the file and where its name is written. */
export interface WithheldMirror {
  index: number;
  name?: string;
  /** The mirror's `name` value, else the mirror's item. */
  range: Range;
}
