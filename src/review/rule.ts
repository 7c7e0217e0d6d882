// The rule API: what a rule (built-in or team plugin) declares, what its check sees, and how it
// reports. Rules report subject, measured, limit and unit; the engine adds margin, position,
// severity and scenario, so a team rule stays about twenty lines.
import type { Circuit, SourcePos, Specs } from "../circuit/types.js";
import type { Severity } from "../report/document.js";
import type { OperatingPoint, SolveFailure } from "../solve/types.js";
import type { SmallSignalResult } from "../smallsignal/types.js";
import type { Scenario } from "../variation/types.js";

export type RuleSeverity = Severity | "off";
export type Bound = "max" | "min";

/** The subset of JSON Schema an options schema is written in (the type of the options is derived from it). */
export interface OptionsSchema {
  readonly type: "object";
  readonly properties?: Readonly<Record<string, unknown>>;
  readonly additionalProperties?: boolean | object;
  readonly required?: readonly string[];
  readonly [keyword: string]: unknown;
}

/** The TypeScript type of a value described by a JSON Schema (the subset rule options use). */
export type FromSchema<S> = S extends { readonly enum: readonly (infer E)[] }
  ? E
  : S extends { readonly const: infer C }
    ? C
    : S extends { readonly type: "number" | "integer" }
      ? number
      : S extends { readonly type: "string" }
        ? string
        : S extends { readonly type: "boolean" }
          ? boolean
          : S extends { readonly type: "array"; readonly items: infer I }
            ? readonly FromSchema<I>[]
            : S extends { readonly type: "object"; readonly properties: infer P }
              ? { readonly [K in keyof P]: FromSchema<P[K]> }
              : S extends { readonly type: "object"; readonly additionalProperties: infer A }
                ? A extends object
                  ? Readonly<Record<string, FromSchema<A>>>
                  : Readonly<Record<string, unknown>>
                : unknown;

/** The options type of a rule made with defineRule: `OptionsOf<typeof headroom>`. */
export type OptionsOf<R> = R extends Rule<infer O> ? O : never;

/** What a rule's check sees for one scenario whose bias solve succeeded. Read-only: do not mutate. */
export interface RuleView<O = Readonly<Record<string, unknown>>> {
  readonly circuit: Circuit;
  readonly op: OperatingPoint;
  readonly smallSignal: SmallSignalResult | null;
  readonly specs: Specs;
  /** The rule's options: validated, defaults filled in, circuit overrides applied. */
  readonly options: O;
  readonly scenario: Scenario;
}

/** What a rule's failed-solve hook sees (only the `solve` rule needs it). */
export interface FailedSolveView<O = Readonly<Record<string, unknown>>> {
  readonly circuit: Circuit;
  readonly failure: SolveFailure;
  readonly specs: Specs;
  readonly options: O;
  readonly scenario: Scenario;
}

export interface FailReport {
  /** Component id, node name, gain name, model id, or the circuit name. */
  readonly subject: string;
  readonly message: string;
  readonly measured?: number;
  readonly limit?: number;
  readonly unit?: string;
  /** Whether `limit` is a maximum or a minimum; needed for the margin. */
  readonly bound?: Bound;
  /** How to fix it. */
  readonly hint?: string;
  /** Point the finding somewhere other than the subject's own position. */
  readonly pos?: SourcePos;
}

export interface PassReport {
  readonly measured?: number;
  readonly limit?: number;
  readonly unit?: string;
  readonly bound?: Bound;
}

export interface Reporter {
  fail(finding: FailReport): void;
  pass(subject: string, check?: PassReport): void;
}

export interface RuleDefinition<O> {
  /** Lower-case words joined by hyphens; team rules may add a prefix: `tidewater/divider-current`. */
  readonly id: string;
  /** One line, starting with a verb in the third person ("Checks …"), no full stop at the end. */
  readonly description: string;
  /** Default severity; the config file may change it. */
  readonly severity: RuleSeverity;
  /** JSON Schema of the options (type object), a `default` on every property. */
  readonly options?: OptionsSchema;
  /** What it checks, why it matters to a reviewer, how to fix a finding. */
  readonly docs: string;
  /** Options a circuit file's `review:` block may override for that circuit. */
  readonly circuitOptions?: readonly string[];
  check(view: RuleView<O>, report: Reporter): void | Promise<void>;
  /** Called instead of `check` for scenarios whose bias solve failed. */
  checkFailedSolve?(view: FailedSolveView<O>, report: Reporter): void | Promise<void>;
}

/** A rule as the engine holds it (options typed loosely; the schema is the contract). */
export interface Rule<O = any> extends RuleDefinition<O> {
  readonly options: OptionsSchema;
  readonly circuitOptions: readonly string[];
}

export const EMPTY_OPTIONS: OptionsSchema = Object.freeze({
  type: "object",
  properties: {},
  additionalProperties: false,
});

const RULE_ID = /^[a-z][a-z0-9]*(-[a-z0-9]+)*(\/[a-z][a-z0-9]*(-[a-z0-9]+)*)?$/;
const SEVERITIES: readonly RuleSeverity[] = ["error", "warning", "note", "off"];
const MAX_DESCRIPTION = 120;

/** Problems with a value meant to be a rule, as sentences; empty when it is a valid rule. */
export function ruleShapeProblems(value: unknown): string[] {
  if (typeof value !== "object" || value === null) return [`expected a rule object, got ${describeValue(value)}`];
  const r = value as Record<string, unknown>;
  const problems: string[] = [];
  if (typeof r.id !== "string" || !RULE_ID.test(r.id))
    problems.push(`\`id\` must be lower-case words joined by hyphens (optionally \`team/rule-name\`), got ${describeValue(r.id)}`);
  if (typeof r.description !== "string" || r.description.trim() === "" || r.description.includes("\n"))
    problems.push("`description` must be one non-empty line");
  else if (r.description.length > MAX_DESCRIPTION) problems.push(`\`description\` must be at most ${MAX_DESCRIPTION} characters`);
  if (!SEVERITIES.includes(r.severity as RuleSeverity))
    problems.push(`\`severity\` must be one of ${SEVERITIES.join(", ")}, got ${describeValue(r.severity)}`);
  if (typeof r.docs !== "string" || r.docs.trim() === "") problems.push("`docs` must be a non-empty text");
  if (typeof r.check !== "function") problems.push("`check` must be a function (view, report) => void | Promise<void>");
  if (r.checkFailedSolve !== undefined && typeof r.checkFailedSolve !== "function")
    problems.push("`checkFailedSolve` must be a function when given");
  if (r.options !== undefined) {
    const o = r.options as Record<string, unknown> | null;
    if (typeof o !== "object" || o === null || o.type !== "object")
      problems.push("`options` must be a JSON Schema with `type: object`");
    else if (o.properties !== undefined && (typeof o.properties !== "object" || o.properties === null))
      problems.push("`options.properties` must be an object");
  }
  if (r.circuitOptions !== undefined) {
    const props = Object.keys(((r.options as { properties?: object } | undefined)?.properties ?? {}) as object);
    if (!Array.isArray(r.circuitOptions) || r.circuitOptions.some((k) => typeof k !== "string"))
      problems.push("`circuitOptions` must be a list of option names");
    else
      for (const k of r.circuitOptions as string[])
        if (!props.includes(k)) problems.push(`\`circuitOptions\` names \`${k}\`, which is not an option of the rule`);
  }
  return problems;
}

export function describeValue(v: unknown): string {
  if (v === undefined) return "nothing";
  if (typeof v === "function") return "a function";
  if (typeof v === "string") return JSON.stringify(v);
  try {
    const s = JSON.stringify(v);
    return s === undefined ? String(v) : s.length > 60 ? `${s.slice(0, 57)}...` : s;
  } catch {
    return String(v);
  }
}

/** Turns a checked plain object into a frozen Rule; throws an Error listing the problems. */
export function toRule(value: unknown): Rule {
  const problems = ruleShapeProblems(value);
  if (problems.length > 0) throw new Error(problems.join("; "));
  const r = value as RuleDefinition<unknown>;
  return Object.freeze({
    ...r,
    options: r.options ?? EMPTY_OPTIONS,
    circuitOptions: Object.freeze([...(r.circuitOptions ?? [])]),
  }) as Rule;
}

/**
 * Declares a rule. The type of `view.options` is derived from the `options` schema (write it
 * inline or `as const`), so schema and code cannot drift apart.
 */
export function defineRule<const S extends OptionsSchema = typeof EMPTY_OPTIONS>(
  definition: Omit<RuleDefinition<FromSchema<S>>, "options"> & { readonly options?: S },
): Rule<FromSchema<S>> {
  return toRule(definition) as Rule<FromSchema<S>>;
}
