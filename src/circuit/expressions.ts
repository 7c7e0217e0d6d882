// Expressions ("= rLoad / 2") over the circuit's parameters, in a locked-down mathjs sandbox.
// Following mathjs's security guidance: a private instance whose dangerous functions are
// disabled, and — the real guard — every parsed tree is walked and only numbers, known
// parameter names, arithmetic, parentheses and an allowlist of elementary functions pass.
import { createRequire } from "node:module";
import type { MathJsInstance, MathNode } from "mathjs";

/**
 * The sandbox instance, built on first use: most circuit files have no expression, and loading
 * mathjs costs most of a worker thread's start-up (0.6–1.5 s measured on a loaded 2-core runner).
 * It is loaded synchronously (mathjs ships a CommonJS build) because loading a circuit is sync.
 */
let sandbox: { math: MathJsInstance; parse: MathJsInstance["parse"] } | null = null;

/**
 * What the sandbox instance is made of: mathjs's parser and compiler, and only the arithmetic
 * and elementary functions an expression may call (ALLOWED_OPERATORS, ALLOWED_FUNCTIONS), by
 * the names of their dependency objects in mathjs. A custom instance costs a fraction of the
 * whole library's functions; `test/circuit/math-instance.test.ts` checks this list against the
 * allowlists.
 */
export const MATH_DEPENDENCIES = [
  "parseDependencies",
  "compileDependencies",
  "addDependencies",
  "subtractDependencies",
  "multiplyDependencies",
  "divideDependencies",
  "powDependencies",
  "unaryMinusDependencies",
  "unaryPlusDependencies",
  "sqrtDependencies",
  "expDependencies",
  "logDependencies",
  "log10Dependencies",
  "absDependencies",
  "minDependencies",
  "maxDependencies",
  "sinDependencies",
  "cosDependencies",
  "tanDependencies",
] as const;

/** `create` and the dependency objects of MATH_DEPENDENCIES, from mathjs's number build. */
export type MathLibrary = { readonly create: typeof import("mathjs").create } & { readonly [K in (typeof MATH_DEPENDENCIES)[number]]: unknown };

let provided: MathLibrary | undefined;

/**
 * The bundled CLI (scripts/build-bundle.mjs) hands over the pieces it bundled, so that only they
 * are loaded; otherwise they come from mathjs's number build on first use.
 */
export function provideMathLibrary(lib: MathLibrary): void {
  provided = lib;
}

function getSandbox(): { math: MathJsInstance; parse: MathJsInstance["parse"] } {
  if (sandbox) return sandbox;
  // The number-only build: circuit expressions are real arithmetic.
  const lib = provided ?? (createRequire(import.meta.url)("mathjs/number") as MathLibrary);
  const factories: Record<string, unknown> = {};
  for (const name of MATH_DEPENDENCIES) factories[name] = lib[name];
  const math = lib.create(factories as Parameters<typeof lib.create>[0]);
  // Private reference kept before the public one is disabled.
  const parse = math.parse.bind(math) as MathJsInstance["parse"];
  math.import(
    {
      import: disabled("import"),
      createUnit: disabled("createUnit"),
      reviver: disabled("reviver"),
      evaluate: disabled("evaluate"),
      parse: disabled("parse"),
      simplify: disabled("simplify"),
      derivative: disabled("derivative"),
      resolve: disabled("resolve"),
      compile: disabled("compile"),
    },
    { override: true },
  );
  sandbox = { math, parse };
  return sandbox;
}

function disabled(name: string): () => never {
  return () => {
    throw new Error(`${name} is disabled in circuit expressions`);
  };
}

/** True when the sandbox instance refuses to run its function `name` (checked by the tests). */
export function sandboxRefuses(name: string): boolean {
  const fn = (getSandbox().math as unknown as Record<string, unknown>)[name];
  if (typeof fn !== "function") return true;
  try {
    (fn as (x: string) => unknown)("1");
    return false;
  } catch (err) {
    return err instanceof Error && /disabled in circuit expressions/.test(err.message);
  }
}

/** Elementary functions allowed in expressions (mathjs's own implementations on numbers). */
export const ALLOWED_FUNCTIONS: ReadonlySet<string> = new Set(["sqrt", "exp", "log", "log10", "abs", "min", "max", "pow", "sin", "cos", "tan"]);
/** Named constants allowed in expressions. */
export const ALLOWED_CONSTANTS: ReadonlyMap<string, number> = new Map([
  ["pi", Math.PI],
  ["e", Math.E],
]);
/** The operators of arithmetic, by mathjs's function name. */
const ALLOWED_OPERATORS: ReadonlySet<string> = new Set(["add", "subtract", "multiply", "divide", "pow", "unaryMinus", "unaryPlus"]);

/** Longest accepted expression; also capped by the schema's string length. */
export const MAX_EXPRESSION_LENGTH = 200;

export type ExpressionResult =
  | { readonly ok: true; readonly value: number }
  | { readonly ok: false; readonly message: string; readonly hint?: string };

export type Checked = { readonly ok: true; readonly node: MathNode; readonly names: readonly string[] } | { readonly ok: false; readonly message: string; readonly hint?: string };

const NODE_WORDS: Record<string, string> = {
  AssignmentNode: "assignment is",
  FunctionAssignmentNode: "function definitions are",
  AccessorNode: "property or index access is",
  ArrayNode: "matrices and lists are",
  ObjectNode: "objects are",
  BlockNode: "several statements are",
  ConditionalNode: "conditionals are",
  RangeNode: "ranges are",
  IndexNode: "indexing is",
  RelationalNode: "comparisons are",
};

/** True when the value text is an expression (starts with `=`). */
export function isExpression(raw: unknown): raw is string {
  return typeof raw === "string" && raw.trimStart().startsWith("=");
}

/** Parses an expression body and checks every node; returns the parameter names it uses. */
export function checkExpression(source: string): Checked {
  const body = source.trimStart().replace(/^=/, "").trim();
  if (body === "") return { ok: false, message: "the expression after `=` is empty" };
  if (body.length > MAX_EXPRESSION_LENGTH) return { ok: false, message: `the expression is longer than ${MAX_EXPRESSION_LENGTH} characters` };
  let node: MathNode;
  try {
    node = getSandbox().parse(body);
  } catch (err) {
    return { ok: false, message: `cannot read expression \`${body}\`: ${err instanceof Error ? err.message : String(err)}` };
  }
  const names = new Set<string>();
  let problem: string | undefined;
  const visit = (n: MathNode): void => {
    if (problem) return;
    const anyNode = n as MathNode & { type: string; value?: unknown; name?: string; fn?: unknown; args?: MathNode[]; content?: MathNode };
    switch (anyNode.type) {
      case "ConstantNode":
        if (typeof anyNode.value !== "number") problem = `only numbers are allowed, not ${typeof anyNode.value === "string" ? "strings" : String(anyNode.value)}`;
        return;
      case "SymbolNode":
        if (!ALLOWED_CONSTANTS.has(anyNode.name!)) names.add(anyNode.name!);
        return;
      case "ParenthesisNode":
        visit(anyNode.content!);
        return;
      case "OperatorNode":
        if (!ALLOWED_OPERATORS.has(String(anyNode.fn))) {
          problem = `the operator \`${(anyNode as unknown as { op: string }).op}\` is not allowed`;
          return;
        }
        for (const a of anyNode.args ?? []) visit(a);
        return;
      case "FunctionNode": {
        const fn = anyNode.fn as MathNode & { type: string; name?: string };
        if (fn.type !== "SymbolNode" || !ALLOWED_FUNCTIONS.has(fn.name!)) {
          problem = `calling \`${fn.type === "SymbolNode" ? fn.name : "an expression"}(…)\` is not allowed`;
          return;
        }
        for (const a of anyNode.args ?? []) visit(a);
        return;
      }
      default:
        problem = `${NODE_WORDS[anyNode.type] ?? `${anyNode.type} is`} not allowed`;
    }
  };
  visit(node);
  if (problem) {
    return {
      ok: false,
      message: `expression \`${body}\`: ${problem}`,
      hint: `use numbers, parameter names, + - * / ^, parentheses and ${[...ALLOWED_FUNCTIONS].join(", ")}`,
    };
  }
  return { ok: true, node, names: [...names] };
}

/** Evaluates a checked expression with the given parameter values (all names must be present). */
export function evaluateChecked(checked: Extract<Checked, { ok: true }>, scope: ReadonlyMap<string, number>, source: string): ExpressionResult {
  const vars = new Map<string, number>(ALLOWED_CONSTANTS);
  for (const n of checked.names) {
    const v = scope.get(n);
    if (v === undefined) return { ok: false, message: `expression \`${source}\`: unknown parameter \`${n}\`` };
    vars.set(n, v);
  }
  let result: unknown;
  try {
    result = checked.node.compile().evaluate(vars);
  } catch (err) {
    return { ok: false, message: `expression \`${source}\` cannot be evaluated: ${err instanceof Error ? err.message : String(err)}` };
  }
  if (typeof result !== "number" || !Number.isFinite(result)) {
    return { ok: false, message: `expression \`${source}\` gives ${typeof result === "number" ? String(result) : "something other than a number"}`, hint: "an expression must give a finite real number" };
  }
  return { ok: true, value: result };
}

/** Checks and evaluates in one step. */
export function evaluateExpression(source: string, scope: ReadonlyMap<string, number>): ExpressionResult {
  const checked = checkExpression(source);
  if (!checked.ok) return checked;
  return evaluateChecked(checked, scope, source.trim().replace(/^=/, "").trim());
}
