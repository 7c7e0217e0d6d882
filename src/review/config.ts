// Repository config: finds opgate.config.(yaml|yml|json) by walking up from the working folder
// (or takes --config), validates it against schemas/config.schema.json with file:line errors,
// and resolves it into a ResolvedConfig. `--rule id=severity` flags are applied on top.
import fg from "fast-glob";
import { existsSync, readFileSync, statSync } from "node:fs";
import { dirname, extname, isAbsolute, join, relative, resolve } from "node:path";
import { parseDocumentWithPositions } from "../circuit/parse.js";
import { positionOf, type PositionedDocument } from "../circuit/positions.js";
import type { InputError, SourcePos } from "../circuit/types.js";
import { loadShippedSchema } from "../circuit/precompile.js";
import { validateWithSchema } from "../circuit/validate.js";
import { parseValue } from "../circuit/values.js";
import type { Severity } from "../report/document.js";
import type { VariationSettings } from "../variation/types.js";
import type { ResolvedConfig, RuleSetting } from "./config-types.js";
import { didYouMean } from "./did-you-mean.js";
import { ConfigError, problemAt, type ConfigProblem } from "./errors.js";
import type { RuleSeverity } from "./rule.js";
import { BUILTIN_RULES } from "../../rules/index.js";

/** Looked for in this order in each folder. */
export const CONFIG_NAMES: readonly string[] = ["opgate.config.yaml", "opgate.config.yml", "opgate.config.json"];

export const PLUGIN_EXTENSIONS: readonly string[] = [".js", ".mjs", ".ts", ".mts"];

/** Every circuit file under the root unless the config says otherwise. */
export const DEFAULT_INCLUDE: readonly string[] = ["**/*.{json,yaml,yml}"];
/** Files that are never circuits: dependencies, the config itself, package and compiler manifests. */
export const DEFAULT_EXCLUDE: readonly string[] = ["**/node_modules/**", "**/opgate.config.*", "**/package.json", "**/package-lock.json", "**/tsconfig*.json"];

export const DEFAULT_VARIATION: VariationSettings = Object.freeze({
  mode: "nominal",
  // Enough samples to see a tail of a few percent; a nightly run may ask for more.
  samples: 200,
  seed: 1,
});

const SEVERITIES: readonly RuleSeverity[] = ["error", "warning", "note", "off"];

export interface LoadConfigOptions {
  readonly cwd: string;
  /** From --config, relative to cwd. */
  readonly configPath?: string;
}

/** The config file that applies to `cwd`: the nearest one walking up, or null. */
export function findConfigFile(cwd: string): string | null {
  for (let dir = resolve(cwd); ; dir = dirname(dir)) {
    const here = CONFIG_NAMES.map((n) => join(dir, n)).filter((p) => existsSync(p));
    if (here.length > 1)
      throw new ConfigError({ file: relativeOr(cwd, here[1]!), message: `two config files in one folder: ${here.map((p) => relativeOr(cwd, p)).join(" and ")}`, hint: "keep one and delete the other" });
    if (here[0]) return here[0];
    if (dirname(dir) === dir) return null;
  }
}

function relativeOr(cwd: string, abs: string): string {
  const r = relative(cwd, abs);
  return r === "" ? abs : r.startsWith("..") || isAbsolute(r) ? abs : r.split("\\").join("/");
}

function fromInput(e: InputError): ConfigProblem {
  return { file: e.file, ...(e.line !== undefined ? { line: e.line, column: e.column ?? 1 } : {}), message: e.message, ...(e.hint ? { hint: e.hint } : {}) };
}

let configSchema: object | undefined;
function schema(): object {
  configSchema ??= loadShippedSchema("config");
  return configSchema;
}

interface RawConfig {
  include?: string[];
  exclude?: string[];
  rules?: Record<string, RuleSeverity | { severity?: RuleSeverity; options?: Record<string, unknown> }>;
  plugins?: string[];
  libraries?: string[];
  failOn?: Severity;
  variation?: { mode?: VariationSettings["mode"]; samples?: number; seed?: number; overBudget?: VariationSettings["overBudget"]; temperature?: { min: string | number; max: string | number } };
  outputs?: Record<string, string>;
  nonCircuitFiles?: "skip" | "error";
}

const GLOB_CHARS = /[*?[\]{}!]/;

async function expandPlugins(raw: readonly string[], root: string, doc: PositionedDocument, problems: ConfigProblem[]): Promise<string[]> {
  const found = new Set<string>();
  for (const [i, entry] of raw.entries()) {
    const pos = positionOf(doc, ["plugins", i]);
    const matches = GLOB_CHARS.test(entry) ? await fg(entry, { cwd: root, absolute: true, ignore: ["**/node_modules/**"] }) : existsSync(resolve(root, entry)) ? [resolve(root, entry)] : [];
    if (matches.length === 0) {
      problems.push(problemAt(pos, doc.file, `plugin \`${entry}\` ${GLOB_CHARS.test(entry) ? "matches no files" : "does not exist"} (relative to ${relativeOr(process.cwd(), root) || "."})`, "plugin paths are relative to the config file's folder"));
      continue;
    }
    for (const m of matches) {
      if (statSync(m).isDirectory()) {
        problems.push(problemAt(pos, doc.file, `plugin \`${entry}\` is a folder`, `name the module files, e.g. \`${entry.replace(/\/$/, "")}/*.ts\``));
        continue;
      }
      if (!PLUGIN_EXTENSIONS.includes(extname(m).toLowerCase())) {
        problems.push(problemAt(pos, doc.file, `plugin \`${relativeOr(root, m)}\` is not a JavaScript or TypeScript module`, `plugins end in ${PLUGIN_EXTENSIONS.join(", ")}`));
        continue;
      }
      found.add(resolve(m));
    }
  }
  return [...found].sort();
}

function temperature(raw: string | number, pos: SourcePos, file: string, problems: ConfigProblem[]): number | undefined {
  const r = parseValue(raw, "temperature");
  if (!r.ok) {
    problems.push(problemAt(pos, file, `variation temperature: ${r.message}`, r.hint ?? "write it like `-20 °C` or `253.15 K`"));
    return undefined;
  }
  if (r.value <= 0) {
    problems.push(problemAt(pos, file, `variation temperature ${JSON.stringify(raw)} is not above absolute zero`, typeof raw === "number" ? `bare numbers are kelvin; write "${raw} °C" for Celsius` : undefined));
    return undefined;
  }
  return r.value;
}

/** Reads, validates and resolves the repository config; defaults when there is none. Throws ConfigError. */
export async function loadConfig(options: LoadConfigOptions): Promise<ResolvedConfig> {
  const cwd = resolve(options.cwd);
  let file: string | null;
  if (options.configPath !== undefined) {
    file = resolve(cwd, options.configPath);
    if (!existsSync(file) || !statSync(file).isFile())
      throw new ConfigError({ file: null, message: `--config ${options.configPath}: file not found`, hint: `the path is relative to ${cwd}` });
  } else file = findConfigFile(cwd);
  if (file === null) return defaultConfig(cwd);

  const shown = relativeOr(cwd, file);
  const ext = extname(file).toLowerCase();
  if (![".yaml", ".yml", ".json"].includes(ext))
    throw new ConfigError({ file: shown, message: `config file type \`${ext || "(none)"}\` is not supported`, hint: "use opgate.config.yaml or opgate.config.json" });
  const parsed = parseDocumentWithPositions(readFileSync(file, "utf8").replace(/^\uFEFF/, ""), shown, { json: ext === ".json" });
  if (!parsed.ok) throw new ConfigError(parsed.errors.map(fromInput));
  const value = parsed.value ?? {};
  if (typeof value !== "object" || Array.isArray(value))
    throw new ConfigError({ file: shown, line: 1, column: 1, message: "the config must be a mapping of keys (include, rules, plugins…)", hint: "run `opgate init` for a commented starter" });
  const schemaErrors = validateWithSchema(schema(), value, parsed.positioned);
  if (schemaErrors.length) throw new ConfigError(schemaErrors.map(fromInput));

  const raw = value as RawConfig;
  const doc = parsed.positioned;
  const root = dirname(file);
  const problems: ConfigProblem[] = [];

  const rules: Record<string, RuleSetting> = {};
  for (const [id, setting] of Object.entries(raw.rules ?? {})) {
    const pos = positionOf(doc, ["rules", id], { key: true });
    if (typeof setting === "string") {
      rules[id] = { severity: setting, pos };
      continue;
    }
    const optionsPos: Record<string, SourcePos> = {};
    for (const key of Object.keys(setting.options ?? {})) optionsPos[key] = positionOf(doc, ["rules", id, "options", key], { key: true });
    rules[id] = { ...(setting.severity ? { severity: setting.severity } : {}), ...(setting.options ? { options: setting.options } : {}), pos, optionsPos };
  }

  const plugins = await expandPlugins(raw.plugins ?? [], root, doc, problems);
  const libraries = (raw.libraries ?? []).map((entry, i) => {
    const path = resolve(root, entry);
    if (!existsSync(path) || !statSync(path).isFile())
      problems.push(problemAt(positionOf(doc, ["libraries", i]), doc.file, `model library \`${entry}\` does not exist (relative to ${relativeOr(process.cwd(), root) || "."})`, "library paths are relative to the config file's folder; `opgate init` writes a starter lib/parts.yaml"));
    return path;
  });

  let variation: VariationSettings = { ...DEFAULT_VARIATION, ...pick(raw.variation, ["mode", "samples", "seed", "overBudget"]) };
  if (raw.variation?.temperature) {
    const t = raw.variation.temperature;
    const min = temperature(t.min, positionOf(doc, ["variation", "temperature", "min"]), shown, problems);
    const max = temperature(t.max, positionOf(doc, ["variation", "temperature", "max"]), shown, problems);
    if (min !== undefined && max !== undefined) {
      if (min > max) problems.push(problemAt(positionOf(doc, ["variation", "temperature"]), shown, "variation temperature: min is above max", "swap the two values"));
      else variation = { ...variation, temperature: { min, max } };
    }
  }
  if (problems.length) throw new ConfigError(problems);

  const outputs: Record<string, string> = {};
  for (const [k, v] of Object.entries(raw.outputs ?? {})) outputs[k] = resolve(root, v);

  return freezeConfig({
    file,
    shownFile: shown,
    root,
    include: raw.include ?? [...DEFAULT_INCLUDE],
    exclude: [...DEFAULT_EXCLUDE, ...(raw.exclude ?? [])],
    rules,
    plugins,
    libraries,
    failOn: raw.failOn ?? "error",
    variation,
    outputs,
    ...(raw.nonCircuitFiles ? { nonCircuitFiles: raw.nonCircuitFiles } : {}),
  });
}

function pick<T extends object, K extends keyof T>(obj: T | undefined, keys: readonly K[]): Partial<Pick<T, K>> {
  const out: Partial<Pick<T, K>> = {};
  for (const k of keys) if (obj && obj[k] !== undefined) out[k] = obj[k];
  return out;
}

/** The config that applies when the repository has none. */
export function defaultConfig(cwd: string): ResolvedConfig {
  return freezeConfig({ file: null, root: resolve(cwd), include: [...DEFAULT_INCLUDE], exclude: [...DEFAULT_EXCLUDE], rules: {}, plugins: [], libraries: [], failOn: "error", variation: DEFAULT_VARIATION, outputs: {} });
}

function freezeConfig(c: ResolvedConfig): ResolvedConfig {
  return Object.freeze(c);
}

/**
 * Applies `--rule id=severity` flags (later flags win). `knownIds` are the rules in play
 * (built-in and plugins; default: the built-ins); an unknown id or severity is a ConfigError
 * with a did-you-mean.
 */
export function applyRuleFlags(config: ResolvedConfig, flags: readonly string[], knownIds: Iterable<string> = BUILTIN_RULES.keys()): ResolvedConfig {
  const ids = [...knownIds];
  const problems: ConfigProblem[] = [];
  const rules: Record<string, RuleSetting> = { ...config.rules };
  for (const flag of flags) {
    const m = /^\s*([^=\s]+)\s*=\s*([^=\s]+)\s*$/.exec(flag);
    if (!m) {
      problems.push({ file: null, message: `--rule ${JSON.stringify(flag)}: expected id=severity`, hint: "for example --rule headroom=warning" });
      continue;
    }
    const [, id, severity] = m as unknown as [string, string, string];
    if (!ids.includes(id)) {
      problems.push({ file: null, message: `--rule ${flag}: unknown rule \`${id}\``, hint: didYouMean(id, ids) ?? "run `opgate rules` for the list" });
      continue;
    }
    if (!SEVERITIES.includes(severity as RuleSeverity)) {
      problems.push({ file: null, message: `--rule ${flag}: unknown severity \`${severity}\``, hint: didYouMean(severity, SEVERITIES) ?? `use one of: ${SEVERITIES.join(", ")}` });
      continue;
    }
    rules[id] = { ...rules[id], severity: severity as RuleSeverity };
  }
  if (problems.length) throw new ConfigError(problems);
  return freezeConfig({ ...config, rules });
}
