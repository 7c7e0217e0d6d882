// Our dense LU against mathjs `lusolve` (a general-purpose reference library) and on singular input.
import { lusolve } from "mathjs";
import { describe, expect, it } from "vitest";
import { bitWords, buildSymbolic, createLuSymbolic, createLuWorkspace, luFactor, luRefactor, luSolve } from "../../src/solve/lu.js";
import { prng } from "./generate.js";

describe("dense LU with partial pivoting", () => {
  it("solves random dense systems like mathjs lusolve (reference library)", () => {
    const rnd = prng(99);
    for (const n of [1, 2, 5, 17, 40]) {
      const rows = Array.from({ length: n }, () => Array.from({ length: n }, () => rnd() * 2 - 1));
      const rhs = Array.from({ length: n }, () => rnd() * 10 - 5);
      const a2 = Float64Array.from(rows.flat());
      const ws = createLuWorkspace(n);
      expect(luFactor(a2, ws)).toBe(-1);
      const y = Float64Array.from(rhs);
      luSolve(a2, ws, y);
      const ref = (lusolve(rows, rhs) as unknown as number[][]).map((r) => r[0]!);
      ref.forEach((v, i) => expect(Math.abs(y[i]! - v)).toBeLessThan(1e-9 * Math.max(1, Math.abs(v))));
    }
  });

  it("sparse random systems with many row exchanges match mathjs lusolve (reference library)", () => {
    const rnd = prng(5);
    let solvedCount = 0;
    for (let trial = 0; trial < 20; trial++) {
      const n = 3 + Math.floor(rnd() * 30);
      const rows = Array.from({ length: n }, (_, i) => Array.from({ length: n }, (_, j) => (i === j ? rnd() * 1e-3 : rnd() < 0.15 ? rnd() * 2 - 1 : 0)));
      const rhs = Array.from({ length: n }, () => rnd() - 0.5);
      const a = Float64Array.from(rows.flat());
      const ws = createLuWorkspace(n);
      if (luFactor(a, ws) >= 0) continue; // structurally singular draw
      const y = Float64Array.from(rhs);
      luSolve(a, ws, y);
      const ref = (lusolve(rows, rhs) as unknown as number[][]).map((r) => r[0]!);
      ref.forEach((v, i) => expect(Math.abs(y[i]! - v)).toBeLessThan(1e-8 * Math.max(1, Math.abs(v))));
      solvedCount++;
    }
    expect(solvedCount).toBeGreaterThan(10);
  });

  it("needs pivoting: a zero on the diagonal is handled by a row exchange", () => {
    const a = Float64Array.of(0, 1, 1, 0);
    const ws = createLuWorkspace(2);
    expect(luFactor(a, ws)).toBe(-1);
    const x = Float64Array.of(3, 7);
    luSolve(a, ws, x);
    expect([...x]).toEqual([7, 3]);
  });

  it("reports the first column without a pivot for singular and numerically singular matrices", () => {
    expect(luFactor(Float64Array.of(1, 2, 2, 4), createLuWorkspace(2))).toBe(1);
    expect(luFactor(Float64Array.of(1, 0, 0, 0, 0, 0, 0, 0, 1), createLuWorkspace(3))).toBe(1);
    expect(luFactor(Float64Array.of(1, 1, 1, 1 + 1e-17), createLuWorkspace(2))).toBe(1);
  });

  // Internal consistency rather than an outside reference: the refactorisation visits only the
  // entries the symbolic structure lists, so if the structure missed one (fill, an exchanged
  // entry) its factors would differ from the dense factorisation with the same pivots.
  it("refactorisation along the symbolic structure gives the dense factors bit for bit", () => {
    const rnd = prng(31);
    let checked = 0;
    for (let trial = 0; trial < 60; trial++) {
      const n = 2 + Math.floor(rnd() * 70);
      const density = 0.03 + 0.25 * rnd();
      const a = new Float64Array(n * n);
      const pattern: number[] = [];
      for (let i = 0; i < n; i++) {
        for (let j = 0; j < n; j++) {
          // Small diagonals force row exchanges; some pattern entries are exactly zero.
          const on = i === j ? rnd() < 0.95 : rnd() < density;
          if (!on) continue;
          pattern.push(i * n + j);
          a[i * n + j] = rnd() < 0.1 ? 0 : i === j ? rnd() * 1e-3 : rnd() * 2 - 1;
        }
      }
      const dense = a.slice();
      const ws = createLuWorkspace(n);
      for (let j = 0; j < n; j++) ws.colScale[j] = 1;
      if (luFactor(dense, ws, Int32Array.from(pattern)) >= 0) continue;
      const sym = createLuSymbolic(n);
      buildSymbolic(n, Int32Array.from(pattern), ws.pivots, sym, new Int32Array(4 * n * bitWords(n)), new Int32Array(n * n));
      const again = a.slice();
      const ws2 = createLuWorkspace(n);
      ws2.colScale.set(ws.colScale);
      expect(luRefactor(again, ws2, sym)).toBe(-1);
      expect(sym.valid).toBe(true);
      expect([...ws2.pivots]).toEqual([...ws.pivots]);
      for (let t = 0; t < n * n; t++) expect(Object.is(again[t], dense[t])).toBe(true);
      checked++;
    }
    expect(checked).toBeGreaterThan(30);
  });
});
