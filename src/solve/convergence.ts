// Convergence tolerances and iteration caps of the Newton loop, each with the reason for its value.

/** Node-voltage update tolerance, V: 1 µV is below any voltage a review rule compares (mV margins). */
export const VOLTAGE_ABSTOL = 1e-6;
/** Branch-current update tolerance, A: 1 pA, below any current budget and above rounding of mA currents. */
export const CURRENT_ABSTOL = 1e-12;
/** Relative update tolerance: six significant digits in every unknown, far beyond component tolerances. */
export const UPDATE_RELTOL = 1e-6;

/** KCL residual tolerance, A: 1 pA of unexplained current at a node (the tests demand 1 nA). */
export const RESIDUAL_ABSTOL = 1e-12;
/** Branch-equation residual tolerance, V (these rows are linear and solve to rounding). */
export const BRANCH_RESIDUAL_ABSTOL = 1e-9;
/**
 * Residual tolerance relative to the largest current term meeting at the node. Tighter than the
 * update tolerance because Newton converges quadratically near the answer: the step that meets
 * the update test usually leaves a residual near rounding, so this costs at most one iteration.
 */
export const RESIDUAL_RELTOL = 1e-10;

/** Plain Newton from the initial guess: bias networks converge in 5–30 with limiting; 150 leaves room for slow limited climbs. */
export const PLAIN_ITERATION_CAP = 150;
/** Per gmin or source step: each starts next to the previous answer, so a few dozen suffice. */
export const STEP_ITERATION_CAP = 60;
