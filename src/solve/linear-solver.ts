// The linear step of the Newton loop behind a small interface, so that a benchmark can run the
// identical loop with a different solver. The default is our dense LU (lu.ts).
import { luFactor, luSolve } from "./lu.js";

export interface LinearSolver {
  /** Factors a (n×n, row-major); may overwrite it. Returns −1, or the first column without a pivot. */
  factor(a: Float64Array): number;
  /** Solves with the last factorisation; x holds the right-hand side on entry and the solution on exit. */
  solve(x: Float64Array): void;
}

export type LinearSolverFactory = (n: number) => LinearSolver;

export const denseLu: LinearSolverFactory = (n) => {
  const pivots = new Int32Array(n);
  const colScale = new Float64Array(n);
  let factored: Float64Array | undefined;
  return {
    factor(a) {
      factored = a;
      return luFactor(a, n, pivots, colScale);
    },
    solve(x) {
      if (factored) luSolve(factored, n, pivots, x);
    },
  };
};
