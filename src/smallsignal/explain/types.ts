// The reviewer's explanation of a gain: the stages on its signal path, each with its bias, the
// resistances at its terminals computed from the network, the textbook gain formula with those
// numbers, the exactly computed stage gain, and — where the two differ — the hand-analysis
// assumption that does not hold. Plain data: it goes into the results document as it is.

export type StageConfiguration =
  | "common-emitter"
  | "common-base"
  | "common-collector"
  | "common-source"
  | "common-gate"
  | "common-drain"
  | "differential-pair";

export type Terminal = "base" | "emitter" | "collector" | "gate" | "source" | "drain";

/** Why the textbook formula and the exact stage gain differ (see explain/reasons.ts). */
export type ReasonCode =
  | "region"
  | "bypass"
  | "output-resistance"
  | "loading"
  | "body-effect"
  | "base-not-grounded"
  | "unexplained";

export interface Reason {
  readonly code: ReasonCode;
  /** One sentence with the numbers that show it. */
  readonly text: string;
}

export interface TerminalResistance {
  readonly terminal: Terminal;
  readonly node: string;
  /**
   * Small-signal Thevenin resistance from this terminal's node to AC ground, with the stage's
   * own transistor(s) removed and every other transistor removed too (what a reviewer reads
   * off the schematic: the resistors, capacitors as shorts, sources zeroed); null = open.
   */
  readonly own: number | null;
  /** The same with every other transistor in place (the next stage's input loads it); null = open. */
  readonly loaded: number | null;
}

export interface StageBias {
  /** Collector or drain current in the device's normal direction, A. */
  readonly current: number;
  readonly transconductance: number;
  /** BJT: re = 1/(gm + 1/rπ); MOSFET: 1/gm. Ω */
  readonly emitterResistance: number | null;
  readonly inverseTransconductance: number;
  /** BJT rπ; null for a MOSFET. */
  readonly inputResistance: number | null;
  /** ro; null when unbounded (no Early effect / λ). */
  readonly outputResistance: number | null;
  /** Small-signal β = gm·rπ (BJT only). */
  readonly beta: number | null;
  /** gmb (MOSFET only; 0 without body effect). */
  readonly bodyTransconductance: number | null;
}

export interface StageFormula {
  /** The formula in symbols, e.g. "−α·R_C / (re + R_E)". */
  readonly expression: string;
  /** The same with this stage's numbers. */
  readonly substituted: string;
  readonly value: number;
  /** Where the formula comes from. */
  readonly source: string;
  /** The textbook's assumptions, in one line. */
  readonly assumes: string;
}

export interface StageExplanation {
  readonly device: string;
  /** Second device of a differential pair (the one whose collector/drain is the output, or the other half). */
  readonly partner: string | null;
  readonly kind: "npn" | "pnp" | "nmos" | "pmos";
  readonly configuration: StageConfiguration;
  readonly input: { readonly terminal: Terminal; readonly node: string; readonly device: string };
  readonly output: { readonly terminal: Terminal; readonly node: string; readonly device: string };
  readonly region: string;
  readonly bias: StageBias;
  readonly resistances: readonly TerminalResistance[];
  readonly formula: StageFormula;
  /** The formula with the loaded resistances (the next stage in place). */
  readonly formulaLoaded: number;
  /** Exact node-to-node gain V(output node)/V(input node), from the complex network. */
  readonly exact: { readonly re: number; readonly im: number; readonly magnitude: number; readonly phaseDeg: number };
  /** |formula/exact − 1|; null when the exact gain is 0 or not finite. */
  readonly difference: number | null;
  readonly agrees: boolean;
  readonly reasons: readonly Reason[];
}

/** A passive link of the chain: V(to)/V(from), exact (source to first stage, between stages, last stage to output). */
export interface CouplingLink {
  readonly from: string;
  readonly to: string;
  readonly re: number;
  readonly im: number;
  readonly magnitude: number;
}

export interface GainExplanation {
  readonly gain: string;
  /** Frequency the chain is evaluated at (the gain's own frequency), or null for midband. */
  readonly frequency: number | null;
  /** Stages in signal order; empty when no transistor lies on the path (see note). */
  readonly stages: readonly StageExplanation[];
  /** Coupling before each stage (index i: into stage i), and after the last stage (index stages.length). */
  readonly couplings: readonly CouplingLink[];
  /** Product of the stages' formula values and the exact couplings. */
  readonly formulaProduct: number | null;
  /** The gain's exact value at the same view (signed real at midband, complex magnitude with the sign of re otherwise). */
  readonly exact: number;
  /** Why no (or only part of a) chain could be given, when that happens. */
  readonly note: string | null;
}
