// Rule options: validated once with ajv before any circuit is checked, defaults filled in.
// Messages name the rule, the key, the value received, a "did you mean" and the config line.
import { Ajv, type ErrorObject, type ValidateFunction } from "ajv";
import type { SourcePos } from "../circuit/types.js";
import { didYouMean } from "./did-you-mean.js";
import { ConfigError, problemAt, type ConfigProblem } from "./errors.js";
import { generatedOptionsValidator, OPTIONS_AJV } from "./options-generated.js";
import { describeValue, type Rule } from "./rule.js";

/** Where options came from, for error positions. */
export interface OptionsOrigin {
  /** Config file (null: command line or no config). */
  readonly file: string | null;
  /** Position of the rule's entry. */
  readonly pos?: SourcePos;
  /** Position of each option key, when known. */
  readonly keyPos?: Readonly<Record<string, SourcePos>>;
  /** "builtin" or the plugin path: where a broken default must be fixed. */
  readonly ruleSource?: string;
}

// One ajv instance for all rule schemas; `useDefaults` fills in every property's `default`.
// strict is off because team schemas may carry keywords of their own (titles, examples).
// Made on first need: the built-in rules' validators are generated at build time.
let ajv: Ajv | undefined;
const compiled = new WeakMap<Rule, ValidateFunction>();

function validatorFor(rule: Rule): ValidateFunction {
  let v = compiled.get(rule);
  if (!v) v = generatedOptionsValidator(rule);
  if (v) compiled.set(rule, v);
  else {
    try {
      ajv ??= new Ajv(OPTIONS_AJV);
      v = ajv.compile(rule.options);
    } catch (err) {
      throw new ConfigError({
        file: null,
        message: `rule \`${rule.id}\` has an invalid options schema: ${err instanceof Error ? err.message : String(err)}`,
        hint: "fix the rule's `options` (a JSON Schema with type: object)",
      });
    }
    compiled.set(rule, v);
  }
  return v;
}

function valueAt(data: unknown, pointer: string): unknown {
  let cur: unknown = data;
  for (const seg of pointer.split("/").slice(1)) {
    const key = seg.replace(/~1/g, "/").replace(/~0/g, "~");
    cur = typeof cur === "object" && cur !== null ? (cur as Record<string, unknown>)[key] : undefined;
  }
  return cur;
}

function explain(rule: Rule, e: ErrorObject, raw: unknown, origin: OptionsOrigin): ConfigProblem {
  const known = Object.keys(rule.options.properties ?? {});
  const path = e.instancePath.split("/").slice(1).map((s) => s.replace(/~1/g, "/").replace(/~0/g, "~"));
  if (e.keyword === "additionalProperties") {
    const key = [...path, String((e.params as { additionalProperty: string }).additionalProperty)].join(".");
    const pos = origin.keyPos?.[key] ?? origin.pos;
    const hint =
      (path.length === 0 ? didYouMean(key, known) : undefined) ??
      (known.length ? `the options of \`${rule.id}\` are: ${known.join(", ")}` : `\`${rule.id}\` takes no options`);
    return problemAt(pos, origin.file, `unknown option \`${key}\` for rule \`${rule.id}\``, hint);
  }
  const key = path.join(".") || "(options)";
  const pos = origin.keyPos?.[path[0] ?? ""] ?? origin.pos;
  const given = valueAt(raw, e.instancePath);
  if (given === undefined && path.length > 0) {
    // Nobody set it: the rule's own default fails the rule's schema.
    const where = origin.ruleSource && origin.ruleSource !== "builtin" ? origin.ruleSource : null;
    return {
      file: where,
      message: `rule \`${rule.id}\` has a default for option \`${key}\` that its own schema refuses: ${e.message ?? "invalid"}`,
      hint: "fix the `default` in the rule's options schema",
    };
  }
  const received = describeValue(given);
  let hint: string | undefined;
  if (e.keyword === "enum") {
    const allowed = ((e.params as { allowedValues: unknown[] }).allowedValues ?? []).map(String);
    const got = valueAt(raw, e.instancePath);
    hint = (typeof got === "string" ? didYouMean(got, allowed) : undefined) ?? `use one of: ${allowed.join(", ")}`;
  }
  const schemaDefault = path.length === 1 ? (rule.options.properties?.[path[0]!] as { default?: unknown } | undefined)?.default : undefined;
  hint ??= schemaDefault !== undefined ? `the default is ${describeValue(schemaDefault)}` : undefined;
  return problemAt(pos, origin.file, `option \`${key}\` of rule \`${rule.id}\` ${e.message ?? "is invalid"}, got ${received}`, hint);
}

/** Problems with `raw` as options of `rule` (empty when valid). Does not modify `raw`. */
export function optionProblems(rule: Rule, raw: unknown, origin: OptionsOrigin): ConfigProblem[] {
  const data = structuredClone(raw ?? {});
  const v = validatorFor(rule);
  if (v(data)) return [];
  return (v.errors ?? []).map((e) => explain(rule, e, raw, origin));
}

/** Validated options with defaults filled in (a fresh frozen object); throws ConfigError. */
export function resolveOptions(rule: Rule, raw: unknown, origin: OptionsOrigin): Readonly<Record<string, unknown>> {
  const data = structuredClone(raw ?? {}) as Record<string, unknown>;
  const v = validatorFor(rule);
  if (!v(data)) throw new ConfigError((v.errors ?? []).map((e) => explain(rule, e, raw, origin)));
  return deepFreeze(data);
}

/** The rule's options with every default, as `opgate rules` shows them. */
export function defaultOptions(rule: Rule): Readonly<Record<string, unknown>> {
  return resolveOptions(rule, {}, { file: null });
}

export function deepFreeze<T>(value: T): T {
  if (typeof value === "object" && value !== null && !Object.isFrozen(value)) {
    Object.freeze(value);
    for (const v of Object.values(value as object)) deepFreeze(v);
  }
  return value;
}
