// Dense LU factorisation with partial pivoting, in place on a row-major Float64Array, and the
// matching forward/back substitution. Storage is dense; the work skips the zeros an MNA matrix
// is mostly made of. The workspace is allocated once per circuit and reused by every Newton
// iteration: nothing here allocates.

/**
 * A pivot smaller than this fraction of the largest entry originally in its column is taken as
 * zero: the matrix is (numerically) singular there. Rounding leaves residues near 1e-16 of the
 * column scale where a column is truly dependent (a source loop, a floating node), while the
 * smallest genuine pivots of a bias network — a node held only by reverse-biased junctions
 * through 1e-12 S leakage beside ~1 S of forward conductance elsewhere in its column — stay
 * above ~1e-12 of the column; 1e-14 sits between the two with margin on both sides.
 */
export const PIVOT_RELATIVE_THRESHOLD = 1e-14;

/**
 * Threshold pivoting: the diagonal entry is kept as pivot when it is at least this fraction of
 * the column's largest candidate. In a transistor stage the largest entry of a base column is
 * the collector row's transconductance, ~β times the base's own conductance, so strict partial
 * pivoting exchanges rows at nearly every transistor and spreads fill; keeping the diagonal
 * down to 1 % cuts the work by about a third on bias networks. Multipliers stay ≤ 100, and the
 * Newton loop accepts a point only on the true residual a·x − b, so a less accurate step can
 * only cost an iteration, never give a wrong answer. (0.1, the usual sparse-solver default,
 * is too strict to help here: base/transconductance ratios are ~1/β.)
 */
export const PIVOT_DIAGONAL_PREFERENCE = 0.01;

export interface LuWorkspace {
  readonly n: number;
  /** Row exchanged with row k at step k (exchanges apply to columns k… only, as in LINPACK). */
  readonly pivots: Int32Array;
  readonly colScale: Float64Array;
  /** Rows holding a multiplier in column k: lRows[lStart[k] … lStart[k+1]). */
  readonly lRows: Int32Array;
  readonly lStart: Int32Array;
  /** Columns right of the diagonal holding a non-zero in U's row k: uCols[uStart[k] … uStart[k+1]). */
  readonly uCols: Int32Array;
  readonly uStart: Int32Array;
}

export function createLuWorkspace(n: number, borrow?: { int32(slot: string, length: number): Int32Array; float64(slot: string, length: number): Float64Array }): LuWorkspace {
  // Every array is fully written by luFactor before luSolve reads it, so borrowed memory is safe.
  const i32 = borrow ? borrow.int32("lu", 2 * n * n + 3 * n + 2) : new Int32Array(2 * n * n + 3 * n + 2);
  let at = 0;
  const take = (length: number): Int32Array => i32.subarray(at, (at += length));
  return {
    n,
    pivots: take(n),
    colScale: borrow ? borrow.float64("lu-scale", n) : new Float64Array(n),
    lRows: take(n * n),
    lStart: take(n + 1),
    uCols: take(n * n),
    uStart: take(n + 1),
  };
}

/**
 * Factors `a` (n×n, row-major) in place into L (unit lower, multipliers below the diagonal) and
 * U, with threshold partial pivoting (PIVOT_DIAGONAL_PREFERENCE). `pattern`, when given, lists every flat index that can be non-zero (the stamps' structure),
 * so the column scales need not scan the whole matrix. Returns −1 on success, or the index of
 * the first column (unknown) without a usable pivot.
 */
export function luFactor(a: Float64Array, ws: LuWorkspace, pattern?: Int32Array): number {
  const { n, pivots, colScale, lRows, lStart, uCols, uStart } = ws;
  colScale.fill(0);
  if (pattern) {
    for (let t = 0; t < pattern.length; t++) {
      const idx = pattern[t]!;
      const j = idx % n;
      const v = Math.abs(a[idx]!);
      if (v > colScale[j]!) colScale[j] = v;
    }
  } else {
    for (let i = 0; i < n; i++) {
      const row = i * n;
      for (let j = 0; j < n; j++) {
        const v = Math.abs(a[row + j]!);
        if (v > colScale[j]!) colScale[j] = v;
      }
    }
  }
  let lCount = 0;
  let uCount = 0;
  for (let k = 0; k < n; k++) {
    const rk = k * n;
    lStart[k] = lCount;
    uStart[k] = uCount;
    // One pass down column k: the pivot, and the rows with something to eliminate.
    let p = k;
    let max = Math.abs(a[rk + k]!);
    let nrows = 0;
    for (let i = k + 1; i < n; i++) {
      const v = a[i * n + k]!;
      if (v === 0) continue;
      lRows[lCount + nrows++] = i;
      const av = Math.abs(v);
      if (av > max) {
        max = av;
        p = i;
      }
    }
    if (!(max > PIVOT_RELATIVE_THRESHOLD * colScale[k]!) || max === 0) return k;
    if (p !== k && Math.abs(a[rk + k]!) >= PIVOT_DIAGONAL_PREFERENCE * max) p = k;
    pivots[k] = p;
    if (p !== k) {
      const rp = p * n;
      for (let j = k; j < n; j++) {
        const t = a[rk + j]!;
        a[rk + j] = a[rp + j]!;
        a[rp + j] = t;
      }
      // Row p now holds the old row k: it needs elimination only if that row had a non-zero here.
      let w = lCount;
      for (let t = lCount; t < lCount + nrows; t++) if (lRows[t] !== p) lRows[w++] = lRows[t]!;
      nrows = w - lCount;
      if (a[rp + k] !== 0) lRows[lCount + nrows++] = p;
    }
    let nnz = 0;
    for (let j = k + 1; j < n; j++) if (a[rk + j] !== 0) uCols[uCount + nnz++] = j;
    const inv = 1 / a[rk + k]!;
    for (let r = lCount; r < lCount + nrows; r++) {
      const ri = lRows[r]! * n;
      const l = a[ri + k]! * inv;
      a[ri + k] = l;
      for (let t = uCount; t < uCount + nnz; t++) {
        const j = uCols[t]!;
        a[ri + j]! -= l * a[rk + j]!;
      }
    }
    lCount += nrows;
    uCount += nnz;
  }
  lStart[n] = lCount;
  uStart[n] = uCount;
  return -1;
}

/** Solves L·U·x = P·b in place on `x` (which holds b on entry), using a factored `a`. */
export function luSolve(a: Float64Array, ws: LuWorkspace, x: Float64Array): void {
  const { n, pivots, lRows, lStart, uCols, uStart } = ws;
  for (let k = 0; k < n; k++) {
    const p = pivots[k]!;
    if (p !== k) {
      const t = x[k]!;
      x[k] = x[p]!;
      x[p] = t;
    }
    const xk = x[k]!;
    if (xk === 0) continue;
    for (let t = lStart[k]!; t < lStart[k + 1]!; t++) {
      const i = lRows[t]!;
      x[i]! -= a[i * n + k]! * xk;
    }
  }
  for (let k = n - 1; k >= 0; k--) {
    const rk = k * n;
    let s = x[k]!;
    for (let t = uStart[k]!; t < uStart[k + 1]!; t++) {
      const j = uCols[t]!;
      s -= a[rk + j]! * x[j]!;
    }
    x[k] = s / a[rk + k]!;
  }
}
