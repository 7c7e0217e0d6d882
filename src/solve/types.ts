// The DC operating point: what the bias solve hands to the small-signal stage and the rules.
// Device currents are in the device's normal direction (positive in normal operation for both
// polarities); terminal voltages are raw node differences (negative for PNP/PMOS when on).

export type BjtRegion = "active" | "saturation" | "cutoff" | "reverse";
export type MosRegion = "saturation" | "triode" | "cutoff";

/**
 * A nonlinear device linearised at its operating point: the indefinite admittance matrix
 * y[i·n + j] = ∂I(pin i, into the device) / ∂V(pin j), over the device's pin nodes (node names,
 * possibly repeated; ground included by name). Rows and columns sum to zero. The small-signal
 * stage stamps it as it is, so the polarity of PNP/PMOS is already inside it.
 */
export interface Linearised {
  readonly pins: readonly string[];
  readonly y: readonly number[];
}

export interface BjtPoint {
  readonly kind: "npn" | "pnp";
  readonly collectorCurrent: number;
  readonly baseCurrent: number;
  readonly emitterCurrent: number;
  readonly baseEmitterVoltage: number;
  readonly collectorEmitterVoltage: number;
  readonly region: BjtRegion;
  /** |VCE| − saturationEdge, V. */
  readonly headroom: number;
  readonly power: number;
  readonly transconductance: number;
  readonly inputResistance: number;
  readonly emitterResistance: number;
  readonly outputResistance: number;
  readonly linear: Linearised;
}

export interface MosPoint {
  readonly kind: "nmos" | "pmos";
  readonly drainCurrent: number;
  readonly gateSourceVoltage: number;
  readonly drainSourceVoltage: number;
  /** Polarity-normalised overdrive |Vgs| − |Vt| (with body effect), V. */
  readonly overdrive: number;
  /** Threshold at this point, signed as the model writes it, body effect included. */
  readonly threshold: number;
  readonly region: MosRegion;
  /** |VDS| − |Vov|, V. */
  readonly headroom: number;
  readonly power: number;
  readonly transconductance: number;
  readonly bodyTransconductance: number;
  readonly outputResistance: number;
  readonly linear: Linearised;
}

export interface DiodePoint {
  readonly kind: "diode";
  readonly current: number;
  readonly voltage: number;
  readonly power: number;
  /** Small-signal resistance including series resistance, ohm. */
  readonly dynamicResistance: number;
  readonly linear: Linearised;
}

export interface ResistorPoint {
  readonly kind: "resistor";
  /** From pin a to pin b through the resistor. */
  readonly current: number;
  /** V(a) − V(b). */
  readonly voltage: number;
  readonly power: number;
}

export interface CapacitorPoint {
  readonly kind: "capacitor";
  /** V(a) − V(b). */
  readonly voltage: number;
}

export interface InductorPoint {
  readonly kind: "inductor";
  /** From pin a to pin b. */
  readonly current: number;
  readonly voltage: number;
  readonly power: number;
}

export interface ControlledPoint {
  readonly kind: "vcvs" | "vccs" | "cccs" | "ccvs";
  /** Delivered out of the plus pin. */
  readonly current: number;
  readonly voltage: number;
  readonly power: number;
}

export type DevicePoint =
  | BjtPoint
  | MosPoint
  | DiodePoint
  | ResistorPoint
  | CapacitorPoint
  | InductorPoint
  | ControlledPoint;

export interface SourcePoint {
  /** Voltage source: delivered out of `plus`. Current source: its dc value (from → to). */
  readonly current: number;
  /** Power delivered to the circuit, W (negative when the source absorbs power). */
  readonly power: number;
  /** Voltage across the source, V(plus) − V(minus) or V(to) − V(from). */
  readonly voltage: number;
}

export type ConvergenceAid = "none" | "conductance-stepping" | "source-stepping";

export interface SolveStats {
  readonly iterations: number;
  /** Largest KCL residual at the final point, A. */
  readonly residual: number;
  readonly aid: ConvergenceAid;
}

export interface OperatingPoint {
  readonly ok: true;
  /** Volts by node name; the ground node is included at 0. */
  readonly nodes: Readonly<Record<string, number>>;
  /** Independent sources by id. */
  readonly sources: Readonly<Record<string, SourcePoint>>;
  /** Every other component by id. */
  readonly devices: Readonly<Record<string, DevicePoint>>;
  readonly stats: SolveStats;
}

export interface SolveFailure {
  readonly ok: false;
  /** One sentence an engineer can act on. */
  readonly reason: string;
  readonly parts: readonly string[];
  readonly nodes: readonly string[];
  readonly stats: SolveStats;
}

export type SolveResult = OperatingPoint | SolveFailure;
