// Dense LU factorisation with partial pivoting, in place on a row-major Float64Array, and the
// matching forward/back substitution. Storage is dense; the work skips the zeros an MNA matrix
// is mostly made of. For larger systems there is also a fill-reducing order of the unknowns and
// a refactorisation that follows the structure of the last pivot sequence (visiting only the
// entries that can be non-zero) while its pivots stay acceptable. The workspace is allocated
// once per circuit and reused by every Newton iteration: nothing here allocates.

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

/**
 * A refactorisation keeps the previous pivot of a column while it is at least this fraction of
 * the column's largest candidate: the bound threshold pivoting guarantees (multipliers ≤ 100),
 * so reusing the structure never makes a step less accurate than a fresh factorisation may be.
 * Only below it does the factorisation pick pivots afresh (and the structure is rebuilt).
 */
export const PIVOT_KEEP_THRESHOLD = PIVOT_DIAGONAL_PREFERENCE;

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
  // One borrowed slot per array: a solve of the same size gets the same views back.
  const i32 = (slot: string, length: number): Int32Array => (borrow ? borrow.int32(slot, length) : new Int32Array(length));
  return {
    n,
    pivots: i32("lu-pivots", n),
    colScale: borrow ? borrow.float64("lu-scale", n) : new Float64Array(n),
    lRows: i32("lu-l-rows", n * n),
    lStart: i32("lu-l-start", n + 1),
    uCols: i32("lu-u-cols", n * n),
    uStart: i32("lu-u-start", n + 1),
  };
}

/**
 * Factors `a` (n×n, row-major) in place into L (unit lower, multipliers below the diagonal) and
 * U, with threshold partial pivoting (PIVOT_DIAGONAL_PREFERENCE). `pattern`, when given, lists every flat index that can be non-zero (the stamps' structure),
 * so the column scales need not scan the whole matrix. Returns −1 on success, or the index of
 * the first column (unknown) without a usable pivot.
 */
export function luFactor(a: Float64Array, ws: LuWorkspace, pattern?: Int32Array): number {
  columnScales(a, ws, pattern);
  return eliminateDense(a, ws, 0, 0, 0);
}

/** Largest magnitude originally in each column (the reference of the singularity test). */
function columnScales(a: Float64Array, ws: LuWorkspace, pattern: Int32Array | undefined): void {
  const { n, colScale } = ws;
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
}

/**
 * Steps k0… of the factorisation, scanning whole columns and rows for non-zeros; lCount and
 * uCount are the list lengths left by steps before k0 (so a refactorisation can hand over here).
 */
/**
 * One elimination step shared by the dense and the structured factorisation: the rows below the
 * pivot that have an entry in column k (lRows[lCount, lCount + nrows)) get their multiplier
 * stored in place and the pivot row's non-zeros (uCols[uCount, uCount + nnz)) subtracted.
 */
function eliminateColumn(a: Float64Array, n: number, k: number, lRows: Int32Array, lCount: number, nrows: number, uCols: Int32Array, uCount: number, nnz: number): void {
  const rk = k * n;
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
}

function eliminateDense(a: Float64Array, ws: LuWorkspace, k0: number, lCount: number, uCount: number): number {
  const { n, pivots, colScale, lRows, lStart, uCols, uStart } = ws;
  for (let k = k0; k < n; k++) {
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
    eliminateColumn(a, n, k, lRows, lCount, nrows, uCols, uCount, nnz);
    lCount += nrows;
    uCount += nnz;
  }
  lStart[n] = lCount;
  uStart[n] = uCount;
  return -1;
}

/**
 * The structure of a factorisation for one pivot sequence and one stamp pattern: which entries
 * each step can find non-zero. With it a refactorisation visits only those entries instead of
 * whole rows and columns.
 */
export interface LuSymbolic {
  /** False until built, and again once the numeric pivots leave the sequence it was built for. */
  valid: boolean;
  readonly pivots: Int32Array;
  /** Rows below the diagonal that can be non-zero in column k at step k (ascending): colRows[colStart[k] … colStart[k+1]). */
  readonly colRows: Int32Array;
  readonly colStart: Int32Array;
  /** Columns ≥ k where row k or its pivot row can be non-zero at step k (the entries an exchange moves). */
  readonly swapCols: Int32Array;
  readonly swapStart: Int32Array;
  /** Columns right of the diagonal that can be non-zero in row k after its exchange (ascending). */
  readonly rowCols: Int32Array;
  readonly rowStart: Int32Array;
  /** Flat indices outside the pattern that a refactorisation can write (fill, exchanged entries). */
  fill: Int32Array;
}

export function createLuSymbolic(n: number, borrow?: { int32(slot: string, length: number): Int32Array }): LuSymbolic {
  const i32 = (slot: string, length: number): Int32Array => (borrow ? borrow.int32(slot, length) : new Int32Array(length));
  return {
    valid: false,
    pivots: i32("lu-symbolic-pivots", n),
    colRows: i32("lu-symbolic-col-rows", n * n),
    colStart: i32("lu-symbolic-col-start", n + 1),
    swapCols: i32("lu-symbolic-swap-cols", 2 * n * n),
    swapStart: i32("lu-symbolic-swap-start", n + 1),
    rowCols: i32("lu-symbolic-row-cols", n * n),
    rowStart: i32("lu-symbolic-row-start", n + 1),
    fill: EMPTY_FILL,
  };
}

/** The empty fill list of a symbolic structure not yet built. */
const EMPTY_FILL = new Int32Array(0);

/** 32-bit words of one row (or column) of a bit matrix over n unknowns. */
export function bitWords(n: number): number {
  return (n + 31) >>> 5;
}

/**
 * Appends to `out` (from `at`) the indices above `k` set in the bit set of `w` words at
 * `set[base…]`, in increasing order; returns the new end. (kb << 1) − 1 covers bits 0…k of k's
 * word; for bit 31 it is −1, so nothing of that word is kept.
 */
function listBitsAfter(set: Int32Array, base: number, k: number, w: number, out: Int32Array, at: number): number {
  const kw = k >>> 5;
  const kb = 1 << (k & 31);
  for (let v = kw; v < w; v++) {
    let word = set[base + v]!;
    if (v === kw) word &= ~((kb << 1) - 1);
    while (word !== 0) {
      const low = word & -word;
      word ^= low;
      out[at++] = (v << 5) + 31 - Math.clz32(low);
    }
  }
  return at;
}

/**
 * Builds `sym` for the pivot sequence `pivots` on the entries `pattern` (flat indices of every
 * possibly non-zero entry): the factorisation simulated on bit sets, fill included. Each row and
 * each column of "can be non-zero now" is a bit set, so every list comes from the set bits
 * (ascending) and the work follows the entries, not the n² matrix. `bits` is scratch of
 * 4·n·bitWords(n) words; `fill` receives the entries outside the pattern it writes (n² Int32 of room).
 */
export function buildSymbolic(n: number, pattern: Int32Array, pivots: Int32Array, sym: LuSymbolic, bits: Int32Array, fill: Int32Array): void {
  const { colRows, colStart, swapCols, swapStart, rowCols, rowStart } = sym;
  const w = bitWords(n);
  const size = n * w;
  // Row bit sets: rows[i·w …] can be non-zero now; written[i·w …] written at some point;
  // inPattern[i·w …] in the pattern. cols[j·w …]: the rows that can be non-zero in column j.
  const rows = bits.subarray(0, size);
  const written = bits.subarray(size, 2 * size);
  const inPattern = bits.subarray(2 * size, 3 * size);
  const cols = bits.subarray(3 * size, 4 * size);
  rows.fill(0);
  cols.fill(0);
  for (let t = 0; t < pattern.length; t++) {
    const idx = pattern[t]!;
    const i = (idx / n) | 0;
    const j = idx - i * n;
    rows[i * w + (j >>> 5)]! |= 1 << (j & 31);
    cols[j * w + (i >>> 5)]! |= 1 << (i & 31);
  }
  inPattern.set(rows);
  written.set(rows);
  let cc = 0;
  let sc = 0;
  let rc = 0;
  for (let k = 0; k < n; k++) {
    const rk = k * w;
    const kw = k >>> 5;
    const kb = 1 << (k & 31);
    // Rows below the diagonal that can be non-zero in column k (before the exchange).
    colStart[k] = cc;
    cc = listBitsAfter(cols, k * w, k, w, colRows, cc);
    const p = pivots[k]!;
    sym.pivots[k] = p;
    swapStart[k] = sc;
    if (p !== k) {
      const rp = p * w;
      const pw = p >>> 5;
      const pb = 1 << (p & 31);
      for (let v = kw; v < w; v++) {
        // Columns k… only.
        const keep = v === kw ? ~(kb - 1) : -1;
        const mk = rows[rk + v]! & keep;
        const mp = rows[rp + v]! & keep;
        let both = mk | mp;
        written[rk + v]! |= both;
        written[rp + v]! |= both;
        while (both !== 0) {
          const low = both & -both;
          both ^= low;
          swapCols[sc++] = (v << 5) + 31 - Math.clz32(low);
        }
        // The rows exchange these columns: where exactly one had an entry, both column bits flip.
        let differ = mk ^ mp;
        while (differ !== 0) {
          const low = differ & -differ;
          differ ^= low;
          const j = (v << 5) + 31 - Math.clz32(low);
          cols[j * w + kw]! ^= kb;
          cols[j * w + pw]! ^= pb;
        }
        rows[rk + v] = (rows[rk + v]! & ~keep) | mp;
        rows[rp + v] = (rows[rp + v]! & ~keep) | mk;
      }
    }
    // Columns right of the diagonal that can be non-zero in row k after its exchange.
    rowStart[k] = rc;
    rc = listBitsAfter(rows, rk, k, w, rowCols, rc);
    // Rows eliminated at this step: the column's candidates, with the exchanged row p standing
    // for row k when k had an entry in this column; each gains the pivot row's columns (fill).
    const r0 = rowStart[k]!;
    for (let t = colStart[k]!; t <= cc; t++) {
      let r: number;
      if (t < cc) {
        r = colRows[t]!;
        if (r === p) continue;
      } else {
        if (p === k || !(rows[p * w + kw]! & kb)) break;
        r = p;
      }
      const ri = r * w;
      const rw = r >>> 5;
      const rb = 1 << (r & 31);
      for (let u = r0; u < rc; u++) {
        const j = rowCols[u]!;
        const at = ri + (j >>> 5);
        const bit = 1 << (j & 31);
        written[at]! |= bit;
        if (!(rows[at]! & bit)) {
          rows[at]! |= bit;
          cols[j * w + rw]! |= rb;
        }
      }
    }
  }
  colStart[n] = cc;
  swapStart[n] = sc;
  rowStart[n] = rc;
  let count = 0;
  for (let i = 0; i < n; i++) {
    const ri = i * w;
    for (let v = 0; v < w; v++) {
      let word = written[ri + v]! & ~inPattern[ri + v]!;
      while (word !== 0) {
        const low = word & -word;
        word ^= low;
        fill[count++] = i * n + (v << 5) + 31 - Math.clz32(low);
      }
    }
  }
  sym.fill = fill.subarray(0, count);
  sym.valid = true;
}

/**
 * Factors `a` in place with the pivots `sym` was built for, visiting only the entries it lists,
 * as long as each pivot stays acceptable (PIVOT_KEEP_THRESHOLD); at the first step where one
 * does not, `sym` is marked invalid and the remaining steps pick pivots as luFactor does.
 * Entries of `a` outside the pattern and sym.fill must be zero. Column scales must already be in ws.colScale.
 */
export function luRefactor(a: Float64Array, ws: LuWorkspace, sym: LuSymbolic): number {
  const { n, pivots, colScale, lRows, lStart, uCols, uStart } = ws;
  const { colRows, colStart, swapCols, swapStart, rowCols, rowStart } = sym;
  let lCount = 0;
  let uCount = 0;
  for (let k = 0; k < n; k++) {
    const rk = k * n;
    lStart[k] = lCount;
    uStart[k] = uCount;
    let p: number;
    let max = Math.abs(a[rk + k]!);
    let nrows = 0;
    const c1 = colStart[k + 1]!;
    for (let t = colStart[k]!; t < c1; t++) {
      const i = colRows[t]!;
      const v = a[i * n + k]!;
      if (v === 0) continue;
      lRows[lCount + nrows++] = i;
      const av = Math.abs(v);
      if (av > max) max = av;
    }
    if (!(max > PIVOT_RELATIVE_THRESHOLD * colScale[k]!) || max === 0) return k;
    p = sym.pivots[k]!;
    if (!(Math.abs(a[p * n + k]!) >= PIVOT_KEEP_THRESHOLD * max)) {
      sym.valid = false;
      return eliminateDense(a, ws, k, lCount, uCount);
    }
    pivots[k] = p;
    if (p !== k) {
      const rp = p * n;
      const s1 = swapStart[k + 1]!;
      for (let t = swapStart[k]!; t < s1; t++) {
        const j = swapCols[t]!;
        const tmp = a[rk + j]!;
        a[rk + j] = a[rp + j]!;
        a[rp + j] = tmp;
      }
      let w = lCount;
      for (let t = lCount; t < lCount + nrows; t++) if (lRows[t] !== p) lRows[w++] = lRows[t]!;
      nrows = w - lCount;
      if (a[rp + k] !== 0) lRows[lCount + nrows++] = p;
    }
    let nnz = 0;
    const u1 = rowStart[k + 1]!;
    for (let t = rowStart[k]!; t < u1; t++) {
      const j = rowCols[t]!;
      if (a[rk + j] !== 0) uCols[uCount + nnz++] = j;
    }
    eliminateColumn(a, n, k, lRows, lCount, nrows, uCols, uCount, nnz);
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

/**
 * A fill-reducing elimination order for the stamp pattern (ascending flat indices): unknowns by
 * ascending number of off-diagonal entries in their row, ties in index order (deterministic).
 * order[k] is the unknown eliminated k-th. On chains of transistor stages this cuts the
 * factorisation's multiply–adds three- to fourfold against the order of the node names; a
 * minimum-degree order (fill updated as it goes) saves a third more of them but costs more to
 * find (n² per solve) than it saves on bias networks. `count` is scratch of n + 1.
 */
export function degreeOrder(n: number, pattern: Int32Array, order: Int32Array, degree: Int32Array, count: Int32Array): void {
  degree.fill(0, 0, n);
  let row = 0;
  for (let t = 0; t < pattern.length; t++) {
    const idx = pattern[t]!;
    while (idx >= (row + 1) * n) row++;
    if (idx !== row * n + row) degree[row]!++;
  }
  // Counting sort by degree (degrees are below n), stable in index order.
  count.fill(0, 0, n + 1);
  for (let i = 0; i < n; i++) count[degree[i]! + 1]!++;
  for (let d = 0; d < n; d++) count[d + 1]! += count[d]!;
  for (let i = 0; i < n; i++) order[count[degree[i]!]!++] = i;
}

/** luFactor for a matrix whose column scales are already in ws.colScale. */
export function luFactorScaled(a: Float64Array, ws: LuWorkspace): number {
  return eliminateDense(a, ws, 0, 0, 0);
}
