// Reverse breakdown of a diode junction (a Zener or avalanche diode), from what a datasheet
// gives: the breakdown voltage VZ at a test current IZT and the dynamic resistance ZZT there.
//
// Physics: the textbook piecewise-linear Zener model, V = VZ0 + rz·I for a current I in
// breakdown (the model of a Zener reference in the standard electronics textbooks, e.g. Sedra &
// Smith, "Microelectronic Circuits", the Zener diode model section). Its corner at VZ0 is rounded
// by a softplus over a knee width vk so that Newton sees a smooth, monotonic, convex current:
//   I_breakdown(v) = −(vk/rb)·ln(1 + exp((−v − VZ0)/vk)),
// which is the straight line (−v − VZ0)/rb a few vk beyond the knee. VZ0, rb and vk are chosen so
// that the curve passes exactly through (−VZ, −IZT) with exactly the slope 1/ZZT there. The knee
// is vk = IZT·ZZT/KNEE_RATIO wide; the current at the knee's middle is about IZT/KNEE_RATIO.
import type { DiodeModel } from "../circuit/types.js";
import { MODEL_TEMPERATURE } from "./thermal.js";

/**
 * Width of the rounded knee as a fraction of IZT·ZZT: 1/16. Datasheets give the knee current IZK
 * at a few percent of IZT (common practice; from memory), so a knee around IZT/16 is about where
 * real parts bend; the straight part's slope is then ZZT within 1.1e-7 (ZZT·logistic(x) at the
 * test point), so far above IZT the curve stays on the textbook line; and the knee is still a
 * smooth curve that Newton turns in a few steps.
 */
export const KNEE_RATIO = 16;

/** softplus(x) = ln(1 + eˣ), without overflow for large x. */
export function softplus(x: number): number {
  return x > 0 ? x + Math.log1p(Math.exp(-x)) : Math.log1p(Math.exp(x));
}

/** The logistic function 1/(1 + e⁻ˣ), the derivative of softplus. */
export function logistic(x: number): number {
  return x >= 0 ? 1 / (1 + Math.exp(-x)) : Math.exp(x) / (1 + Math.exp(x));
}

/**
 * Where on the softplus the test point lies: the x with softplus(x)/logistic(x) = KNEE_RATIO
 * (that ratio rises monotonically from 1 to ∞; solved once, by bisection to the last bit).
 */
const TEST_POINT_X = ((): number => {
  let lo = -50;
  let hi = 10 * KNEE_RATIO;
  for (let k = 0; k < 200; k++) {
    const mid = 0.5 * (lo + hi);
    if (softplus(mid) / logistic(mid) < KNEE_RATIO) lo = mid;
    else hi = mid;
  }
  return 0.5 * (lo + hi);
})();

/** The breakdown branch of one diode at one temperature. */
export interface BreakdownBranch {
  /** The straight line's voltage axis intercept VZ0 (V, positive). */
  readonly vz0: number;
  /** Knee width (V). */
  readonly vk: number;
  /** Slope resistance of the straight part (Ω). */
  readonly rb: number;
}

/** The branch of a model with a breakdown voltage, at `temperature` (K); undefined without one. */
export function breakdownBranch(model: DiodeModel, temperature: number): BreakdownBranch | undefined {
  const b = model.breakdown;
  if (!b) return undefined;
  const vz = model.breakdownVoltage!.typ + b.tempco * (temperature - MODEL_TEMPERATURE);
  const vk = (b.current * b.resistance) / KNEE_RATIO;
  return { vz0: vz - vk * TEST_POINT_X, vk, rb: b.resistance * logistic(TEST_POINT_X) };
}

/** Adds the breakdown current at junction voltage v (anode − cathode) and its conductance into out [current, conductance]. */
export function addBreakdown(v: number, p: BreakdownBranch, out: Float64Array): void {
  const x = (-v - p.vz0) / p.vk;
  out[0] = out[0]! - (p.vk / p.rb) * softplus(x);
  out[1] = out[1]! + logistic(x) / p.rb;
}
