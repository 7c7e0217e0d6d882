// Reading one field of the parsed file: values, expressions, tolerances and spreads, each error
// placed at the field's line and column.
import { checkExpression, evaluateChecked, isExpression } from "./expressions.js";
import { circuitSubject } from "./messages.js";
import { positionOf, type PathSegment, type PositionedDocument } from "./positions.js";
import type { InputError, SourcePos, Spread, Toleranced } from "./types.js";
import { parseFraction, parseSignedPercent, parseValue, type Quantity } from "./values.js";

/** Collects errors and warnings while resolving one file. */
export class ResolveContext {
  readonly errors: InputError[] = [];
  readonly warnings: InputError[] = [];
  parameters: ReadonlyMap<string, number> = new Map();

  /** `root` is the parsed file: a problem inside a component, model or spec names it as its part. */
  constructor(
    readonly positioned: PositionedDocument,
    private readonly root?: unknown,
  ) {}

  get file(): string {
    return this.positioned.file;
  }

  pos(path: readonly PathSegment[], key = false): SourcePos {
    return positionOf(this.positioned, path, { key });
  }

  private problem(path: readonly PathSegment[], message: string, hint?: string, extra: Partial<InputError> = {}): InputError {
    const p = this.pos(path);
    const part = extra.parts === undefined && this.root !== undefined ? circuitSubject(path, this.root) : undefined;
    return { file: this.file, line: p.line, column: p.column, message, ...(hint ? { hint } : {}), ...(part ? { parts: [part] } : {}), ...extra };
  }

  error(path: readonly PathSegment[], message: string, hint?: string, extra: Partial<InputError> = {}): void {
    this.errors.push(this.problem(path, message, hint, extra));
  }

  warn(path: readonly PathSegment[], message: string, hint?: string, extra: Partial<InputError> = {}): void {
    this.warnings.push(this.problem(path, message, hint, extra));
  }
}

/** Reads a value (number, value string or expression) in `quantity`; undefined after reporting an error. */
export function readValue(ctx: ResolveContext, raw: unknown, path: readonly PathSegment[], quantity: Quantity, what: string): number | undefined {
  if (isExpression(raw)) {
    const checked = checkExpression(raw);
    if (!checked.ok) {
      ctx.error(path, `${what}: ${checked.message}`, checked.hint);
      return undefined;
    }
    const missing = checked.names.filter((n) => !ctx.parameters.has(n));
    if (missing.length) {
      ctx.error(path, `${what}: unknown parameter \`${missing[0]}\` in \`${raw.trim()}\``, ctx.parameters.size ? `known parameters: ${[...ctx.parameters.keys()].join(", ")}` : "define it under `parameters:`");
      return undefined;
    }
    const r = evaluateChecked(checked, ctx.parameters, raw.trim().replace(/^=/, "").trim());
    if (!r.ok) {
      ctx.error(path, `${what}: ${r.message}`, r.hint);
      return undefined;
    }
    return r.value;
  }
  const r = parseValue(raw, quantity);
  if (!r.ok) {
    ctx.error(path, `${what}: ${r.message}`, r.hint);
    return undefined;
  }
  return r.value;
}

/** An optional value: undefined when absent (no error) or invalid (error reported). */
export function readOptional(ctx: ResolveContext, obj: Record<string, unknown>, key: string, path: readonly PathSegment[], quantity: Quantity, what: string): number | undefined {
  if (obj[key] === undefined) return undefined;
  return readValue(ctx, obj[key], [...path, key], quantity, `${what} \`${key}\``);
}

/** A value with its tolerance band. `tolerance` is "5%", a fraction ≤ 1, or {min, max} (absolute, or signed percentages). */
export function readToleranced(ctx: ResolveContext, obj: Record<string, unknown>, valueKey: string, path: readonly PathSegment[], quantity: Quantity, what: string): Toleranced | undefined {
  const nominal = readValue(ctx, obj[valueKey], [...path, valueKey], quantity, `${what} \`${valueKey}\``);
  if (nominal === undefined) return undefined;
  const tol = obj["tolerance"];
  const tolPath = [...path, "tolerance"];
  if (tol === undefined) return { nominal, min: nominal, max: nominal };
  if (tol !== null && typeof tol === "object" && !Array.isArray(tol)) {
    const t = tol as Record<string, unknown>;
    const bound = (k: "min" | "max"): number | undefined => {
      const pct = parseSignedPercent(t[k]);
      if (pct !== undefined) return nominal + Math.abs(nominal) * pct;
      return readValue(ctx, t[k], [...tolPath, k], quantity, `${what} tolerance \`${k}\``);
    };
    const min = bound("min");
    const max = bound("max");
    if (min === undefined || max === undefined) return undefined;
    if (!(min <= nominal && nominal <= max)) {
      ctx.error(tolPath, `${what}: tolerance limits {min: ${min}, max: ${max}} do not enclose the nominal ${valueKey} ${nominal}`, "give the absolute limits (min ≤ nominal ≤ max), or percentages such as \"-20%\" and \"+80%\"");
      return undefined;
    }
    return { nominal, min, max };
  }
  const f = parseFraction(tol);
  if (!f.ok) {
    ctx.error(tolPath, `${what}: ${f.message}`, f.hint);
    return undefined;
  }
  const d = Math.abs(nominal) * f.value;
  // A band that reaches zero or changes sign makes a positive quantity non-physical: say it is
  // the tolerance (the value's own check would only say "must be positive").
  if (nominal > 0 && nominal - d <= 0) {
    ctx.error(tolPath, `${what}: tolerance ${String(tol).trim()} takes ${valueKey} down to ${nominal - d === 0 ? "zero" : "below zero"} at its low end`, "a symmetric tolerance must stay under 100 %; give { min, max } for a lopsided band");
    return undefined;
  }
  return { nominal, min: nominal - d, max: nominal + d };
}

/** A model parameter: a value, or {min, typ, max} with typ required and min ≤ typ ≤ max. */
export function readSpread(ctx: ResolveContext, raw: unknown, path: readonly PathSegment[], quantity: Quantity, what: string): Spread | undefined {
  if (raw !== null && typeof raw === "object" && !Array.isArray(raw)) {
    const o = raw as Record<string, unknown>;
    const typ = readValue(ctx, o["typ"], [...path, "typ"], quantity, `${what} \`typ\``);
    const min = o["min"] === undefined ? typ : readValue(ctx, o["min"], [...path, "min"], quantity, `${what} \`min\``);
    const max = o["max"] === undefined ? typ : readValue(ctx, o["max"], [...path, "max"], quantity, `${what} \`max\``);
    if (typ === undefined || min === undefined || max === undefined) return undefined;
    if (!(min <= typ && typ <= max)) {
      ctx.error(path, `${what}: the range {min: ${min}, typ: ${typ}, max: ${max}} is out of order`, "write min ≤ typ ≤ max");
      return undefined;
    }
    return { min, typ, max };
  }
  const v = readValue(ctx, raw, path, quantity, what);
  return v === undefined ? undefined : { min: v, typ: v, max: v };
}

/** A spread with a default when absent. */
export function readSpreadOr(ctx: ResolveContext, obj: Record<string, unknown>, key: string, path: readonly PathSegment[], quantity: Quantity, what: string, fallback: number): Spread | undefined {
  if (obj[key] === undefined) return { min: fallback, typ: fallback, max: fallback };
  return readSpread(ctx, obj[key], [...path, key], quantity, `${what} \`${key}\``);
}

export function readNumberOr(ctx: ResolveContext, obj: Record<string, unknown>, key: string, path: readonly PathSegment[], quantity: Quantity, what: string, fallback: number): number | undefined {
  if (obj[key] === undefined) return fallback;
  return readValue(ctx, obj[key], [...path, key], quantity, `${what} \`${key}\``);
}
