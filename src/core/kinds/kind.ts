/**
 * What qpoint knows about one template mirror kind (design §2, §4): its roles, how they are
 * wired, which devices carry the input current, the pair that sets the ideal ratio, what the
 * spec may say about it, and its textbook output resistance. One file per kind describes it;
 * the circuit builder, the spec reader, sizing and the rules read the description.
 */

/** Device families a kind can be built from: `mosfet` (type nmos | pmos) and `bipolar` (type
 *  npn | pnp). A bipolar device takes the role's connections as collector (d), base (g) and
 *  emitter (s). */
export type DeviceFamily = 'mosfet' | 'bipolar';

/**
 * Drain, gate and source of one role, on named nodes. `R` is the mirror's own rail, `T` the
 * opposite rail (a beta helper's collector), `O` the output node and `C` the output's internal
 * cascode node (both one per output of a bias bank), `vbias` the held cascode gate; any other
 * name is an internal node of the shared reference. `other` marks a device of the opposite polarity (a reference's closing
 * mirror), its bulk on the opposite rail.
 */
export interface Connection { d: string; g: string; s: string; other?: true }

/** The self-biased loop of a reference kind (design §9.2): no input, the loop sets its current. */
export interface ReferenceLoop {
  /** Resistors of the loop by name, between two nodes; their value is the mirror's `resistor`. */
  resistors: Readonly<Record<string, { a: string; b: string }>>;
  /** The device whose transconductance the loop gain is measured through (Bode's return
   *  difference of its gm: any controlled source of a single loop gives the same figure). */
  breakAt: string;
  /** Role scaled by `k:` (a MOSFET's width, a bipolar device's emitter area: K times the
   *  unit's), when the kind takes `k`. */
  scaled?: string;
  /** Where the start-up device sits: diode-connected from the closing mirror's gate line into
   *  the loop (conducts while the loop sits at zero current, off once it runs). It is a MOSFET
   *  of the mirror's side (nmos for npn) in a bipolar kind too: across vdd − 2·VBE a junction
   *  only falls a decade per 60 mV, a channel with its threshold above that is off. */
  startup: Connection;
  /** The textbook loop current, as the docs print it. */
  current: string;
}

/** Small-signal parameters of one device as the circuit sees them: gmb is zero for a device
 *  whose bulk is tied to its own source (the model's ∂ID/∂VBS exists, but VBS cannot move). */
export interface SmallSignal {
  gm: number; gds: number; gmb: number;
  /** Bipolar devices: rπ (Ω) and β = IC/IB. */
  rpi?: number; beta?: number;
}

/** What a formula may read beyond the devices: a Widlar's emitter resistor (Ω). */
export interface RoutContext { degeneration?: number }

/** A textbook first-order output resistance (design §4 routApprox). */
export interface RoutFormula {
  /** The formula as the docs print it. */
  formula: string;
  /** Its value from the devices' small-signal parameters by role; NaN or undefined when a
   *  device is missing. */
  value(byRole: Readonly<Record<string, SmallSignal | undefined>>, ctx: RoutContext): number | undefined;
}

/** ro of a device, NaN when it is missing or has no output conductance. */
export function ro(d: SmallSignal | undefined): number {
  return d && d.gds > 0 ? 1 / d.gds : NaN;
}

export interface KindSpec {
  /** Every role, in the order the docs and messages list them. */
  roles: readonly string[];
  /** Roles each output of a bias bank has its own copy of; the rest form the shared reference. */
  outputRoles: readonly string[];
  /** Reference-side connections, in the order the devices are built (and reported). */
  reference: Readonly<Record<string, Connection>>;
  /** Output-side connections, one set per output. */
  output: Readonly<Record<string, Connection>>;
  /** Self-biased references: the loop that sets the current (the mirror takes no `input`). */
  loop?: ReferenceLoop;
  /** The node the input current flows into (a reference: the node of the device whose current
   *  is reported as iin, the loop current). */
  inputNode: string;
  /** Devices between the source rail and the input node, rail first: they carry the input
   *  current and their VDS add up to the input node's voltage. */
  inputStack: readonly string[];
  /** The mirror pair: ratioIdeal is m·W/L of `out` over m·W/L of `ref` (design §4). */
  pair: { ref: string; out: string };
  /** Takes `outputs:` (one reference driving a bias bank). */
  bank: boolean;
  /** Takes `vbias:` (a cascode gate held at a bias voltage, picked by qpoint when absent). */
  vbias: boolean;
  /** Device families the kind may be built from, the first the one `rout` is written for. */
  families: readonly DeviceFamily[];
  /** The textbook first-order output resistance of the kind built from `families[0]`. */
  rout: RoutFormula;
  /** The bipolar form, for a kind of both families (β·ro/2 where the MOSFET's is gm·ro²). */
  bipolarRout?: RoutFormula;
  /** A resistor `degeneration:` (Ω, a key of the mirror) from this node to the rail. */
  degeneration?: string;
}
