// Scenarios: the circuit as one corner or sample of its tolerances, spreads and temperature.
import type { Circuit } from "../circuit/types.js";

export interface Scenario {
  /** Stable id: "nominal", "corner-01", "mc-0007". */
  readonly id: string;
  /** What was varied, for people: "VCC max, Q1 beta min, 85 °C". */
  readonly label: string;
  /** The circuit with the scenario's values in `nominal` / `typ` and its temperature. */
  readonly circuit: Circuit;
}

export type VariationMode = "nominal" | "corners" | "monte-carlo";

export interface VariationSettings {
  readonly mode: VariationMode;
  /** Monte Carlo sample count. */
  readonly samples: number;
  readonly seed: number;
  /** Ambient range in kelvin for corners and Monte Carlo; absent = the circuit's own temperature. */
  readonly temperature?: { readonly min: number; readonly max: number };
  /**
   * Severity of the `variation-budget` finding, given when a circuit is too large for the
   * per-circuit budget and is judged at nominal only (or on part of its samples or corners):
   * "warning" (default) lets it pass on its nominal verdict, "error" fails it.
   */
  readonly overBudget?: "warning" | "error";
}
