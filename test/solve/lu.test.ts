// Our dense LU against mathjs `lusolve` (a general-purpose reference library) and on singular input.
import { lusolve } from "mathjs";
import { describe, expect, it } from "vitest";
import { luFactor, luSolve } from "../../src/solve/lu.js";
import { prng } from "./generate.js";

describe("dense LU with partial pivoting", () => {
  it("solves random dense systems like mathjs lusolve (reference library)", () => {
    const rnd = prng(99);
    for (const n of [1, 2, 5, 17, 40]) {
      const rows = Array.from({ length: n }, () => Array.from({ length: n }, () => rnd() * 2 - 1));
      const rhs = Array.from({ length: n }, () => rnd() * 10 - 5);
      const a2 = Float64Array.from(rows.flat());
      const piv = new Int32Array(n);
      expect(luFactor(a2, n, piv, new Float64Array(n))).toBe(-1);
      const y = Float64Array.from(rhs);
      luSolve(a2, n, piv, y);
      const ref = (lusolve(rows, rhs) as unknown as number[][]).map((r) => r[0]!);
      ref.forEach((v, i) => expect(Math.abs(y[i]! - v)).toBeLessThan(1e-9 * Math.max(1, Math.abs(v))));
    }
  });

  it("needs pivoting: a zero on the diagonal is handled by a row exchange", () => {
    const a = Float64Array.of(0, 1, 1, 0);
    const piv = new Int32Array(2);
    expect(luFactor(a, 2, piv, new Float64Array(2))).toBe(-1);
    const x = Float64Array.of(3, 7);
    luSolve(a, 2, piv, x);
    expect([...x]).toEqual([7, 3]);
  });

  it("reports the first column without a pivot for singular and numerically singular matrices", () => {
    expect(luFactor(Float64Array.of(1, 2, 2, 4), 2, new Int32Array(2), new Float64Array(2))).toBe(1);
    expect(luFactor(Float64Array.of(1, 0, 0, 0, 0, 0, 0, 0, 1), 3, new Int32Array(3), new Float64Array(3))).toBe(1);
    expect(luFactor(Float64Array.of(1, 1, 1, 1 + 1e-17), 2, new Int32Array(2), new Float64Array(2))).toBe(1);
  });
});
