// Convergence aid 1: conductance stepping. A shunt conductance from every node to ground makes the
// network nearly linear and well conditioned; it is stepped down by decades to zero, each
// solve starting from the previous answer. It starts from all-zero with the junctions off (not
// from the plain stage's forward-biased guess): the shunt, not the guess, carries the first step.
import type { LinearSolver } from "./linear-solver.js";
import { newton, type NewtonRecord } from "./newton.js";
import { STEP_ITERATION_CAP } from "./convergence.js";
import type { Plan } from "./plan.js";

/** First shunt, S: 10 mS (100 Ω to ground) dominates any bias network's nonlinearity. */
export const GMIN_START = 1e-2;
/** Last non-zero shunt, S: 1e-12 S is below the junction leakage already in the models; next comes 0. */
export const GMIN_END = 1e-12;
/** Shunt divided by this factor per step (a decade, the usual choice). */
export const GMIN_FACTOR = 10;

/** Returns true when the circuit converged with the shunt finally removed; iterations add up in `total`. */
export function gminStepping(plan: Plan, solver: LinearSolver, rec: NewtonRecord, total: { iterations: number }, cap = Infinity): boolean {
  plan.x.fill(0);
  for (const d of plan.nonlinear) d.reset?.();
  for (let gmin = GMIN_START; ; gmin /= GMIN_FACTOR) {
    const g = gmin < GMIN_END * (1 - 1e-9) ? 0 : gmin;
    newton(plan, solver, { gmin: g, sourceScale: 1, init: false, maxIterations: Math.min(STEP_ITERATION_CAP, cap), polish: g === 0 }, rec);
    total.iterations += rec.iterations;
    if (rec.status !== "converged") return false;
    if (g === 0) return true;
  }
}
