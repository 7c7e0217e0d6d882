// What one scenario's analysis produced: the input of the rule engine.
import type { Scenario } from "../variation/types.js";
import type { SolveResult } from "../solve/types.js";
import type { SmallSignalResult } from "../smallsignal/types.js";

export interface ScenarioAnalysis {
  readonly scenario: Scenario;
  readonly solve: SolveResult;
  /** null when the bias solve failed (there is nothing to linearise). */
  readonly smallSignal: SmallSignalResult | null;
}
