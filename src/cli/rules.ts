// `opgate rules`: lists every rule in play — built-in and the config's plugins — with its
// severity, options (configured value and default) and docs; `--json` for tools.
import { defaultOptions } from "../review/options.js";
import { applyRuleFlags, loadConfig } from "../review/config.js";
import { ConfigError } from "../review/errors.js";
import { allRules, configuredRules, loadPlugins } from "../review/plugins.js";
import { EXIT_CLEAN, EXIT_INPUT, type CliIo } from "./io.js";
import type { CommandSpec } from "./main.js";

interface OptionInfo {
  readonly value: unknown;
  readonly default: unknown;
  readonly description?: string;
  readonly circuitOverride: boolean;
}

export interface RuleListing {
  readonly id: string;
  readonly description: string;
  readonly severity: string;
  readonly defaultSeverity: string;
  readonly source: string;
  readonly options: Readonly<Record<string, OptionInfo>>;
  readonly docs: string;
}

function show(v: unknown): string {
  return JSON.stringify(v);
}

function indent(text: string, by: string): string {
  return text
    .split("\n")
    .map((l) => (l.trim() === "" ? "" : by + l))
    .join("\n");
}

export async function listRules(io: CliIo, args: { config?: string; rule?: readonly string[]; only?: string }): Promise<RuleListing[]> {
  const config = await loadConfig({ cwd: io.cwd, ...(args.config ? { configPath: args.config } : {}) });
  const plugins = await loadPlugins(config);
  const ids = allRules(plugins).map((r) => r.rule.id);
  const flagged = applyRuleFlags(config, args.rule ?? [], ids);
  const listing: RuleListing[] = [];
  for (const c of configuredRules(flagged, plugins)) {
    if (args.only !== undefined && c.rule.id !== args.only) continue;
    const defaults = defaultOptions(c.rule);
    const props = (c.rule.options.properties ?? {}) as Record<string, { description?: string }>;
    const options: Record<string, OptionInfo> = {};
    for (const key of Object.keys(props))
      options[key] = { value: c.options?.[key], default: defaults[key], ...(props[key]?.description ? { description: props[key].description } : {}), circuitOverride: c.rule.circuitOptions.includes(key) };
    listing.push({ id: c.rule.id, description: c.rule.description, severity: c.severity, defaultSeverity: c.rule.severity, source: c.source, options, docs: c.rule.docs.trim() });
  }
  return listing;
}

export function formatListing(listing: readonly RuleListing[]): string {
  const out: string[] = [];
  for (const r of listing) {
    const sev = r.severity === r.defaultSeverity ? r.severity : `${r.severity} (default ${r.defaultSeverity})`;
    out.push(`${r.id}  [${sev}]  ${r.source === "builtin" ? "built-in" : r.source}`);
    out.push(`  ${r.description}`);
    const keys = Object.keys(r.options);
    if (keys.length) {
      out.push("  options:");
      for (const k of keys) {
        const o = r.options[k]!;
        const value = show(o.value) === show(o.default) ? show(o.value) : `${show(o.value)} (default ${show(o.default)})`;
        out.push(`    ${k}: ${value}${o.circuitOverride ? "  [circuit files may override]" : ""}${o.description ? `\n      ${o.description}` : ""}`);
      }
    }
    out.push("", indent(r.docs, "  "), "");
  }
  return out.join("\n");
}

export const rulesCommand: CommandSpec = {
  command: "rules [id]",
  describe: "List every rule (built-in and team plugins) with its severity, options and docs",
  builder: (y) =>
    y
      .positional("id", { type: "string", describe: "Show only this rule" })
      .option("json", { type: "boolean", default: false, describe: "Print the list as JSON" })
      .option("config", { type: "string", describe: "Config file (default: opgate.config.yaml found walking up)" })
      .option("rule", { type: "string", array: true, describe: "Override a severity: --rule id=severity" })
      .example("$0 rules", "Describe every rule in play")
      .example("$0 rules headroom", "Describe one rule"),
  handler: async (args, io: CliIo) => {
    try {
      const only = typeof args.id === "string" ? args.id : undefined;
      const listing = await listRules(io, {
        ...(typeof args.config === "string" ? { config: args.config } : {}),
        rule: (args.rule as string[] | undefined) ?? [],
        ...(only !== undefined ? { only } : {}),
      });
      if (only !== undefined && listing.length === 0) {
        const { closest } = await import("../review/did-you-mean.js");
        const all = await listRules(io, typeof args.config === "string" ? { config: args.config } : {});
        const near = closest(only, all.map((r) => r.id));
        io.stderr(`opgate: no rule \`${only}\`${near ? ` — did you mean \`${near}\`?` : ""}\n`);
        return EXIT_INPUT;
      }
      io.stdout(args.json ? `${JSON.stringify(listing, null, 2)}\n` : formatListing(listing));
      return EXIT_CLEAN;
    } catch (err) {
      if (err instanceof ConfigError) {
        io.stderr(`${err.message}\n`);
        return EXIT_INPUT;
      }
      throw err;
    }
  },
};
