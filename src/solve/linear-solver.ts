// The linear step of the Newton loop behind a small interface, so that a benchmark can run the
// identical loop with a different solver. The default is our dense LU (lu.ts).
import { createLuWorkspace, luFactor, luSolve } from "./lu.js";
import { scratchFloat64, scratchInt32 } from "./scratch.js";

export interface LinearSolver {
  /** Factors a (n×n, row-major); may overwrite it. Returns −1, or the first column without a pivot. */
  factor(a: Float64Array): number;
  /** Solves with the last factorisation; x holds the right-hand side on entry and the solution on exit. */
  solve(x: Float64Array): void;
}

/** `pattern`: flat indices of every entry the stamps can make non-zero (a solver may ignore it). */
export type LinearSolverFactory = (n: number, pattern?: Int32Array) => LinearSolver;

export const denseLu: LinearSolverFactory = (n, pattern) => {
  const ws = createLuWorkspace(n, { int32: scratchInt32, float64: scratchFloat64 });
  let factored: Float64Array | undefined;
  return {
    factor(a) {
      factored = a;
      return luFactor(a, ws, pattern);
    },
    solve(x) {
      if (factored) luSolve(factored, ws, x);
    },
  };
};
