// One Newton–Raphson run on a compiled plan: stamp the companion models at the trial point,
// test convergence on both the last update and the KCL residual, factor, solve, repeat.
// Nothing in the loop allocates; the convergence aids call this with a shunt conductance
// (conductance stepping) or a source scale (source stepping).
import type { IterationState } from "../devices/device.js";
import {
  BRANCH_RESIDUAL_ABSTOL,
  CURRENT_ABSTOL,
  RESIDUAL_ABSTOL,
  RESIDUAL_RELTOL,
  UPDATE_RELTOL,
  VOLTAGE_ABSTOL,
} from "./convergence.js";
import type { LinearSolver } from "./linear-solver.js";
import type { Plan } from "./plan.js";

export interface NewtonSettings {
  /** Shunt conductance from every node to ground, S (0 = the real circuit). */
  readonly gmin: number;
  /** Factor on every independent source (1 = the real circuit). */
  readonly sourceScale: number;
  /** Start from the devices' initial-guess junction voltages instead of the present x. */
  readonly init: boolean;
  readonly maxIterations: number;
  /**
   * After convergence take one more Newton step from the accepted point (kept only if it still
   * meets the residual test). Near the answer Newton is quadratic, so this squares the error left
   * by the update tolerance: results then agree to ~1e-12 however the path got there (a
   * circuit and its mirror image, a diode written either way round).
   */
  readonly polish: boolean;
}

/**
 * The polishing step is skipped when the last update was already below this fraction of its
 * tolerance (≲ 0.5 µV on a volt-level node): Newton's remaining error, about δ²/(n·VT), is then
 * ~1e-11 V and another step adds nothing.
 */
export const POLISH_SKIP_RATIO = 0.1;
/** …or when every KCL residual is already below this fraction of its tolerance (≲ 1e-14 A on mA currents). */
export const POLISH_SKIP_RESIDUAL_RATIO = 0.01;

export type NewtonStatus = "converged" | "singular" | "not-converged" | "non-finite";

/** Mutable record of one run, reused across runs to keep the loop allocation-free. */
export interface NewtonRecord {
  status: NewtonStatus;
  iterations: number;
  /** Largest KCL residual (node rows) at the last residual evaluation, A. */
  residual: number;
  /** Unknown with the largest residual relative to its tolerance at the last evaluation. */
  worstResidual: number;
  /** That largest residual / tolerance ratio (≤ 1 when the residual test passes). */
  residualRatio: number;
  /** Unknown with the largest last update relative to its tolerance. */
  worstUpdate: number;
  /** Column without a pivot when status is "singular". */
  singularColumn: number;
}

export function newRecord(): NewtonRecord {
  return { status: "not-converged", iterations: 0, residual: Infinity, worstResidual: -1, residualRatio: Infinity, worstUpdate: -1, singularColumn: -1 };
}

/** Runs Newton from plan.x; on "converged" plan.x is the answer at these settings. */
export function newton(plan: Plan, solver: LinearSolver, s: NewtonSettings, rec: NewtonRecord): NewtonRecord {
  const { n, a, b, x, xNew, isNodeRow, nonlinear } = plan;
  const st: IterationState = { init: false, limited: false };
  // A linear network needs no update test: one exact solve is the answer.
  let updateOk = nonlinear.length === 0;
  // Largest update of the last step relative to its tolerance (≤ 1 once the update test passes).
  let lastRatio = nonlinear.length === 0 ? 0 : Infinity;
  rec.status = "not-converged";
  rec.iterations = 0;
  rec.worstUpdate = -1;
  rec.worstResidual = -1;
  rec.singularColumn = -1;
  for (let iter = 0; iter < s.maxIterations; iter++) {
    assemble(plan, s, st, s.init && iter === 0, iter === 0);

    if (!st.init && !st.limited && updateOk && residualOk(plan, rec)) {
      rec.status = "converged";
      if (s.polish && nonlinear.length > 0 && lastRatio > POLISH_SKIP_RATIO && rec.residualRatio > POLISH_SKIP_RESIDUAL_RATIO) polishStep(plan, solver, s, rec);
      return rec;
    }

    rec.iterations++;
    const col = solver.factor(a);
    if (col >= 0) {
      rec.status = "singular";
      rec.singularColumn = col;
      return rec;
    }
    xNew.set(b);
    solver.solve(xNew);

    updateOk = true;
    let worst = 0;
    for (let i = 0; i < n; i++) {
      const xn = xNew[i]!;
      if (!Number.isFinite(xn)) {
        rec.status = "non-finite";
        rec.worstUpdate = i;
        return rec;
      }
      const xo = x[i]!;
      const tol = (isNodeRow[i] ? VOLTAGE_ABSTOL : CURRENT_ABSTOL) + UPDATE_RELTOL * Math.max(Math.abs(xn), Math.abs(xo));
      const ratio = Math.abs(xn - xo) / tol;
      if (ratio > 1) updateOk = false;
      if (ratio > worst) {
        worst = ratio;
        rec.worstUpdate = i;
      }
    }
    lastRatio = worst;
    x.set(xNew);
  }
  // One last look: the final update may have landed on the answer (a whole copy if the loop never ran).
  assemble(plan, s, st, false, !(s.maxIterations > 0));
  if (!st.limited && updateOk && residualOk(plan, rec)) {
    rec.status = "converged";
    if (s.polish && nonlinear.length > 0 && lastRatio > POLISH_SKIP_RATIO && rec.residualRatio > POLISH_SKIP_RESIDUAL_RATIO) polishStep(plan, solver, s, rec);
  }
  return rec;
}

/** Stamps the plan at plan.x (a, b); returns true when a device limited its voltages. */
function stampAt(plan: Plan, s: NewtonSettings, st: IterationState): boolean {
  assemble(plan, s, st, false, false);
  return st.limited;
}

/**
 * From this many unknowns on, a pass after the first restores only the stamp pattern of a
 * instead of copying all of it; the linear solver must then leave a unchanged (see
 * LinearSolver.factor). Measured per solve on the bench chains: the copy of 1024 entries beats
 * gathering 151 at 32 unknowns (5 % faster), the two are even at 101, and restoring the
 * pattern saves 14 % at 302 (the whole copy is a third of an iteration there).
 */
export const PATTERN_RESTORE_MIN_UNKNOWNS = 64;

/**
 * Builds a and b at plan.x: the static part, the scaled sources, the gmin shunt, then every
 * nonlinear device. The whole of a is copied from the static part on the first pass of a run
 * (`whole`: a is borrowed memory and may hold another circuit's matrix) and below
 * PATTERN_RESTORE_MIN_UNKNOWNS; otherwise only the stamp pattern is restored, which leaves a
 * the same as a whole copy: nothing writes outside the pattern (the stamps stay inside it and
 * the linear solver leaves a unchanged).
 */
function assemble(plan: Plan, s: NewtonSettings, st: IterationState, init: boolean, whole: boolean): void {
  const { n, a, b, x, aStatic, bSource, isNodeRow, nonlinear, target, pattern, diagonal } = plan;
  // Sparse storage holds only the pattern: the whole copy is the pattern.
  if (whole || n < PATTERN_RESTORE_MIN_UNKNOWNS || plan.sparse) a.set(aStatic);
  else for (let t = 0; t < pattern.length; t++) a[pattern[t]!] = aStatic[pattern[t]!]!;
  const scale = s.sourceScale;
  for (let i = 0; i < n; i++) b[i] = scale * bSource[i]!;
  if (s.gmin > 0) for (let i = 0; i < n; i++) if (isNodeRow[i]) a[diagonal[i]!]! += s.gmin;
  st.init = init;
  st.limited = false;
  for (let d = 0; d < nonlinear.length; d++) nonlinear[d]!.stampNonlinear!(x, target, st);
}

/** One extra Newton step from a converged plan.x (whose stamp is in a, b); see `polish`. */
function polishStep(plan: Plan, solver: LinearSolver, s: NewtonSettings, rec: NewtonRecord): void {
  const { x, xNew, xSpare } = plan;
  const before = rec.residual;
  const worstBefore = rec.worstResidual;
  const ratioBefore = rec.residualRatio;
  rec.iterations++;
  if (solver.factor(plan.a) >= 0) return;
  xNew.set(plan.b);
  solver.solve(xNew);
  for (let i = 0; i < plan.n; i++) if (!Number.isFinite(xNew[i]!)) return;
  xSpare.set(x);
  x.set(xNew);
  const st: IterationState = { init: false, limited: false };
  if (!stampAt(plan, s, st) && residualOk(plan, rec)) return;
  // Outside tolerance (or limited): go back to the accepted point and its stamp.
  x.set(xSpare);
  stampAt(plan, s, st);
  rec.residual = before;
  rec.worstResidual = worstBefore;
  rec.residualRatio = ratioBefore;
}

/**
 * KCL residual r = a·x − b of the system stamped at x itself (no limiting active), which is the
 * sum of device currents leaving each node. Records the largest node-row residual.
 */
function residualOk(plan: Plan, rec: NewtonRecord): boolean {
  const { n, a, b, x, isNodeRow, pattern, patternRowStart, patternCols } = plan;
  let ok = true;
  let maxNode = 0;
  let worst = 0;
  for (let i = 0; i < n; i++) {
    let r = -b[i]!;
    let scale = Math.abs(b[i]!);
    // The row's pattern entries in ascending column order, as a full scan would meet them.
    const end = patternRowStart[i + 1]!;
    for (let p = patternRowStart[i]!; p < end; p++) {
      const aij = a[pattern[p]!]!;
      if (aij === 0) continue;
      const t = aij * x[patternCols[p]!]!;
      r += t;
      const at = Math.abs(t);
      if (at > scale) scale = at;
    }
    const ar = Math.abs(r);
    const tol = (isNodeRow[i] ? RESIDUAL_ABSTOL : BRANCH_RESIDUAL_ABSTOL) + RESIDUAL_RELTOL * scale;
    if (!(ar <= tol)) ok = false;
    if (isNodeRow[i] && ar > maxNode) maxNode = ar;
    const ratio = ar / tol;
    if (ratio > worst || Number.isNaN(ratio)) {
      worst = ratio;
      rec.worstResidual = i;
    }
  }
  rec.residual = maxNode;
  rec.residualRatio = worst;
  return ok;
}
