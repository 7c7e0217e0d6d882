// Circuit parameters: plain values or expressions over other parameters, resolved in dependency
// order; a cycle is an error naming it (a → b → a).
import { ALLOWED_CONSTANTS, ALLOWED_FUNCTIONS, checkExpression, evaluateChecked, isExpression, type Checked } from "./expressions.js";
import type { ResolveContext } from "./fields.js";
import { didYouMean } from "./suggest.js";
import { parseValue } from "./values.js";

export function resolveParameters(ctx: ResolveContext, raw: Record<string, unknown> | undefined): Map<string, number> {
  const values = new Map<string, number>();
  if (!raw) return values;
  const names = Object.keys(raw);
  const failed = new Set<string>();
  const checked = new Map<string, Extract<Checked, { ok: true }>>();
  const reportedCycles = new Set<string>();
  // A parameter named like a constant or function would be ignored in expressions (the constant
  // wins): refused, so that `e: 2k2` is never silently read as 2.718.
  for (const name of names) {
    if (!ALLOWED_CONSTANTS.has(name) && !ALLOWED_FUNCTIONS.has(name)) continue;
    ctx.error(["parameters", name], `parameter \`${name}\` has the name of ${ALLOWED_CONSTANTS.has(name) ? "a constant" : "a function"} of expressions`, `rename it (e.g. \`${name}1\`); ${[...ALLOWED_CONSTANTS.keys()].join(", ")} and ${[...ALLOWED_FUNCTIONS].join(", ")} are reserved`);
    failed.add(name);
  }

  const resolveOne = (name: string, stack: string[]): number | undefined => {
    if (values.has(name)) return values.get(name);
    if (failed.has(name)) return undefined;
    const path = ["parameters", name];
    const src = raw[name];
    // A value or expression that does not parse or evaluate: report it and mark the parameter failed.
    const reject = (r: { readonly message: string; readonly hint?: string }): undefined => {
      ctx.error(path, `parameter \`${name}\`: ${r.message}`, r.hint);
      failed.add(name);
      return undefined;
    };
    if (!isExpression(src)) {
      const r = parseValue(src, "any");
      if (!r.ok) return reject(r);
      values.set(name, r.value);
      return r.value;
    }
    let c = checked.get(name);
    if (!c) {
      const r = checkExpression(src);
      if (!r.ok) return reject(r);
      c = r;
      checked.set(name, c);
    }
    const scope = new Map<string, number>();
    for (const dep of c.names) {
      if (!(dep in raw)) {
        ctx.error(path, `parameter \`${name}\` uses unknown parameter \`${dep}\``, didYouMean(dep, names) ?? "define it under `parameters:`");
        failed.add(name);
        return undefined;
      }
      const at = stack.indexOf(dep);
      if (at >= 0 || dep === name) {
        const cycle = [...stack.slice(at >= 0 ? at : stack.length), name, dep];
        const key = [...cycle.slice(0, -1)].sort().join(",");
        if (!reportedCycles.has(key)) {
          reportedCycles.add(key);
          ctx.error(["parameters", cycle[0]!], `parameters form a cycle: ${cycle.join(" → ")}`, "define one of them as a plain value");
        }
        for (const n of cycle) failed.add(n);
        return undefined;
      }
      const v = resolveOne(dep, [...stack, name]);
      if (v === undefined) {
        failed.add(name);
        return undefined;
      }
      scope.set(dep, v);
    }
    const r = evaluateChecked(c, scope, src.trim().replace(/^=/, "").trim());
    if (!r.ok) return reject(r);
    values.set(name, r.value);
    return r.value;
  };

  for (const n of names) resolveOne(n, []);
  return values;
}
