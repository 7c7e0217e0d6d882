// The linear step of the Newton loop behind a small interface, so that a benchmark can run the
// identical loop with a different solver. The default is our dense LU (lu.ts), which after its
// first factorisation of a plan refactors along the structure of that pivot sequence.
import { buildSymbolic, createLuSymbolic, createLuWorkspace, factorColumnScales, luFactor, luRefactor, luSolve } from "./lu.js";
import { scratchFloat64, scratchInt32, scratchUint8 } from "./scratch.js";

export interface LinearSolver {
  /** Factors a (n×n, row-major), leaving it unchanged. Returns −1, or the first column without a pivot. */
  factor(a: Float64Array): number;
  /** Solves with the last factorisation; x holds the right-hand side on entry and the solution on exit. */
  solve(x: Float64Array): void;
}

/**
 * `pattern`: flat indices, ascending, of every entry the stamps can make non-zero; entries of a
 * outside it are zero in every call (a solver may ignore it).
 */
export type LinearSolverFactory = (n: number, pattern?: Int32Array) => LinearSolver;

export const denseLu: LinearSolverFactory = (n, pattern) => {
  const ws = createLuWorkspace(n, { int32: scratchInt32, float64: scratchFloat64 });
  // The factors live here, not in a: the Newton loop then only restores the stamp pattern.
  const m = scratchFloat64("lu-matrix", n * n);
  if (!pattern) {
    return {
      factor(a) {
        m.set(a);
        return luFactor(m, ws);
      },
      solve(x) {
        luSolve(m, ws, x);
      },
    };
  }
  const sym = createLuSymbolic(n, { int32: scratchInt32 });
  // ws.pivots holds a complete pivot sequence from the last factorisation.
  let havePivots = false;
  // m is zero outside sym.touched (so copying those entries of a makes m equal to a).
  let zeroed = false;
  return {
    factor(a) {
      if (!sym.valid && havePivots) {
        buildSymbolic(n, pattern, ws.pivots, sym, scratchUint8("lu-mark", n * n), scratchInt32("lu-touched", n * n));
        zeroed = false;
      }
      if (!sym.valid) {
        m.set(a);
        zeroed = false;
        const col = luFactor(m, ws, pattern);
        havePivots = col < 0;
        return col;
      }
      factorColumnScales(a, ws, pattern);
      if (zeroed) {
        const touched = sym.touched;
        for (let t = 0; t < touched.length; t++) {
          const idx = touched[t]!;
          m[idx] = a[idx]!;
        }
      } else {
        m.set(a);
        zeroed = true;
      }
      const col = luRefactor(m, ws, sym);
      if (!sym.valid) {
        // The pivots moved: the rest ran as a full factorisation, with fill anywhere.
        zeroed = false;
        havePivots = col < 0;
      }
      return col;
    },
    solve(x) {
      luSolve(m, ws, x);
    },
  };
};
