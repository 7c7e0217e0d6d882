// Dense LU factorisation with partial pivoting, in place on a row-major Float64Array, and the
// matching forward/back substitution. The Newton loop owns the arrays and reuses them: nothing
// here allocates.

/**
 * A pivot smaller than this fraction of the largest entry originally in its column is taken as
 * zero: the matrix is (numerically) singular there. Rounding leaves residues near 1e-16 of the
 * column scale where a column is truly dependent (a source loop, a floating node), while the
 * smallest genuine pivots of a bias network — a node held only by reverse-biased junctions
 * through 1e-12 S leakage beside 1 S of forward conductance elsewhere in its column — stay
 * above ~1e-12 of the column; 1e-14 sits between the two with margin on both sides.
 */
export const PIVOT_RELATIVE_THRESHOLD = 1e-14;

/**
 * Factors `a` (n×n, row-major) in place into L (unit lower, below the diagonal) and U, with row
 * exchanges recorded in `pivots`. `colScale` (length n) is scratch. Returns −1 on success, or
 * the index of the first column (unknown) without a usable pivot.
 */
export function luFactor(a: Float64Array, n: number, pivots: Int32Array, colScale: Float64Array): number {
  colScale.fill(0);
  for (let i = 0; i < n; i++) {
    const row = i * n;
    for (let j = 0; j < n; j++) {
      const v = Math.abs(a[row + j]!);
      if (v > colScale[j]!) colScale[j] = v;
    }
  }
  for (let k = 0; k < n; k++) {
    let p = k;
    let max = Math.abs(a[k * n + k]!);
    for (let i = k + 1; i < n; i++) {
      const v = Math.abs(a[i * n + k]!);
      if (v > max) {
        max = v;
        p = i;
      }
    }
    if (!(max > PIVOT_RELATIVE_THRESHOLD * colScale[k]!) || max === 0) return k;
    pivots[k] = p;
    if (p !== k) {
      const rk = k * n;
      const rp = p * n;
      for (let j = 0; j < n; j++) {
        const t = a[rk + j]!;
        a[rk + j] = a[rp + j]!;
        a[rp + j] = t;
      }
    }
    const rk = k * n;
    const inv = 1 / a[rk + k]!;
    for (let i = k + 1; i < n; i++) {
      const ri = i * n;
      const lik = a[ri + k]!;
      // MNA matrices are mostly zeros: skipping empty rows keeps a chain of stages near O(n²).
      if (lik === 0) continue;
      const l = lik * inv;
      a[ri + k] = l;
      for (let j = k + 1; j < n; j++) {
        const ukj = a[rk + j]!;
        if (ukj !== 0) a[ri + j]! -= l * ukj;
      }
    }
  }
  return -1;
}

/** Solves L·U·x = P·b in place on `x` (which holds b on entry), using a factored `a`. */
export function luSolve(a: Float64Array, n: number, pivots: Int32Array, x: Float64Array): void {
  for (let k = 0; k < n; k++) {
    const p = pivots[k]!;
    if (p !== k) {
      const t = x[k]!;
      x[k] = x[p]!;
      x[p] = t;
    }
  }
  for (let i = 1; i < n; i++) {
    const ri = i * n;
    let s = x[i]!;
    for (let j = 0; j < i; j++) s -= a[ri + j]! * x[j]!;
    x[i] = s;
  }
  for (let i = n - 1; i >= 0; i--) {
    const ri = i * n;
    let s = x[i]!;
    for (let j = i + 1; j < n; j++) s -= a[ri + j]! * x[j]!;
    x[i] = s / a[ri + i]!;
  }
}
