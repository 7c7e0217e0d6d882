// The results document: the one value every reporter, baseline and shard merge reads.
// Its JSON Schema is schemas/results.schema.json; keep the two in step.
import type { GainExplanation } from "../smallsignal/explain/types.js";

/** A stage value as JSON carries it: every number may be null (non-finite: unbounded or undefined). */
export type JsonSafe<T> = T extends number
  ? number | null
  : T extends readonly (infer U)[]
    ? readonly JsonSafe<U>[]
    : T extends object
      ? { readonly [K in keyof T]: JsonSafe<T[K]> }
      : T;

/** The hand-analysis chain of a gain (see src/smallsignal/explain/types.ts for the fields). */
export type ExplanationEntry = JsonSafe<GainExplanation>;

export interface ResponsePoint {
  readonly frequency: number;
  readonly re: number | null;
  readonly im: number | null;
  readonly magnitude: number | null;
  readonly db: number | null;
  readonly phaseDeg: number | null;
}

/** The nominal frequency response of a gain, for charts (the default sweep of `inspect --sweep`). */
export interface ResponseEntry {
  readonly points: readonly ResponsePoint[];
  readonly lowCorner: number | null;
  readonly highCorner: number | null;
  readonly reference: number | null;
  readonly band: { readonly low: number; readonly high: number } | null;
  /** Why the sweep could not run; points are then empty. */
  readonly error?: string;
}

export type Severity = "error" | "warning" | "note";
export type CircuitStatus = "pass" | "fail" | "error";

export interface Finding {
  readonly rule: string;
  readonly severity: Severity;
  /** Component id, node name or spec (gain) name; the circuit name for whole-circuit findings. */
  readonly subject: string;
  readonly message: string;
  readonly measured: number | null;
  readonly limit: number | null;
  readonly unit: string | null;
  /** Signed relative margin to the limit: negative = violated. null when not numeric. */
  readonly margin: number | null;
  /** Id of the worst scenario for this rule and subject. */
  readonly scenario: string;
  readonly file: string;
  readonly line: number;
  readonly column: number;
  /** How to fix it: from the sensitivities when they name a part, else the rule's own advice. */
  readonly hint?: string;
  /** The worst scenario as its parameter set (when it is a corner or a Monte Carlo sample). */
  readonly corner?: CornerEntry;
  /** How the failing quantity moves with each parameter (worst-case mode), largest effect first. */
  readonly sensitivities?: readonly SensitivityEntry[];
}

/** One parameter's value in a scenario. */
export interface ParameterSettingEntry {
  /** "R1.value", "small-npn.beta", "temperature". */
  readonly parameter: string;
  /** "R1", "β(small-npn)", "temperature". */
  readonly name: string;
  /** SI (kelvin for temperature). */
  readonly value: number;
  readonly at: "min" | "max" | "value";
  /** Component values: deviation from nominal, %. */
  readonly percent?: number;
}

/** A scenario as its parameter set; parameters at nominal are left out. */
export interface CornerEntry {
  /** Compactly: "R1 −1 %, R2 +1 %, RC +5 %, β(small-npn) min, 60 °C". */
  readonly label: string;
  readonly parameters: readonly ParameterSettingEntry[];
}

export interface SensitivityEntry {
  readonly parameter: string;
  readonly name: string;
  /** ∂quantity/∂parameter, SI (per kelvin for temperature). */
  readonly derivative: number;
  /** % change of the quantity per % of the parameter; null for temperature or a zero quantity. */
  readonly normalised: number | null;
  /** Change per °C (temperature only). */
  readonly perDegree: number | null;
  /** Linear change of the quantity at the low and high ends of the parameter's band. */
  readonly low: number;
  readonly high: number;
}

/** What the worst-case analysis of a circuit cost. */
export interface VariationEntry {
  readonly method: "worst-case";
  readonly parameters: number;
  readonly variedParameters: number;
  readonly quantities: number;
  /** Every analysis (bias solve + small-signal + rules) run for variation. */
  readonly analyses: number;
  readonly sensitivityAnalyses: number;
  /** Distinct corners judged. */
  readonly corners: number;
  readonly refinementAnalyses: number;
  readonly refinedQuantities: number;
}

export interface DistributionEntry {
  readonly rule: string;
  readonly subject: string;
  readonly unit: string | null;
  readonly samples: number;
  readonly min: number;
  readonly p1: number;
  readonly median: number;
  readonly p99: number;
  readonly max: number;
  readonly mean: number;
  /** Sample standard deviation (n − 1). */
  readonly sigma: number;
}

export interface MonteCarloEntry {
  readonly samples: number;
  readonly seed: number;
  /** Samples with a finding at or above failOn (non-converged samples included). */
  readonly failed: number;
  readonly nonConverged: number;
  /** Fraction of samples without a finding at or above failOn. */
  readonly yield: number;
  readonly interval: { readonly method: "Wilson score"; readonly level: number; readonly low: number; readonly high: number };
  /** Newton iterations over all samples. */
  readonly iterations: number;
  /** The sample with the lowest margin of any check. */
  readonly worstSample: ({ readonly scenario: string; readonly lowestMargin: number | null } & CornerEntry) | null;
  readonly quantities: readonly DistributionEntry[];
}

/** A rule × subject that was checked and passed (JUnit keeps passing cases). */
export interface PassedCheck {
  readonly rule: string;
  readonly subject: string;
  readonly measured: number | null;
  readonly limit: number | null;
  readonly unit: string | null;
  readonly margin: number | null;
  /** Worst scenario. */
  readonly scenario: string;
}

/** A device's operating point; a null number means unbounded (e.g. ro with no Early effect). */
export interface DeviceEntry {
  readonly kind: string;
  readonly [field: string]: number | string | null;
}

export interface OperatingPointEntry {
  readonly nodes: Readonly<Record<string, number>>;
  readonly sources: Readonly<Record<string, { current: number; power: number; voltage: number }>>;
  readonly devices: Readonly<Record<string, DeviceEntry>>;
  readonly solve: { readonly iterations: number; readonly residual: number; readonly aid: string };
}

export interface GainEntry {
  readonly name: string;
  readonly midband: number;
  readonly magnitude: number;
  readonly db: number;
  readonly target: number;
  readonly window: { readonly min: number; readonly max: number };
  readonly points: readonly {
    frequency: number;
    re: number;
    im: number;
    magnitude: number;
    db: number;
    phaseDeg: number;
  }[];
  readonly inputImpedance: number | null;
  readonly outputImpedance: number | null;
  /** Nominal frequency response (absent in documents written before it existed). */
  readonly response?: ResponseEntry;
  /** The hand-analysis chain; null when it could not be built. */
  readonly explanation?: ExplanationEntry | null;
}

export interface ScenarioEntry {
  readonly id: string;
  readonly label: string;
  readonly converged: boolean;
}

export interface CircuitResult {
  /** Repository-relative, forward slashes. */
  readonly file: string;
  /** null when the file could not be read far enough to know it. */
  readonly name: string | null;
  readonly status: CircuitStatus;
  /** Nominal scenario; null when the circuit could not be loaded or solved. */
  readonly operatingPoint: OperatingPointEntry | null;
  readonly gains: readonly GainEntry[];
  readonly scenarios: readonly ScenarioEntry[];
  readonly findings: readonly Finding[];
  readonly passed: readonly PassedCheck[];
  /** Worst-case analysis cost (corners mode). */
  readonly variation?: VariationEntry;
  /** Monte Carlo yield and distributions (monte-carlo mode). */
  readonly monteCarlo?: MonteCarloEntry;
  /** Model libraries the circuit was checked with: repository-relative file and SHA-256 of its bytes. */
  readonly libraries?: readonly { readonly file: string; readonly sha256: string }[];
}

export interface RuleEntry {
  readonly id: string;
  readonly description: string;
  readonly severity: Severity | "off";
  readonly docs: string;
  /** "builtin" or the plugin path. */
  readonly source: string;
}

/**
 * What a shard document proves about the run it belongs to: its slice (index of count), how many
 * files the whole run had and the digest of their sorted list (so shards of different runs, or
 * of one run whose files changed between jobs, cannot be merged), and its own files.
 */
export interface ShardProvenance {
  readonly index: number;
  readonly count: number;
  /** Files in the whole run (all shards). */
  readonly total: number;
  /** `sha256:` + hex of the whole run's display paths in code-point order, each followed by "\n". */
  readonly digest: string;
  /** This shard's files (every one has a circuits entry). */
  readonly files: readonly string[];
}

export interface Summary {
  readonly circuits: number;
  readonly passed: number;
  readonly failed: number;
  readonly errors: number;
  readonly findings: { readonly error: number; readonly warning: number; readonly note: number };
  /** Lowest severity that fails the run. */
  readonly failOn: Severity;
  readonly verdict: "pass" | "fail" | "error";
}

export interface ResultsDocument {
  readonly format: "opgate-results/1";
  readonly tool: { readonly name: "opgate"; readonly version: string };
  /** Present when this document covers one shard of a sharded run. */
  readonly shard?: ShardProvenance;
  readonly variation: { readonly mode: string; readonly samples: number; readonly seed: number };
  readonly rules: readonly RuleEntry[];
  /** Sorted by file. */
  readonly circuits: readonly CircuitResult[];
  readonly summary: Summary;
  /** Only when asked for (--timestamp); never by default, so output is reproducible. */
  readonly generatedAt?: string;
}
