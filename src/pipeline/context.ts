// Builds the CheckContext from plain options: config file, plugins, --rule and --fail-on flags.
// Each worker thread calls this itself, so everything it needs must be plain data.
import { loadConfig, applyRuleFlags } from "../review/config.js";
import { allRules, configuredRules, loadPlugins } from "../review/plugins.js";
import type { RuleEntry } from "../report/document.js";
import type { CheckContext, CheckContextOptions } from "./check-file.js";

/** Findings about the circuit file itself (parse, schema, values, topology) carry this rule id. */
export const INPUT_RULE: RuleEntry = {
  id: "input",
  description: "Reports circuit files that cannot be read, validated or resolved",
  severity: "error",
  docs:
    "A circuit file must parse, match the circuit schema (opgate schema), use values and units that fit each field, " +
    "and describe a circuit with a DC path to ground from every node and no loop of voltage sources. " +
    "The message names the line and column and what to change. These findings always fail the run with exit code 2.",
  source: "builtin",
};

/** The loader's non-fatal remarks about a circuit file carry this rule id. */
export const FILE_WARNING_ENTRY: RuleEntry = {
  id: "file-warning",
  description: "Reports readable but questionable content in a circuit file",
  severity: "warning",
  docs:
    "The file loaded, but something in it is probably not what was meant: a threshold whose sign does not fit the " +
    "transistor type (both readings are named), a bare temperature number read as kelvin, a node with a single " +
    "connection. Read the message and either fix the file or make the intent explicit (a unit, a sign).",
  source: "builtin",
};

/** Throws ConfigError (exit 2 at the CLI) for a bad config, plugin, flag or rule option. */
export async function createCheckContext(options: CheckContextOptions): Promise<CheckContext> {
  const loaded = await loadConfig({ cwd: options.cwd, ...(options.configPath ? { configPath: options.configPath } : {}) });
  const plugins = await loadPlugins(loaded);
  const ids = allRules(plugins).map((r) => r.rule.id);
  const flagged = applyRuleFlags(loaded, options.ruleFlags ?? [], ids);
  const config = options.failOn ? { ...flagged, failOn: options.failOn } : flagged;
  const configured = configuredRules(config, plugins);
  const rules: RuleEntry[] = [INPUT_RULE, FILE_WARNING_ENTRY, ...configured
    .map((c) => ({
      id: c.rule.id,
      description: c.rule.description,
      severity: c.severity,
      docs: c.rule.docs,
      source: c.source,
    }))]
    .sort((a, b) => (a.id < b.id ? -1 : a.id > b.id ? 1 : 0));
  return { config, rules, configured: Object.freeze(configured.filter((c) => c.severity !== "off").map((c) => Object.freeze(c))), root: config.root };
}
