// JSON Schema validation (ajv, draft 2020-12) with errors mapped to file:line:column and
// rewritten as one plain sentence each. Generic: the config loader uses it with its own schema.
import { Ajv2020, type ErrorObject, type ValidateFunction } from "ajv/dist/2020.js";
import { pointerToPath, positionOf, typedPath, type PathSegment, type PositionedDocument } from "./positions.js";
import { renamedKeyHint } from "./renamed-keys.js";
import { didYouMean } from "./suggest.js";
import type { InputError } from "./types.js";

/** Names the item at a path for messages ("component R3", "model small-npn"); undefined = generic. */
export type DescribePath = (path: readonly PathSegment[], root: unknown) => string | undefined;

/** A circuit-specific rewrite of one error; undefined = use the generic text. */
export type RewriteError = (
  error: ErrorObject,
  path: readonly PathSegment[],
  root: unknown,
) => { message: string; hint?: string } | undefined;

export interface ValidateOptions {
  readonly describe?: DescribePath;
  readonly rewrite?: RewriteError;
  /** The id of the item a path points into (a component, model or spec), reported as the error's part. */
  readonly subject?: (path: readonly PathSegment[], root: unknown) => string | undefined;
  /** Cap on reported errors, so a wholly wrong file gives a readable list. */
  readonly maxErrors?: number;
}

/** A wrong file can produce hundreds of errors; the first few are what a person fixes first. */
export const DEFAULT_MAX_ERRORS = 20;

const compiled = new WeakMap<object, ValidateFunction>();

/**
 * How every file schema is compiled: every error collected, the failing schema attached (the
 * messages read it). precompile.ts generates the shipped validators with the same options.
 */
export const VALIDATOR_OPTIONS = { allErrors: true, verbose: true, strict: true, allowUnionTypes: true } as const;

/** Compiles (once per schema object) with VALIDATOR_OPTIONS. */
export function compileSchema(schema: object): ValidateFunction {
  let v = compiled.get(schema);
  if (!v) {
    const ajv = new Ajv2020({ ...VALIDATOR_OPTIONS });
    v = ajv.compile(schema);
    compiled.set(schema, v);
  }
  return v;
}

/** Uses `validate` for `schema` from now on (a validator generated from it ahead of time). */
export function useCompiled(schema: object, validate: ValidateFunction): void {
  compiled.set(schema, validate);
}

function pathText(path: readonly PathSegment[]): string {
  if (path.length === 0) return "the top level";
  return path.map((s, i) => (typeof s === "number" ? `[${s}]` : i === 0 ? s : `.${s}`)).join("");
}

function typeName(value: unknown): string {
  if (value === null) return "null";
  if (Array.isArray(value)) return "a list";
  if (typeof value === "object") return "a mapping";
  if (typeof value === "string") return `the text "${value.length > 40 ? value.slice(0, 40) + "…" : value}"`;
  return `${typeof value} ${String(value)}`;
}

function expectedType(t: unknown): string {
  const names: Record<string, string> = { object: "a mapping", array: "a list", string: "a string", number: "a number", integer: "an integer", boolean: "true or false", null: "null" };
  const list = Array.isArray(t) ? t : [t];
  return list.map((x) => names[String(x)] ?? String(x)).join(" or ");
}

/**
 * Collapses oneOf/anyOf noise: of the branches, keep the errors of the one branch whose shape
 * matches the data (no type/const mismatch at the branch root); if none matches, keep only the
 * oneOf error itself (reported with the schema's description). Also drops if/then wrappers.
 */
export function reduceErrors(errors: readonly ErrorObject[]): ErrorObject[] {
  const dropped = new Set<ErrorObject>();
  for (const e of errors) {
    if (e.keyword === "if") dropped.add(e);
    if (e.keyword !== "oneOf" && e.keyword !== "anyOf") continue;
    const prefix = `${e.schemaPath}/`;
    const branches = new Map<number, ErrorObject[]>();
    for (const c of errors) {
      if (c === e || !c.schemaPath.startsWith(prefix) || !c.instancePath.startsWith(e.instancePath)) continue;
      const idx = Number(c.schemaPath.slice(prefix.length).split("/")[0]);
      if (!branches.has(idx)) branches.set(idx, []);
      branches.get(idx)!.push(c);
    }
    if (branches.size === 0) continue;
    const shaped = [...branches.values()].filter(
      (errs) => !errs.some((c) => c.instancePath === e.instancePath && (c.keyword === "type" || c.keyword === "const")),
    );
    for (const errs of branches.values()) for (const c of errs) dropped.add(c);
    if (shaped.length >= 1) {
      const best = shaped.reduce((a, b) => (b.length < a.length ? b : a));
      for (const c of best) dropped.delete(c);
      dropped.add(e);
    }
  }
  return errors.filter((e) => !dropped.has(e));
}

function generic(e: ErrorObject, path: readonly PathSegment[], where: string, data: unknown): { message: string; hint?: string; keyPath?: readonly PathSegment[] } {
  const parent = (e.parentSchema ?? {}) as { properties?: Record<string, unknown>; description?: string };
  switch (e.keyword) {
    case "additionalProperties": {
      const key = String((e.params as { additionalProperty: string }).additionalProperty);
      const known = Object.keys(parent.properties ?? {});
      const hint = renamedKeyHint(key, known) ?? didYouMean(key, known) ?? (known.length ? `allowed keys: ${known.join(", ")}` : undefined);
      return { message: `unknown key \`${key}\` in ${where}`, ...(hint ? { hint } : {}), keyPath: [...path, key] };
    }
    case "required": {
      const key = String((e.params as { missingProperty: string }).missingProperty);
      return { message: `${where} is missing the key \`${key}\``, hint: `add \`${key}:\`` };
    }
    case "enum": {
      const allowed = ((e.params as { allowedValues: unknown[] }).allowedValues ?? []).map(String);
      const hint = typeof data === "string" ? didYouMean(data, allowed) : undefined;
      return { message: `${where}: ${typeName(data)} is not one of ${allowed.join(", ")}`, ...(hint ? { hint } : {}) };
    }
    case "const":
      return { message: `${where} must be \`${String((e.params as { allowedValue: unknown }).allowedValue)}\`, not ${typeName(data)}` };
    case "type":
      return { message: `${where} must be ${expectedType((e.params as { type: unknown }).type)}, not ${typeName(data)}` };
    case "oneOf":
    case "anyOf":
      return { message: `${where} has the wrong shape (${typeName(data)})`, ...(parent.description ? { hint: `expected ${parent.description.charAt(0).toLowerCase()}${parent.description.slice(1).replace(/\.$/, "")}` } : {}) };
    case "pattern":
      return { message: `${where}: ${typeName(data)} is not a valid name`, hint: "use letters, digits, `_`, `-` and `.`, starting with a letter" };
    case "propertyNames":
      return { message: `${where} has a key that is not a valid name`, hint: "use letters, digits and `_`, starting with a letter" };
    case "maxLength":
    case "maxItems":
    case "maxProperties":
    case "minItems":
    case "minLength":
      return { message: `${where} ${e.message ?? "is out of bounds"}` };
    default:
      return { message: `${where} ${e.message ?? "is invalid"}` };
  }
}

function valueAt(root: unknown, path: readonly PathSegment[]): unknown {
  let cur: unknown = root;
  for (const s of path) cur = cur !== null && typeof cur === "object" ? (cur as Record<string, unknown>)[s as string] : undefined;
  return cur;
}

/**
 * Validates `value` (parsed from `positioned`) against `schema`; returns [] when valid, else one
 * InputError per meaningful problem with line and column.
 */
export function validateWithSchema(
  schema: object,
  value: unknown,
  positioned: PositionedDocument,
  options: ValidateOptions = {},
): InputError[] {
  const validate = compileSchema(schema);
  if (validate(value)) return [];
  const errors = reduceErrors(validate.errors ?? []);
  // A typo'd key that suggests a missing required key is one mistake, not two.
  const typoTargets = new Set<string>();
  for (const e of errors) {
    if (e.keyword !== "additionalProperties") continue;
    const key = String((e.params as { additionalProperty: string }).additionalProperty);
    const known = Object.keys(((e.parentSchema ?? {}) as { properties?: Record<string, unknown> }).properties ?? {});
    const hint = didYouMean(key, known);
    if (hint) typoTargets.add(`${e.instancePath}|${hint.slice(hint.indexOf("`") + 1, hint.lastIndexOf("`"))}`);
  }
  const out: InputError[] = [];
  const seen = new Map<string, number>();
  for (const e of errors) {
    if (e.keyword === "required" && typoTargets.has(`${e.instancePath}|${(e.params as { missingProperty: string }).missingProperty}`)) continue;
    const path = typedPath(value, pointerToPath(e.instancePath));
    const data = valueAt(value, path);
    const where = options.describe?.(path, value) ?? (path.length ? `\`${pathText(path)}\`` : pathText(path));
    const custom = options.rewrite?.(e, path, value);
    const g = generic(e, path, where, data);
    const text = custom ?? g;
    const pos = g.keyPath ? positionOf(positioned, g.keyPath, { key: true }) : positionOf(positioned, path);
    // One sentence per problem: the same message twice (two pin errors of one part) merges its hints.
    const earlier = seen.get(text.message);
    if (earlier !== undefined) {
      const prev = out[earlier]!;
      if (text.hint && !prev.hint?.includes(text.hint)) out[earlier] = { ...prev, hint: prev.hint ? `${prev.hint}; ${text.hint}` : text.hint };
      continue;
    }
    seen.set(text.message, out.length);
    const part = options.subject?.(path, value);
    out.push({ file: positioned.file, line: pos.line, column: pos.column, message: text.message, ...(text.hint ? { hint: text.hint } : {}), ...(part ? { parts: [part] } : {}) });
    if (out.length >= (options.maxErrors ?? DEFAULT_MAX_ERRORS)) break;
  }
  return out;
}
