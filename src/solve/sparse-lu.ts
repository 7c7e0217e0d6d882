// Sparse LU for large systems: the matrix is held as its stamp pattern's values only
// (compressed rows, `a[slot]`), never as n² entries. Left-looking factorisation column by column
// (each column a sparse triangular solve whose non-zeros are found by a depth-first search over
// L's columns), with the same threshold partial pivoting as the dense LU (lu.ts). Newton steps
// after the first refactor along the stored structure of L and U while the pivots stay
// acceptable, which repeats exactly the arithmetic of a fresh factorisation with those pivots.
//
// What depends only on the topology — the fill-reducing order, the column-wise map of the
// pattern, the workspace sizes — is worked out once per pattern and kept (a few recent
// patterns), so every scenario of a circuit reuses it. The pivot sequence is chosen afresh at
// the first factorisation of each solve: it depends on the values, and taking it over from
// another solve would make a result depend on what was solved before it.
import { PIVOT_DIAGONAL_PREFERENCE, PIVOT_KEEP_THRESHOLD, PIVOT_RELATIVE_THRESHOLD } from "./lu.js";
import type { LinearSolver } from "./linear-solver.js";

/** A pattern in compressed rows: row i's columns (ascending) are cols[rowStart[i] … rowStart[i+1]); slot t holds a[t]. */
export interface CompressedPattern {
  readonly rowStart: Int32Array;
  readonly cols: Int32Array;
}

/** The topology-only part of the factorisation: order and column map of one pattern. */
interface Analysis {
  readonly n: number;
  readonly rowStart: Int32Array;
  readonly cols: Int32Array;
  /** order[k] is the unknown eliminated k-th (rows and columns alike). */
  readonly order: Int32Array;
  /** B = A with rows and columns in elimination order, by columns: rows bRows[bStart[k] … bStart[k+1]), values a[bSlot[…]]. */
  readonly bStart: Int32Array;
  readonly bRows: Int32Array;
  readonly bSlot: Int32Array;
  /** The numeric factors and workspaces, grown as needed and shared by the solves of this pattern (one at a time). */
  readonly work: Work;
}

interface Work {
  /** L by columns (unit diagonal first), row indices as pivot steps after a factorisation. */
  lStart: Int32Array;
  lRows: Int32Array;
  lVals: Float64Array;
  /** U by columns (diagonal last), row indices as pivot steps, off-diagonal entries in the order the solve meets them. */
  uStart: Int32Array;
  uRows: Int32Array;
  uVals: Float64Array;
  /** pinv[row of B] = the step that row is pivot of (−1 while not yet pivotal). */
  readonly pinv: Int32Array;
  readonly x: Float64Array;
  readonly reach: Int32Array;
  readonly stack: Int32Array;
  readonly next: Int32Array;
  readonly mark: Int32Array;
  markStamp: number;
  readonly colScale: Float64Array;
  readonly y: Float64Array;
}

/** Patterns analysed recently (most recent last); a run usually solves one circuit's scenarios in a row. */
const RECENT = 4;
const recent: Analysis[] = [];

function samePattern(an: Analysis, n: number, p: CompressedPattern): boolean {
  if (an.n !== n || an.cols.length !== p.cols.length) return false;
  if (an.rowStart === p.rowStart && an.cols === p.cols) return true;
  for (let i = 0; i <= n; i++) if (an.rowStart[i] !== p.rowStart[i]) return false;
  for (let t = 0; t < p.cols.length; t++) if (an.cols[t] !== p.cols[t]) return false;
  return true;
}

function analysisOf(n: number, p: CompressedPattern): Analysis {
  for (let i = recent.length - 1; i >= 0; i--) {
    const an = recent[i]!;
    if (samePattern(an, n, p)) {
      if (i !== recent.length - 1) {
        recent.splice(i, 1);
        recent.push(an);
      }
      return an;
    }
  }
  const an = analyse(n, p);
  recent.push(an);
  if (recent.length > RECENT) recent.shift();
  return an;
}

function analyse(n: number, p: CompressedPattern): Analysis {
  // Copies: the plan's arrays are borrowed scratch that the next circuit overwrites.
  const rowStart = Int32Array.from(p.rowStart.subarray(0, n + 1));
  const cols = Int32Array.from(p.cols);
  const order = sparseDegreeOrder(n, rowStart, cols);
  const position = new Int32Array(n);
  for (let k = 0; k < n; k++) position[order[k]!] = k;
  // Column counts of B, then its entries by column (rows ascending within a column).
  const nnz = cols.length;
  const bStart = new Int32Array(n + 1);
  for (let t = 0; t < nnz; t++) bStart[position[cols[t]!]! + 1]!++;
  for (let k = 0; k < n; k++) bStart[k + 1]! += bStart[k]!;
  const bRows = new Int32Array(nnz);
  const bSlot = new Int32Array(nnz);
  const fillAt = bStart.slice(0, n);
  for (let k = 0; k < n; k++) {
    const i = order[k]!; // row k of B is row i of A
    for (let t = rowStart[i]!; t < rowStart[i + 1]!; t++) {
      const c = position[cols[t]!]!;
      const at = fillAt[c]!++;
      bRows[at] = k;
      bSlot[at] = t;
    }
  }
  const guess = 4 * nnz + n;
  const work: Work = {
    lStart: new Int32Array(n + 1),
    lRows: new Int32Array(guess),
    lVals: new Float64Array(guess),
    uStart: new Int32Array(n + 1),
    uRows: new Int32Array(guess),
    uVals: new Float64Array(guess),
    pinv: new Int32Array(n),
    x: new Float64Array(n),
    reach: new Int32Array(n),
    stack: new Int32Array(n),
    next: new Int32Array(n),
    mark: new Int32Array(n),
    markStamp: 0,
    colScale: new Float64Array(n),
    y: new Float64Array(n),
  };
  return { n, rowStart, cols, order, bStart, bRows, bSlot, work };
}

/**
 * Fill-reducing order: unknowns by ascending number of off-diagonal entries in their row, ties
 * in index order (deterministic) — the order the dense LU uses (lu.ts degreeOrder).
 */
export function sparseDegreeOrder(n: number, rowStart: Int32Array, cols: Int32Array): Int32Array {
  const degree = new Int32Array(n);
  for (let i = 0; i < n; i++) {
    let d = 0;
    for (let t = rowStart[i]!; t < rowStart[i + 1]!; t++) if (cols[t] !== i) d++;
    degree[i] = d;
  }
  const count = new Int32Array(n + 1);
  for (let i = 0; i < n; i++) count[degree[i]! + 1]!++;
  for (let d = 0; d < n; d++) count[d + 1]! += count[d]!;
  const order = new Int32Array(n);
  for (let i = 0; i < n; i++) order[count[degree[i]!]!++] = i;
  return order;
}

function grow<T extends Int32Array | Float64Array>(arr: T, need: number): T {
  if (need <= arr.length) return arr;
  const bigger = new (arr.constructor as { new (n: number): T })(Math.max(need, 2 * arr.length));
  bigger.set(arr);
  return bigger;
}

/**
 * Pushes onto `reach` (from the top down, ending at the returned top) every row reachable from
 * row j through L's columns, in reverse finishing order: ascending from top, a topological
 * order in which each pivotal row comes before the rows its column updates.
 */
function depthFirst(j: number, w: Work, top: number): number {
  const { lStart, lRows, pinv, stack, next, mark, reach } = w;
  const stamp = w.markStamp;
  let head = 0;
  stack[0] = j;
  while (head >= 0) {
    const r = stack[head]!;
    const col = pinv[r]!;
    if (mark[r] !== stamp) {
      mark[r] = stamp;
      next[head] = col < 0 ? 0 : lStart[col]!;
    }
    let done = true;
    const end = col < 0 ? 0 : lStart[col + 1]!;
    for (let p = next[head]!; p < end; p++) {
      const i = lRows[p]!;
      if (mark[i] === stamp) continue;
      next[head] = p + 1;
      stack[++head] = i;
      done = false;
      break;
    }
    if (done) {
      head--;
      reach[--top] = r;
    }
  }
  return top;
}

/**
 * A fresh factorisation of B (values from a) with threshold partial pivoting; L's row indices
 * are turned into pivot steps at the end. Returns −1, or the step (column of B) without a pivot.
 */
function factorFresh(an: Analysis, a: Float64Array): number {
  const { n, bStart, bRows, bSlot } = an;
  const w = an.work;
  const { pinv, x, reach, colScale } = w;
  pinv.fill(-1);
  x.fill(0);
  let lnz = 0;
  let unz = 0;
  for (let k = 0; k < n; k++) {
    w.lStart[k] = lnz;
    w.uStart[k] = unz;
    // Room for this column's entries in the worst case (all n rows).
    if (lnz + n > w.lRows.length) {
      w.lRows = grow(w.lRows, lnz + n);
      w.lVals = grow(w.lVals, lnz + n);
    }
    if (unz + n > w.uRows.length) {
      w.uRows = grow(w.uRows, unz + n);
      w.uVals = grow(w.uVals, unz + n);
    }
    const lRows = w.lRows;
    const lVals = w.lVals;
    const uRows = w.uRows;
    const uVals = w.uVals;
    // Non-zero pattern of L \ B(:,k): the rows reachable from B's entries in this column.
    w.markStamp++;
    if (w.markStamp === 0x7fffffff) {
      w.mark.fill(0);
      w.markStamp = 1;
    }
    let top = n;
    const c0 = bStart[k]!;
    const c1 = bStart[k + 1]!;
    for (let t = c0; t < c1; t++) if (w.mark[bRows[t]!] !== w.markStamp) top = depthFirst(bRows[t]!, w, top);
    for (let t = top; t < n; t++) x[reach[t]!] = 0;
    for (let t = c0; t < c1; t++) x[bRows[t]!] = a[bSlot[t]!]!;
    // The sparse lower solve, in topological order.
    for (let t = top; t < n; t++) {
      const j = reach[t]!;
      const col = pinv[j]!;
      if (col < 0) continue;
      const xj = x[j]!;
      if (xj === 0) continue;
      const end = w.lStart[col + 1]!;
      for (let p = w.lStart[col]! + 1; p < end; p++) x[lRows[p]!]! -= lVals[p]! * xj;
    }
    // U's column (pivotal rows, in the solve's order) and the pivot among the rest.
    let ipiv = -1;
    let max = -1;
    for (let t = top; t < n; t++) {
      const i = reach[t]!;
      if (pinv[i]! < 0) {
        const v = Math.abs(x[i]!);
        if (v > max) {
          max = v;
          ipiv = i;
        }
      } else {
        uRows[unz] = pinv[i]!;
        uVals[unz++] = x[i]!;
      }
    }
    if (ipiv < 0 || !(max > PIVOT_RELATIVE_THRESHOLD * colScale[k]!) || max === 0) return k;
    if (ipiv !== k && pinv[k]! < 0 && Math.abs(x[k]!) >= PIVOT_DIAGONAL_PREFERENCE * max) ipiv = k;
    const pivot = x[ipiv]!;
    uRows[unz] = k;
    uVals[unz++] = pivot;
    pinv[ipiv] = k;
    lRows[lnz] = ipiv;
    lVals[lnz++] = 1;
    for (let t = top; t < n; t++) {
      const i = reach[t]!;
      if (pinv[i]! < 0) {
        lRows[lnz] = i;
        lVals[lnz++] = x[i]! / pivot;
        x[i] = 0;
      }
    }
  }
  w.lStart[n] = lnz;
  w.uStart[n] = unz;
  for (let p = 0; p < lnz; p++) w.lRows[p] = pinv[w.lRows[p]!]!;
  return -1;
}

/**
 * Refactorisation with the pivots and structure of the last fresh factorisation: the same
 * operations in the same order, on the entries the structure lists. Returns −1, the step
 * without a pivot, or −2 when a kept pivot falls below PIVOT_KEEP_THRESHOLD of its column
 * (then a fresh factorisation is needed).
 */
function refactor(an: Analysis, a: Float64Array): number {
  const { n, bStart, bRows, bSlot } = an;
  const w = an.work;
  const { pinv, x, colScale, lStart, lRows, lVals, uStart, uRows, uVals } = w;
  for (let k = 0; k < n; k++) {
    const u0 = uStart[k]!;
    const u1 = uStart[k + 1]! - 1; // the diagonal is last
    const l0 = lStart[k]!;
    const l1 = lStart[k + 1]!;
    for (let p = u0; p < u1; p++) x[uRows[p]!] = 0;
    for (let p = l0; p < l1; p++) x[lRows[p]!] = 0;
    for (let t = bStart[k]!; t < bStart[k + 1]!; t++) x[pinv[bRows[t]!]!] = a[bSlot[t]!]!;
    for (let p = u0; p < u1; p++) {
      const j = uRows[p]!;
      const xj = x[j]!;
      uVals[p] = xj;
      if (xj === 0) continue;
      const end = lStart[j + 1]!;
      for (let q = lStart[j]! + 1; q < end; q++) x[lRows[q]!]! -= lVals[q]! * xj;
    }
    const pivot = x[k]!;
    let max = Math.abs(pivot);
    for (let p = l0 + 1; p < l1; p++) {
      const v = Math.abs(x[lRows[p]!]!);
      if (v > max) max = v;
    }
    if (!(max > PIVOT_RELATIVE_THRESHOLD * colScale[k]!) || max === 0) return k;
    if (!(Math.abs(pivot) >= PIVOT_KEEP_THRESHOLD * max)) return -2;
    uVals[u1] = pivot;
    for (let p = l0 + 1; p < l1; p++) lVals[p] = x[lRows[p]!]! / pivot;
  }
  return -1;
}

/**
 * The linear solver on compressed-row storage: factor(a) takes the values of the pattern's
 * slots (a.length = pattern.cols.length) and leaves a unchanged.
 */
export function sparseLu(n: number, pattern: CompressedPattern): LinearSolver {
  const an = analysisOf(n, pattern);
  const { order } = an;
  // A complete pivot sequence and structure from a fresh factorisation of this solve.
  let structured = false;
  return {
    factor(a) {
      const w = an.work;
      const colScale = w.colScale;
      // colScale in elimination order: largest magnitude originally in each column.
      colScale.fill(0);
      const { bStart, bSlot } = an;
      for (let k = 0; k < n; k++) {
        let m = 0;
        for (let t = bStart[k]!; t < bStart[k + 1]!; t++) {
          const v = Math.abs(a[bSlot[t]!]!);
          if (v > m) m = v;
        }
        colScale[k] = m;
      }
      let col = -2;
      if (structured) col = refactor(an, a);
      if (col === -2) {
        col = factorFresh(an, a);
        structured = col < 0;
      }
      return col < 0 ? -1 : order[col]!;
    },
    solve(x) {
      const w = an.work;
      const { pinv, y, lStart, lRows, lVals, uStart, uRows, uVals } = w;
      // y = the right-hand side in pivot-step order.
      for (let k = 0; k < n; k++) y[pinv[k]!] = x[order[k]!]!;
      for (let k = 0; k < n; k++) {
        const yk = y[k]!;
        if (yk === 0) continue;
        const end = lStart[k + 1]!;
        for (let p = lStart[k]! + 1; p < end; p++) y[lRows[p]!]! -= lVals[p]! * yk;
      }
      for (let k = n - 1; k >= 0; k--) {
        const diag = uStart[k + 1]! - 1;
        const yk = y[k]! / uVals[diag]!;
        y[k] = yk;
        if (yk === 0) continue;
        for (let p = uStart[k]!; p < diag; p++) y[uRows[p]!]! -= uVals[p]! * yk;
      }
      for (let k = 0; k < n; k++) x[order[k]!] = y[k]!;
    },
  };
}
