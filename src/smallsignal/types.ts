// Small-signal results: gains and impedances of the linearised network.

export interface ComplexValue {
  readonly re: number;
  readonly im: number;
}

export interface FrequencyPoint {
  readonly frequency: number; // Hz
  readonly re: number;
  readonly im: number;
  readonly magnitude: number;
  readonly db: number;
  readonly phaseDeg: number;
}

/** One capacitor's part in setting a band corner (time-constant analysis in the flat-band view). */
export interface CapacitorShare {
  /** Capacitor id, or the device id for a device capacitance. */
  readonly id: string;
  /** For a device capacitance: which one ("base–collector", "gate–source"). */
  readonly between?: string;
  /** F. */
  readonly value: number;
  /** The resistance the capacitor sees, ohm. */
  readonly resistance: number;
  /** R·C, s. */
  readonly timeConstant: number;
  /** Its share of the corner: of Σ 1/τ at the lower corner, of Σ τ at the upper (0…1). */
  readonly share: number;
}

export interface BandEdges {
  /** Exact −3 dB corners relative to |midband|, Hz; null when the gain does not fall 3 dB within 12 decades of the band centre. */
  readonly lowCorner: number | null;
  readonly highCorner: number | null;
  /** Short-circuit time-constant estimate Σ 1/(2π·τ), Hz; null with no coupling or bypass capacitor. */
  readonly lowEstimate: number | null;
  /** Open-circuit time-constant estimate 1/(2π·Σ τ), Hz; null with no band-edge capacitor. */
  readonly highEstimate: number | null;
  /** Coupling and bypass capacitors, largest share first. */
  readonly low: readonly CapacitorShare[];
  /** Band-edge capacitors (load, cable, feedback, device capacitances), largest share first. */
  readonly high: readonly CapacitorShare[];
}

/** A capacitor value that keeps an edge within the allowed deviation (see capacitorForEdge). */
export interface EdgeCapacitorValue {
  readonly value: number;
  /** False when no value of this capacitor alone meets the edge (value is then the furthest tried). */
  readonly reachable: boolean;
}

export interface GainResult {
  readonly name: string;
  /**
   * Signed real flat-band gain, V/V: coupling and bypass capacitors short, capacitors that set
   * the upper band edge open, device capacitances open, inductors open (DESIGN.md §3).
   */
  readonly midband: number;
  /** The hand-analysis reference: every capacitor short (device capacitances open); null when that view is singular. */
  readonly everyCapacitorShort: number | null;
  /** Circuit capacitors left open at midband because they set the upper band edge, in file order. */
  readonly openAtMidband: readonly string[];
  /** Band-edge analysis, when specs.band is given. */
  readonly edges?: BandEdges;
  readonly magnitude: number;
  readonly db: number;
  /** Complex gain at band.low, band.high and the spec's own frequency, where given (ascending). */
  readonly points: readonly FrequencyPoint[];
  /**
   * The value the gain-window rule judges: midband, or at the spec's own frequency the magnitude
   * there with the sign of the midband gain (the stage's inversion; the phase is not a sign).
   */
  readonly judged: number;
  /** Midband input impedance seen by the input source, ohm (Infinity when open). */
  readonly inputImpedance: number;
  /** Midband output impedance at the output, input source zeroed, ohm. */
  readonly outputImpedance: number;
}

export interface SmallSignalResult {
  readonly gains: readonly GainResult[];
  /** Gains that could not be computed (e.g. a singular small-signal network), with the reason. */
  readonly errors: readonly { readonly gain: string; readonly message: string }[];
}

export interface SweepResult {
  readonly gain: string;
  readonly points: readonly FrequencyPoint[];
  /** Lower and upper −3 dB frequencies relative to midband; null when not inside the sweep. */
  readonly lowCorner: number | null;
  readonly highCorner: number | null;
  /** Signed midband gain, V/V; null when the midband view is singular. (Added by the small-signal stage.) */
  readonly midband: number | null;
  /**
   * The magnitude the corners are relative to: |midband|, or the sweep's largest magnitude when
   * that is larger (a small capacitor that sets the band edge is shorted at midband); null when
   * the sweep could not run. (Added by the small-signal stage.)
   */
  readonly reference: number | null;
  /** Why the sweep could not run (bad range, unknown gain, singular network); points are then empty. */
  readonly error?: string;
}
