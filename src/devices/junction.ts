// The pn junction shared by the diode and the bipolar transistor: Shockley current and its
// conductance, with an overflow guard and a tiny parallel leakage that keeps reverse-biased
// nodes from making the matrix singular.

/**
 * Beyond this exponent exp() is continued linearly (value and slope match), so a wild Newton
 * trial can never overflow. e^100 ≈ 2.7e43; no physical operating point comes near it
 * (1 A through IS = 1e-30 A is only v/nVT ≈ 69), so the answer is never affected.
 */
export const EXP_ARG_MAX = 100;

/**
 * Conductance in parallel with every pn junction, S. It is part of the device model (reported
 * currents include it), 1e-12 S as is common practice for convergence: it changes a junction
 * current by 1 pA per volt, far below anything a review rule can see.
 */
export const JUNCTION_LEAK_CONDUCTANCE = 1e-12;

/** Scratch output of `junction`: [0] current, [1] conductance. Reused to keep the hot path allocation-free. */
export const junctionOut = new Float64Array(2);

/** I = IS(exp(v/nVT) − 1) and dI/dv into junctionOut (leakage not included). */
export function junction(v: number, is: number, nvt: number): void {
  const arg = v / nvt;
  if (arg > EXP_ARG_MAX) {
    const e = Math.exp(EXP_ARG_MAX);
    junctionOut[0] = is * (e * (1 + arg - EXP_ARG_MAX) - 1);
    junctionOut[1] = (is * e) / nvt;
  } else {
    const e = Math.exp(arg);
    junctionOut[0] = is * (e - 1);
    junctionOut[1] = (is * e) / nvt;
  }
}
