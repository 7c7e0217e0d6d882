// Public entry of the review stage: rule API, built-in registry, config, plugins, engine.
// (The rule tester lives in ./tester.js: it imports vitest, so it is not re-exported here.)
export { defineRule, toRule, ruleShapeProblems, EMPTY_OPTIONS } from "./rule.js";
export type {
  Bound,
  FailReport,
  FailedSolveView,
  FromSchema,
  OptionsOf,
  OptionsSchema,
  PassReport,
  Reporter,
  Rule,
  RuleDefinition,
  RuleSeverity,
  RuleView,
} from "./rule.js";
export { runRules, validateRuleOptions, marginOf, subjectPos, compareFindings, RULE_TIME_LIMIT_MS, OVERRIDE_RULE } from "./engine.js";
export type { ConfiguredRule, RunRulesInput, RuleResults } from "./engine.js";
export { loadConfig, applyRuleFlags, findConfigFile, defaultConfig, CONFIG_NAMES, DEFAULT_INCLUDE, DEFAULT_EXCLUDE, DEFAULT_VARIATION } from "./config.js";
export type { LoadConfigOptions } from "./config.js";
export type { ResolvedConfig, RuleSetting } from "./config-types.js";
export { loadPlugins, configuredRules, allRules } from "./plugins.js";
export type { LoadedPlugin } from "./plugins.js";
export { ConfigError, formatConfigProblem } from "./errors.js";
export type { ConfigProblem } from "./errors.js";
export { defaultOptions, resolveOptions } from "./options.js";
export { BUILTIN_RULES, builtinRules } from "../../rules/index.js";
export type { CapacitorVoltageOptions, BandFlatnessOptions, DevicePowerOptions, HeadroomOptions, ResistorPowerOptions } from "../../rules/index.js";
