// Team rule plugins: modules in the user's repository (JavaScript, or TypeScript loaded through
// tsx without a build step) whose default export is a rule or a list of rules — made with
// `defineRule` from the `opgate` package, or plain objects of the same shape. Also assembles the
// rules in play (built-in + plugins) with the config's severities and options.
import { extname, relative } from "node:path";
import { pathToFileURL } from "node:url";
import { BUILTIN_RULES } from "../../rules/index.js";
import type { ResolvedConfig } from "./config-types.js";
import { didYouMean } from "./did-you-mean.js";
import { validateRuleOptions, type ConfiguredRule } from "./engine.js";
import { ConfigError, problemAt, type ConfigProblem } from "./errors.js";
import { describeValue, ruleShapeProblems, toRule, type Rule } from "./rule.js";

export interface LoadedPlugin {
  /** Absolute path of the module. */
  readonly path: string;
  /** The path as shown to people (relative to the config folder). */
  readonly shown: string;
  readonly rules: readonly Rule[];
}

const TYPESCRIPT = [".ts", ".mts"];
/** Lines of a load error worth showing; the rest is usually a stack or a code frame. */
const ERROR_LINES = 4;

function loadError(err: unknown): string {
  const text = err instanceof Error ? err.message : String(err);
  return text.split("\n").filter((l) => l.trim() !== "").slice(0, ERROR_LINES).join(" | ");
}

async function importModule(path: string): Promise<Record<string, unknown>> {
  const url = pathToFileURL(path).href;
  if (TYPESCRIPT.includes(extname(path).toLowerCase())) {
    // tsx costs ~50 ms to load: only a run with a TypeScript plugin pays for it.
    const { tsImport } = await import("tsx/esm/api");
    return (await tsImport(url, import.meta.url)) as Record<string, unknown>;
  }
  return (await import(url)) as Record<string, unknown>;
}

/** Imports every plugin of the config; throws one ConfigError listing every broken plugin. */
export async function loadPlugins(config: ResolvedConfig): Promise<LoadedPlugin[]> {
  const problems: ConfigProblem[] = [];
  const loaded: LoadedPlugin[] = [];
  const owner = new Map<string, string>([...BUILTIN_RULES.keys()].map((id) => [id, "the built-in rules"]));
  for (const path of config.plugins) {
    const shown = relative(config.root, path).split("\\").join("/") || path;
    let mod: Record<string, unknown>;
    try {
      mod = await importModule(path);
    } catch (err) {
      const hint = /Cannot find (package|module) 'opgate'/.test(String(err))
        ? "install opgate in the repository (npm install --save-dev opgate), or export a plain rule object that needs no import"
        : /Unexpected token 'export'|Cannot use import statement/.test(String(err))
          ? "this .js file is ESM but the package is CommonJS: rename it to .mjs, or add \"type\": \"module\" to package.json"
          : "fix the module so that it loads with node";
      problems.push({ file: shown, message: `plugin ${shown} failed to load: ${loadError(err)}`, hint });
      continue;
    }
    // tsx may wrap a CommonJS-style module as { default: { default: … } }.
    let exported = mod.default;
    if (exported && typeof exported === "object" && !Array.isArray(exported) && "default" in exported && !("id" in exported))
      exported = (exported as { default: unknown }).default;
    if (exported === undefined) {
      problems.push({ file: shown, message: `plugin ${shown} has no default export`, hint: "end the module with `export default defineRule({ … })` or `export default [ruleA, ruleB]`" });
      continue;
    }
    const values = Array.isArray(exported) ? exported : [exported];
    const rules: Rule[] = [];
    for (const [i, value] of values.entries()) {
      const which = Array.isArray(exported) ? ` (item ${i} of its default export)` : "";
      const shape = ruleShapeProblems(value);
      if (shape.length) {
        problems.push({ file: shown, message: `plugin ${shown} exports something that is not a rule${which}: ${shape.join("; ")}`, hint: `got ${describeValue(value)}; see \`opgate init\` for an example rule` });
        continue;
      }
      const rule = toRule(value);
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
