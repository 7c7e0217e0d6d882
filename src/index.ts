// The package's public API: what team rules import (`import { defineRule } from "opgate"`) and
// what scripts use to run the stages without the CLI.
export { defineRule } from "./review/rule.js";
export type { Bound, FailReport, PassReport, Reporter, Rule, RuleDefinition, RuleSeverity, RuleView, FailedSolveView, OptionsSchema } from "./review/rule.js";
export { loadCircuitFile, loadCircuitText } from "./circuit/index.js";
export type * from "./circuit/types.js";
export { solveOperatingPoint } from "./solve/index.js";
export type * from "./solve/types.js";
export { analyseSmallSignal, sweepGain } from "./smallsignal/index.js";
export type * from "./smallsignal/types.js";
export { buildScenarios } from "./variation/index.js";
export type { Scenario, VariationSettings, VariationMode } from "./variation/types.js";
export { checkFile, checkCircuit } from "./pipeline/check-file.js";
export type { CheckContext, CheckContextOptions } from "./pipeline/check-file.js";
export { createCheckContext } from "./pipeline/context.js";
export type * from "./report/document.js";
