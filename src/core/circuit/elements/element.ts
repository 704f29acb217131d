/**
 * The circuit's elements, a closed union. Every switch over `kind` ends in `assertNever`, so a
 * new element (a bipolar transistor, say) is one more member here plus its stamp module, and the
 * compiler names every switch that must learn it (stamp.ts, device.ts).
 */
import type { BipolarParams, BipolarType, DeviceParams, DeviceSize, Polarity } from '../../types';
import type { ModelDevice } from '../../models/device';
import type { BipolarDevice } from '../../models/bipolar';
import type { ResistorLaw } from '../resistance';

/** A MOSFET: terminals d, g, s, b are node indices. */
export interface MosElement {
  kind: 'mos';
  /** DeviceReport.name. */
  name: string;
  role: string;
  type: Polarity;
  size: DeviceSize;
  params: DeviceParams;
  dev: ModelDevice;
  d: number; g: number; s: number; b: number;
  /** Counted for the measured output's compliance (its own and the shared reference devices). */
  measured: boolean;
  /** The start-up element of a self-biased reference: reported, judged by the start-up check,
   *  never counted for compliance or saturation. */
  startup?: true;
  /** First of its Jacobian slots (JacobianPattern.slots), set when the circuit is built. */
  slot: number;
}

/** `e` with model device `dev`, copied field by field as the builder makes it (one hidden class
 *  for built and copied elements; Object.assign gives each copy a property store of its own). */
export function mosWith(e: MosElement, dev: ModelDevice): MosElement {
  const x: MosElement = {
    kind: 'mos', name: e.name, role: e.role, type: e.type, size: e.size, params: e.params, dev,
    measured: e.measured, d: e.d, g: e.g, s: e.s, b: e.b, slot: e.slot,
  };
  if (e.startup) x.startup = true;
  return x;
}

/** A bipolar transistor: terminals c, b, e are node indices. */
export interface BjtElement {
  kind: 'bjt';
  name: string;
  role: string;
  type: BipolarType;
  /** `area` and `m` (w and l unused). */
  size: DeviceSize;
  params: BipolarParams;
  dev: BipolarDevice;
  c: number; b: number; e: number;
  measured: boolean;
  /** The start-up element of a self-biased netlist (as MosElement's). */
  startup?: true;
  slot: number;
}

/** Conductance g (S) between nodes a and b; `law` when g follows the temperature. */
export interface ResistorElement { kind: 'resistor'; name: string; a: number; b: number; g: number; slot: number; law?: ResistorLaw }

/** Ideal current `i` (A) flowing from node `from` through the source into node `to`. */
export interface CurrentSourceElement { kind: 'current'; name: string; from: number; to: number; i: number }

/** Ideal source from the ground reference to `node`: the node is held (not an unknown) at
 *  circuit.fixedV[node]; the current it delivers is minus that node's KCL residual. */
export interface VoltageSourceElement { kind: 'voltage'; name: string; node: number }

/** Capacitance c (F) between nodes a and b: open at DC, jωc in the noise analysis. */
export interface CapacitorElement { kind: 'capacitor'; name: string; a: number; b: number; c: number }

export type CircuitElement = MosElement | BjtElement | ResistorElement | CurrentSourceElement | VoltageSourceElement | CapacitorElement;

/** The transistors: reported per device, counted for compliance, perturbed for mismatch. */
export type DeviceElement = MosElement | BjtElement;

export function assertNever(x: never): never {
  throw new Error(`unhandled circuit element: ${JSON.stringify(x)}`);
}
