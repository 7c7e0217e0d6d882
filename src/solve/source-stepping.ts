// Convergence aid 2: source stepping. Every independent source is ramped from 0 (where the
// answer is exactly all-zero: every device model passes no current at zero bias) to 100 %,
// each step starting from the last answer; the step grows after a success and shrinks after a
// failure.
import type { LinearSolver } from "./linear-solver.js";
import { newton, type NewtonRecord } from "./newton.js";
import { STEP_ITERATION_CAP } from "./convergence.js";
import type { Plan } from "./plan.js";

/** First step, as a fraction of full value. */
export const SOURCE_STEP_INITIAL = 0.1;
/** Growth after a converged step (doubling: quick through easy stretches). */
export const SOURCE_STEP_GROWTH = 2;
/** Shrink after a failed step (quartering: back off decisively from a hard stretch). */
export const SOURCE_STEP_SHRINK = 0.25;
/** Smallest step before giving up: 1e-6 of full scale is a micro-volt on a volt-level supply. */
export const SOURCE_STEP_MIN = 1e-6;
/** Upper bound on the number of steps (successful or not), so a hopeless case ends. */
export const SOURCE_STEP_CAP = 200;

export function sourceStepping(plan: Plan, solver: LinearSolver, rec: NewtonRecord, total: { iterations: number }, cap = Infinity): boolean {
  plan.x.fill(0);
  for (const d of plan.nonlinear) d.reset?.();
  const saved = new Float64Array(plan.n);
  let done = 0;
  let step = SOURCE_STEP_INITIAL;
  for (let k = 0; k < SOURCE_STEP_CAP; k++) {
    const scale = Math.min(1, done + step);
    saved.set(plan.x);
    newton(plan, solver, { gmin: 0, sourceScale: scale, init: false, maxIterations: Math.min(STEP_ITERATION_CAP, cap), polish: scale === 1 }, rec);
    total.iterations += rec.iterations;
    if (rec.status === "converged") {
      if (scale === 1) return true;
      done = scale;
      step *= SOURCE_STEP_GROWTH;
    } else {
      plan.x.set(saved);
      step *= SOURCE_STEP_SHRINK;
      if (step < SOURCE_STEP_MIN) return false;
    }
  }
  return false;
}
