// Public entry of the variation stage.
export { buildScenarios, MAX_SAMPLES } from "./scenarios.js";
export { variedQuantities, withPicks } from "./quantities.js";
export type { Scenario, VariationMode, VariationSettings } from "./types.js";
