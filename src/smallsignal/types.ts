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

export interface GainResult {
  readonly name: string;
  /** Signed real gain at midband, V/V (capacitors short, inductors open). */
  readonly midband: number;
  readonly magnitude: number;
  readonly db: number;
  /** Complex gain at band.low, band.high and the spec's own frequency, where given (ascending). */
  readonly points: readonly FrequencyPoint[];
  /** The value the gain-window rule judges: midband, or the spec's frequency magnitude with sign of re. */
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
