// The linear step of the Newton loop behind a small interface, so that a benchmark can run the
// identical loop with a different solver. The default is our dense LU (lu.ts) on the unknowns
// in a fill-reducing order; on larger systems it refactors along the structure of the last
// pivot sequence instead of scanning whole rows and columns.
import {
  bitWords,
  buildSymbolic,
  createLuSymbolic,
  createLuWorkspace,
  degreeOrder,
  luFactor,
  luFactorScaled,
  luRefactor,
  luSolve,
} from "./lu.js";
import { scratchFloat64, scratchInt32 } from "./scratch.js";

export interface LinearSolver {
  /**
   * Factors a (n×n, row-major). Below PATTERN_RESTORE_MIN_UNKNOWNS it may overwrite a (the
   * Newton loop copies all of a before it stamps again); from there on it must leave a
   * unchanged (the loop restores only the stamp pattern). Returns −1, or the first column
   * (unknown) found without a pivot.
   */
  factor(a: Float64Array): number;
  /** Solves with the last factorisation; x holds the right-hand side on entry and the solution on exit. */
  solve(x: Float64Array): void;
}

/**
 * `pattern`: flat indices, ascending, of every entry the stamps can make non-zero; entries of a
 * outside it are zero in every call (a solver may ignore it).
 */
export type LinearSolverFactory = (n: number, pattern?: Int32Array) => LinearSolver;

/**
 * From this many unknowns on, the unknowns are put in a fill-reducing order and factorisations
 * after the first follow the stored structure of the last pivot sequence. Setting that up costs
 * a few scans of the n² matrix per solve, which a small system's factorisations (under a µs
 * each) do not earn back. Measured on the bench chains: a few % slower at 11 unknowns, ~5 %
 * faster per solve at 32, ~20 % at 101, twice as fast at 302.
 */
export const STRUCTURED_MIN_UNKNOWNS = 24;

export const denseLu: LinearSolverFactory = (n, pattern) => {
  const ws = createLuWorkspace(n, { int32: scratchInt32, float64: scratchFloat64 });
  if (!pattern || n < STRUCTURED_MIN_UNKNOWNS) {
    // Small systems: factored in place in the given order, as scanning n² entries is cheap
    // (allowed: n < STRUCTURED_MIN_UNKNOWNS ≤ PATTERN_RESTORE_MIN_UNKNOWNS).
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
  }
  // The factors live here, in elimination order, not in a.
  const m = scratchFloat64("lu-matrix", n * n);
  // m holds a with rows and columns in elimination order: m[k, l] = a[order[k], order[l]].
  const order = scratchInt32("lu-order", n);
  degreeOrder(n, pattern, order, scratchInt32("lu-degree", n), scratchInt32("lu-count", n + 1));
  const position = scratchInt32("lu-position", n);
  for (let k = 0; k < n; k++) position[order[k]!] = k;
  // Pattern entry t: a[pattern[t]] goes to m[into[t]], in column cols[t] of m.
  const into = scratchInt32("lu-into", pattern.length);
  const cols = scratchInt32("lu-pattern-cols", pattern.length);
  let row = 0;
  for (let t = 0; t < pattern.length; t++) {
    const idx = pattern[t]!;
    while (idx >= (row + 1) * n) row++;
    const col = position[idx - row * n]!;
    into[t] = position[row]! * n + col;
    cols[t] = col;
  }
  const y = scratchFloat64("lu-rhs", n);
  const unknownOf = (col: number): number => (col < 0 ? col : order[col]!);
  const colScale = ws.colScale;
  /** m = a in elimination order, and the column scales; `zero` first clears m's fill entries (or all of m). */
  const load = (a: Float64Array, zero: Int32Array | null): void => {
    if (zero) for (let t = 0; t < zero.length; t++) m[zero[t]!] = 0;
    else m.fill(0);
    colScale.fill(0);
    for (let t = 0; t < pattern.length; t++) {
      const v = a[pattern[t]!]!;
      m[into[t]!] = v;
      const av = Math.abs(v);
      const j = cols[t]!;
      if (av > colScale[j]!) colScale[j] = av;
    }
  };
  const sym = createLuSymbolic(n, { int32: scratchInt32 });
  // ws.pivots holds a complete pivot sequence from the last factorisation.
  let havePivots = false;
  // m is zero outside the pattern and sym.fill.
  let zeroed = false;
  return {
    factor(a) {
      if (!sym.valid && havePivots) {
        buildSymbolic(n, into, ws.pivots, sym, scratchInt32("lu-bits", 4 * n * bitWords(n)), scratchInt32("lu-fill", n * n));
        zeroed = false;
      }
      load(a, zeroed ? sym.fill : null);
      if (!sym.valid) {
        zeroed = false;
        const col = luFactorScaled(m, ws);
        havePivots = col < 0;
        return unknownOf(col);
      }
      zeroed = true;
      const col = luRefactor(m, ws, sym);
      if (!sym.valid) {
        // The pivots moved: the rest ran as a full factorisation, with fill anywhere.
        zeroed = false;
        havePivots = col < 0;
      }
      return unknownOf(col);
    },
    solve(x) {
      for (let k = 0; k < n; k++) y[k] = x[order[k]!]!;
      luSolve(m, ws, y);
      for (let k = 0; k < n; k++) x[order[k]!] = y[k]!;
    },
  };
};
