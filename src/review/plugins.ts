// Team rule plugins: modules in the user's repository (JavaScript, or TypeScript compiled once and
// kept in the plugin cache, plugin-compile.ts: no build step) whose default export is a rule or a list of rules — made with
// `defineRule` from the `opgate` package, or plain objects of the same shape. Also assembles the
// rules in play (built-in + plugins) with the config's severities and options. Plugins are
// imported, and their rules run, in a thread of their own (contain.ts, plugin-host.ts).
import { statSync } from "node:fs";
import { relative } from "node:path";
import { BUILTIN_RULES } from "../../rules/index.js";
import type { ResolvedConfig } from "./config-types.js";
import { didYouMean } from "./did-you-mean.js";
import { validateRuleOptions, type ConfiguredRule } from "./engine.js";
import { ConfigError, problemAt, type ConfigProblem } from "./errors.js";
import { containedRule, PluginHost } from "./contain.js";
import type { WireExport } from "./contain-protocol.js";
import type { Rule } from "./rule.js";

export interface LoadedPlugin {
  /** Absolute path of the module. */
  readonly path: string;
  /** The path as shown to people (relative to the config folder). */
  readonly shown: string;
  readonly rules: readonly Rule[];
}

/** Lines of a load error worth showing; the rest is usually a stack or a code frame. */
const ERROR_LINES = 4;

function loadError(text: string): string {
  return text.split("\n").filter((l) => l.trim() !== "").slice(0, ERROR_LINES).join(" | ");
}

/**
 * One plugin thread per set of plugin files (same paths, same modification times) in this
 * thread or process: every circuit of a run, and every context a test builds, shares it.
 */
const hosts = new Map<string, PluginHost>();

function hostFor(paths: readonly string[]): PluginHost {
  const key = paths
    .map((p) => {
      try {
        const st = statSync(p);
        return `${p}\0${st.mtimeMs}\0${st.size}`;
      } catch {
        return p;
      }
    })
    .join("\n");
  let host = hosts.get(key);
  if (!host) {
    host = new PluginHost(paths);
    hosts.set(key, host);
  }
  return host;
}

/**
 * Imports every plugin of the config in the plugin thread (contain.ts), within a deadline;
 * throws one ConfigError listing every broken plugin. The rules returned run in that thread.
 */
export async function loadPlugins(config: ResolvedConfig): Promise<LoadedPlugin[]> {
  if (config.plugins.length === 0) return [];
  const problems: ConfigProblem[] = [];
  const loaded: LoadedPlugin[] = [];
  const owner = new Map<string, string>([...BUILTIN_RULES.keys()].map((id) => [id, "the built-in rules"]));
  const host = hostFor(config.plugins);
  let exports: readonly WireExport[];
  try {
    exports = await host.load();
  } catch (err) {
    const shown = config.plugins.map((p) => relative(config.root, p).split("\\").join("/") || p).join(", ");
    throw new ConfigError({
      file: shown,
      message: `plugin ${shown} did not load: ${err instanceof Error ? err.message : String(err)}`,
      hint: "a plugin's top level must finish promptly and must not end the process: move slow or waiting work into the rule",
    });
  }
  for (const [pluginIndex, path] of config.plugins.entries()) {
    const shown = relative(config.root, path).split("\\").join("/") || path;
    const result = exports[pluginIndex]!;
    if ("error" in result) {
      const hint = /Cannot find (package|module) 'opgate'/.test(result.error)
        ? "export a plain rule object, which needs no import (as the rule `opgate init` writes does), or add opgate to the repository's devDependencies so that the import resolves"
        : /Unexpected token 'export'|Cannot use import statement/.test(result.error)
          ? "this .js file is ESM but the package is CommonJS: rename it to .mjs, or add \"type\": \"module\" to package.json"
          : "fix the module so that it loads with node";
      problems.push({ file: shown, message: `plugin ${shown} failed to load: ${loadError(result.error)}`, hint });
      continue;
    }
    if ("noDefault" in result) {
      problems.push({ file: shown, message: `plugin ${shown} has no default export`, hint: "end the module with `export default defineRule({ … })` or `export default [ruleA, ruleB]`" });
      continue;
    }
    const rules: Rule[] = [];
    for (const [i, item] of result.items.entries()) {
      const which = result.array ? ` (item ${i} of its default export)` : "";
      if ("problems" in item) {
        problems.push({ file: shown, message: `plugin ${shown} exports something that is not a rule${which}: ${item.problems.join("; ")}`, hint: `got ${item.described}; see \`opgate init\` for an example rule` });
        continue;
      }
      const rule = containedRule(item.meta, host, pluginIndex, i);
      const first = owner.get(rule.id);
      if (first) {
        problems.push({ file: shown, message: `plugin ${shown} defines rule \`${rule.id}\`, which ${first} already define${first.startsWith("the") ? "" : "s"}`, hint: "rule ids must be unique; give team rules a prefix such as `team/…`" });
        continue;
      }
      owner.set(rule.id, `plugin ${shown}`);
      rules.push(rule);
    }
    loaded.push({ path, shown, rules });
  }
  if (problems.length) throw new ConfigError(problems);
  return loaded;
}

/** Every rule in play, built-in first (sorted by id), then each plugin's in its order. */
export function allRules(plugins: readonly LoadedPlugin[]): { rule: Rule; source: string }[] {
  return [...[...BUILTIN_RULES.values()].map((rule) => ({ rule, source: "builtin" })), ...plugins.flatMap((p) => p.rules.map((rule) => ({ rule, source: p.shown })))];
}

/**
 * The rules with the config's severities and options, options validated (defaults filled in).
 * Throws ConfigError for rule ids the config names that no rule has, and for bad options.
 */
export function configuredRules(config: ResolvedConfig, plugins: readonly LoadedPlugin[]): ConfiguredRule[] {
  const rules = allRules(plugins);
  const ids = rules.map((r) => r.rule.id);
  const shownFile = config.file === null ? null : (config.shownFile ?? config.file);
  const problems: ConfigProblem[] = [];
  for (const [id, setting] of Object.entries(config.rules))
    if (!ids.includes(id)) problems.push(problemAt(setting.pos, shownFile, `the config names rule \`${id}\`, which is neither built in nor in a plugin`, didYouMean(id, ids) ?? "run `opgate rules` for the list"));
  if (problems.length) throw new ConfigError(problems);
  return validateRuleOptions(
    rules.map(({ rule, source }) => {
      const setting = config.rules[rule.id];
      return {
        rule,
        source,
        severity: setting?.severity ?? rule.severity,
        options: setting?.options ?? {},
        origin: { file: setting?.pos?.file ?? shownFile, ruleSource: source, ...(setting?.pos ? { pos: setting.pos } : {}), ...(setting?.optionsPos ? { keyPos: setting.optionsPos } : {}) },
      };
    }),
  );
}
