// The expression sandbox's custom mathjs instance (src/circuit/expressions.ts MATH_DEPENDENCIES)
// and the pieces the bundled CLI hands it (src/bundle/math.ts): every function an expression may
// call is in the instance, the bundle provides exactly the listed pieces, and the instance
// evaluates arithmetic like plain JavaScript (Math.* as the reference).
import { describe, expect, it } from "vitest";
import { BUNDLED_MATH } from "../../src/bundle/math.js";
import { ALLOWED_FUNCTIONS, evaluateExpression, MATH_DEPENDENCIES } from "../../src/circuit/expressions.js";

describe("the sandbox's mathjs instance", () => {
  it("holds every allowed function, and the bundle provides exactly the listed pieces", () => {
    for (const f of ALLOWED_FUNCTIONS) expect(MATH_DEPENDENCIES, f).toContain(`${f}Dependencies`);
    expect(Object.keys(BUNDLED_MATH).sort()).toEqual(["create", ...MATH_DEPENDENCIES].sort());
    for (const name of MATH_DEPENDENCIES) expect(BUNDLED_MATH[name], name).toBeTruthy();
  });

  it("evaluates the arithmetic and elementary functions like Math.*", () => {
    const scope = new Map([["r", 4700], ["g", 2]]);
    const cases: [string, number][] = [
      ["= r / 2 + 3 * g - 1", 4700 / 2 + 3 * 2 - 1],
      ["= -r ^ 2", -(4700 ** 2)],
      ["= sqrt(r) + exp(1) + log(r) + log10(r) + abs(-g)", Math.sqrt(4700) + Math.exp(1) + Math.log(4700) + Math.log10(4700) + 2],
      ["= min(r, g) + max(r, g) + pow(g, 3)", 2 + 4700 + 8],
      ["= sin(pi / 6) + cos(0) + tan(pi / 4)", Math.sin(Math.PI / 6) + Math.cos(0) + Math.tan(Math.PI / 4)],
    ];
    for (const [source, expected] of cases) {
      const r = evaluateExpression(source, scope);
      expect(r.ok, source).toBe(true);
      if (r.ok) expect(r.value, source).toBeCloseTo(expected, 9);
    }
  });
});
