// Dense complex LU factorisation with partial pivoting, on preallocated typed arrays.
// The small-signal stage assembles one matrix per view (midband or one frequency), factors it
// once and solves it for several right-hand sides (gain, output-impedance test current).
// A matrix whose imaginary part is all zero (every midband view) takes a real-only path,
// which is about four times cheaper and gives the same numbers.

/**
 * A pivot smaller than this fraction of the largest entry its column had before elimination
 * counts as zero: about a thousand times the double rounding unit, so rounding noise left in
 * an exactly singular column is caught, while genuinely small conductances (1e-12 S beside
 * a 1 S branch entry is a ratio of 1e-12) still pass.
 */
export const PIVOT_RELATIVE_LIMIT = 1e-13;

export class ComplexLu {
  readonly n: number;
  /** Matrix entries, row-major (row i, column j at i·n + j); overwritten by the factors. */
  readonly re: Float64Array;
  readonly im: Float64Array;
  /**
   * Rows are swapped through this table, not in memory: logical row k lives at offset
   * rowAt[k] (a multiple of n), and rowAt[k]/n is also the original row, i.e. the permutation.
   */
  private readonly rowAt: Int32Array;
  private readonly colScale: Float64Array;
  /** Columns of the current pivot row that are non-zero (MNA matrices are sparse). */
  private readonly nonzero: Int32Array;
  private readonly tmpRe: Float64Array;
  private readonly tmpIm: Float64Array;
  private realOnly = false;
  private anyImag = false;
  private factored = false;

  constructor(n: number) {
    this.n = n;
    this.re = new Float64Array(n * n);
    this.im = new Float64Array(n * n);
    this.rowAt = new Int32Array(n);
    this.colScale = new Float64Array(n);
    this.nonzero = new Int32Array(n);
    this.tmpRe = new Float64Array(n);
    this.tmpIm = new Float64Array(n);
  }

  clear(): void {
    this.re.fill(0);
    if (this.anyImag) this.im.fill(0);
    this.colScale.fill(0);
    this.anyImag = false;
    this.factored = false;
  }

  /**
   * Adds to entry (row, col). Each column's scale for the singularity test is the sum of the
   * magnitudes added to it: never below its largest entry, and free to keep up to date here.
   */
  add(row: number, col: number, re: number, im = 0): void {
    const k = row * this.n + col;
    this.re[k] = (this.re[k] as number) + re;
    this.colScale[col] = (this.colScale[col] as number) + Math.abs(re) + Math.abs(im);
    if (im !== 0) {
      this.im[k] = (this.im[k] as number) + im;
      this.anyImag = true;
    }
  }

  /**
   * Factors the matrix in place. Returns -1 on success, else the column (unknown) whose pivot
   * vanished: the caller maps it back to the node or branch at fault.
   */
  factor(): number {
    this.factored = false;
    this.realOnly = !this.anyImag;
    for (let i = 0; i < this.n; i++) this.rowAt[i] = i * this.n;
    const failed = this.realOnly ? this.factorReal() : this.factorComplex();
    if (failed < 0) this.factored = true;
    return failed;
  }

  private swapRows(a: number, b: number): void {
    const t = this.rowAt[a] as number;
    this.rowAt[a] = this.rowAt[b] as number;
    this.rowAt[b] = t;
  }

  private factorReal(): number {
    const { n, re, nonzero, rowAt } = this;
    for (let k = 0; k < n; k++) {
      let p = k;
      let best = Math.abs(re[(rowAt[k] as number) + k] as number);
      for (let i = k + 1; i < n; i++) {
        const a = Math.abs(re[(rowAt[i] as number) + k] as number);
        if (a > best) {
          best = a;
          p = i;
        }
      }
      if (!(best > PIVOT_RELATIVE_LIMIT * (this.colScale[k] as number)) || best === 0) return k;
      if (p !== k) this.swapRows(k, p);
      const rowK = rowAt[k] as number;
      const pivot = re[rowK + k] as number;
      let count = 0;
      for (let j = k + 1; j < n; j++) if ((re[rowK + j] as number) !== 0) nonzero[count++] = j;
      for (let i = k + 1; i < n; i++) {
        const rowI = rowAt[i] as number;
        const a = re[rowI + k] as number;
        if (a === 0) continue;
        const l = a / pivot;
        re[rowI + k] = l;
        for (let c = 0; c < count; c++) {
          const j = nonzero[c] as number;
          re[rowI + j] = (re[rowI + j] as number) - l * (re[rowK + j] as number);
        }
      }
    }
    return -1;
  }

  private factorComplex(): number {
    const { n, re, im, nonzero, rowAt } = this;
    for (let k = 0; k < n; k++) {
      let p = k;
      let best = -1;
      for (let i = k; i < n; i++) {
        const o = (rowAt[i] as number) + k;
        const a = Math.abs(re[o] as number) + Math.abs(im[o] as number);
        if (a > best) {
          best = a;
          p = i;
        }
      }
      if (!(best > PIVOT_RELATIVE_LIMIT * (this.colScale[k] as number)) || best === 0) return k;
      if (p !== k) this.swapRows(k, p);
      const rowK = rowAt[k] as number;
      const pr = re[rowK + k] as number;
      const pi = im[rowK + k] as number;
      const d = pr * pr + pi * pi;
      // 1 / pivot, formed once per column.
      const ir = pr / d;
      const ii = -pi / d;
      let count = 0;
      for (let j = k + 1; j < n; j++) {
        if ((re[rowK + j] as number) !== 0 || (im[rowK + j] as number) !== 0) nonzero[count++] = j;
      }
      for (let i = k + 1; i < n; i++) {
        const rowI = rowAt[i] as number;
        const ar = re[rowI + k] as number;
        const ai = im[rowI + k] as number;
        if (ar === 0 && ai === 0) continue;
        const lr = ar * ir - ai * ii;
        const li = ar * ii + ai * ir;
        re[rowI + k] = lr;
        im[rowI + k] = li;
        for (let c = 0; c < count; c++) {
          const j = nonzero[c] as number;
          const ur = re[rowK + j] as number;
          const ui = im[rowK + j] as number;
          re[rowI + j] = (re[rowI + j] as number) - (lr * ur - li * ui);
          im[rowI + j] = (im[rowI + j] as number) - (lr * ui + li * ur);
        }
      }
    }
    return -1;
  }

  /**
   * Solves A·x = b with the factors. b and x may be the same arrays. Requires a successful
   * factor() since the last change to the matrix.
   */
  solve(bRe: Float64Array, bIm: Float64Array, xRe: Float64Array, xIm: Float64Array): void {
    if (!this.factored) throw new Error("ComplexLu.solve called without a successful factor()");
    const { n, rowAt, tmpRe, tmpIm } = this;
    for (let i = 0; i < n; i++) {
      const p = ((rowAt[i] as number) / n) | 0;
      tmpRe[i] = bRe[p] as number;
      tmpIm[i] = bIm[p] as number;
    }
    if (this.realOnly) {
      this.substituteReal(tmpRe);
      let anyImag = false;
      for (let i = 0; i < n; i++) if ((tmpIm[i] as number) !== 0) anyImag = true;
      if (anyImag) this.substituteReal(tmpIm);
    } else {
      this.substituteComplex(tmpRe, tmpIm);
    }
    xRe.set(tmpRe);
    xIm.set(tmpIm);
  }

  // Forward substitution runs by columns and skips zero entries: the right-hand sides here
  // are one drive or one test current, so most of x stays zero until late.
  private substituteReal(x: Float64Array): void {
    const { n, re, rowAt } = this;
    for (let j = 0; j < n - 1; j++) {
      const v = x[j] as number;
      if (v === 0) continue;
      for (let i = j + 1; i < n; i++) {
        const l = re[(rowAt[i] as number) + j] as number;
        if (l !== 0) x[i] = (x[i] as number) - l * v;
      }
    }
    for (let i = n - 1; i >= 0; i--) {
      const row = rowAt[i] as number;
      let s = x[i] as number;
      for (let j = i + 1; j < n; j++) s -= (re[row + j] as number) * (x[j] as number);
      x[i] = s / (re[row + i] as number);
    }
  }

  private substituteComplex(xr: Float64Array, xi: Float64Array): void {
    const { n, re, im, rowAt } = this;
    for (let j = 0; j < n - 1; j++) {
      const vr = xr[j] as number;
      const vi = xi[j] as number;
      if (vr === 0 && vi === 0) continue;
      for (let i = j + 1; i < n; i++) {
        const o = (rowAt[i] as number) + j;
        const lr = re[o] as number;
        const li = im[o] as number;
        if (lr === 0 && li === 0) continue;
        xr[i] = (xr[i] as number) - (lr * vr - li * vi);
        xi[i] = (xi[i] as number) - (lr * vi + li * vr);
      }
    }
    for (let i = n - 1; i >= 0; i--) {
      const row = rowAt[i] as number;
      let sr = xr[i] as number;
      let si = xi[i] as number;
      for (let j = i + 1; j < n; j++) {
        const ur = re[row + j] as number;
        const ui = im[row + j] as number;
        const vr = xr[j] as number;
        const vi = xi[j] as number;
        sr -= ur * vr - ui * vi;
        si -= ur * vi + ui * vr;
      }
      const dr = re[row + i] as number;
      const di = im[row + i] as number;
      const d = dr * dr + di * di;
      xr[i] = (sr * dr + si * di) / d;
      xi[i] = (si * dr - sr * di) / d;
    }
  }
}
