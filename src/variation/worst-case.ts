// Worst-case corners, one per judged quantity and direction, verified by full solves.
//
// For quantity m and direction s (−1: as low as it goes, +1: as high), every banded parameter
// goes to the end of its band that the sign of s·∂m/∂p_i picks (temperature included; a zero
// derivative leaves it at nominal), each on its own. The corner is then solved in full and judged
// by every rule like any scenario. The linear prediction m0 + Σ ∂m/∂p_i·Δp_i is first order:
// where the verified value disagrees with it (off by more than REFINE_TOLERANCE of the predicted
// change, or the solve failed), the analysis re-linearises AT the corner (one-sided differences
// stepping each parameter back into its band) and moves to the corner those signs give, at most
// MAX_REFINEMENTS times; the worst verified value is kept. Identical corners are solved once.
// A re-linearisation costs one analysis per varied parameter, so it runs only where it could
// change the verdict: when the verified value is within REACH_FACTOR × the disagreement of a
// limit of its rule on the side it is pushed to (roomToLimit). A corner far from every limit keeps
// its verified value. One re-linearisation gives every quantity's gradient at that corner, so a
// second quantity whose corner is the same one reuses it.
// Limits: a quantity with an interior extreme (a maximum inside the band) or with sign changes
// that the re-linearisation does not follow can be missed; the tests compare with the full 2^n
// factorial on circuits with opposite-direction and slow-slow corners.
import { hasBand, type Parameter } from "./parameters.js";
import { stepOf, type Measure, type Readings, type SensitivityTable } from "./sensitivity.js";

export const MAX_REFINEMENTS = 2;
/** Verified and predicted changes may differ by this fraction before the corner is re-linearised. */
export const REFINE_TOLERANCE = 0.1;
/**
 * A corner is re-linearised only while a limit is within this many times the disagreement
 * |verified − predicted| of its verified value. The disagreement is the size of the terms the
 * linear model leaves out over the whole move from nominal; moving the parameters whose sign
 * flipped changes the value by terms of that size (cross terms of the same parameters), so twice
 * it leaves a margin.
 */
export const REACH_FACTOR = 2;
/** Gradient entries (quantities × parameters) kept from re-linearised corners: 32 MB of doubles. */
export const MAX_KEPT_GRADIENTS = 4_000_000;

export type Direction = "min" | "max";

/** The limits a quantity's rule reported at a scenario, per side (null: none reported on that side). */
export interface QuantityLimits {
  readonly lower: number | null;
  readonly upper: number | null;
}

/** A judged corner: its readings and the limits its rules reported. */
export interface Judged {
  readonly values: Readings;
  readonly limits: ReadonlyMap<string, QuantityLimits>;
}

/** Judges a corner (a scenario that counts) and returns its readings; null when its solve failed. */
export type Judge = (values: Float64Array, key: string) => Promise<Judged | null>;

/**
 * A lower bound on how far `value` can move in direction `sign` (+1 up, −1 down) before it crosses
 * a limit of its rule; negative when it is already past one; null when nothing bounds it.
 *
 * With a limit reported on that side, it is the distance to it. With only the other side's limit
 * reported, a limit on this side can still exist (a window), but a rule that judges a window
 * reports the edge nearer in relative terms when the value passes (src/review/window.ts), and a
 * one-sided rule has no limit there at all. So any limit F on this side satisfies
 * |F − v|/|F| ≥ ρ, where ρ is the relative distance to the reported edge; the least |F − v| that
 * allows is, in push coordinates w = sign·v: ρ·w/(1 − ρ) for w ≥ 0 (none at all when ρ ≥ 1), and
 * ρ·|w|/(1 + ρ) for w < 0.
 */
export function roomToLimit(value: number, sign: 1 | -1, limits: QuantityLimits | undefined): number | null {
  if (!limits || !Number.isFinite(value)) return null;
  const ahead = sign > 0 ? limits.upper : limits.lower;
  if (ahead !== null) return sign > 0 ? ahead - value : value - ahead;
  const behind = sign > 0 ? limits.lower : limits.upper;
  if (behind === null) return null;
  const scale = behind === 0 ? 1 : Math.abs(behind);
  const rho = (sign > 0 ? value - behind : behind - value) / scale;
  if (!(rho >= 0)) return null;
  const w = sign * value;
  if (w >= 0) return rho >= 1 ? Infinity : (rho * w) / (1 - rho);
  return (rho * -w) / (1 + rho);
}

export interface QuantityWorst {
  readonly quantity: string;
  readonly direction: Direction;
  /** Key of the worst verified corner ("+−0…": one character per parameter). */
  readonly corner: string;
  readonly values: Float64Array;
  readonly predicted: number;
  /** Worst verified value (null when no corner of it solved). */
  readonly verified: number | null;
  readonly refinements: number;
}

export interface WorstCaseResult {
  readonly worst: readonly QuantityWorst[];
  /** Distinct corners judged. */
  readonly corners: number;
  /** Analyses run for re-linearisation (not judged). */
  readonly refinementEvaluations: number;
  /** Re-linearisations answered from a corner already re-linearised for another quantity. */
  readonly reusedRelinearisations: number;
  /** Corners that disagreed with the linear prediction but were too far from every limit to re-linearise. */
  readonly farFromLimit: number;
  /** True when the evaluation budget stopped the search before every quantity had its corner. */
  readonly truncated: boolean;
}

function cornerOf(params: readonly Parameter[], gradient: Float64Array, sign: number, banded: readonly number[]): { key: string; values: Float64Array } {
  const values = Float64Array.from(params, (p) => p.nominal);
  const chars: string[] = [];
  for (const i of banded) {
    const p = params[i]!;
    const g = sign * gradient[i]!;
    if (g > 0) {
      values[i] = p.max;
      chars.push("+");
    } else if (g < 0) {
      values[i] = p.min;
      chars.push("-");
    } else chars.push("0");
  }
  return { key: chars.join(""), values };
}

function worse(a: number, b: number, sign: number): boolean {
  return sign < 0 ? a < b : a > b;
}

export interface WorstCaseOptions {
  /** Most analyses (judged corners plus re-linearisations) this search may run. */
  readonly maxEvaluations: number;
  /** Re-linearise only corners within reach of a limit (default true; false: every disagreeing corner, as before). */
  readonly nearLimitOnly?: boolean;
  /** Reuse a corner's re-linearisation for other quantities (default true). */
  readonly reuseGradients?: boolean;
}

export async function worstCaseCorners(table: SensitivityTable, judge: Judge, measure: Measure, options: WorstCaseOptions): Promise<WorstCaseResult> {
  const params = table.parameters;
  const banded = params.map((p, i) => (hasBand(p) ? i : -1)).filter((i) => i >= 0);
  const cache = new Map<string, Judged | null>();
  let evaluations = 0;
  let refinementEvaluations = 0;
  let truncated = false;
  const solveCorner = async (c: { key: string; values: Float64Array }): Promise<Judged | null> => {
    if (cache.has(c.key)) return cache.get(c.key)!;
    evaluations++;
    const r = await judge(c.values, c.key);
    cache.set(c.key, r);
    return r;
  };
  // Gradients at re-linearised corners (every quantity's), bounded in size: a corner dropped
  // from here is re-linearised again if needed, with the same numbers.
  const relinearised = new Map<string, Map<string, Float64Array>>();
  let kept = 0;
  let reusedRelinearisations = 0;
  let farFromLimit = 0;
  const remember = (key: string, gradients: Map<string, Float64Array>): void => {
    const size = gradients.size * params.length;
    while (kept + size > MAX_KEPT_GRADIENTS && relinearised.size > 0) {
      const [oldest, dropped] = relinearised.entries().next().value as [string, Map<string, Float64Array>];
      relinearised.delete(oldest);
      kept -= dropped.size * params.length;
    }
    if (size <= MAX_KEPT_GRADIENTS) {
      relinearised.set(key, gradients);
      kept += size;
    }
  };
  const worst: QuantityWorst[] = [];
  const keys = [...table.derivatives.keys()].sort();
  for (const quantity of keys) {
    const d = table.derivatives.get(quantity)!;
    const m0 = table.base.get(quantity)!;
    for (const direction of ["min", "max"] as const) {
      if (evaluations >= options.maxEvaluations) {
        truncated = true;
        break;
      }
      const sign = direction === "min" ? -1 : 1;
      let corner = cornerOf(params, d, sign, banded);
      let predicted = m0;
      for (const i of banded) predicted += d[i]! * (corner.values[i]! - params[i]!.nominal);
      let best = corner;
      let bestValue = (await solveCorner(corner))?.values.get(quantity) ?? null;
      let value = bestValue;
      let refinements = 0;
      const tried = new Set([corner.key]);
      while (refinements < MAX_REFINEMENTS && evaluations + banded.length + 1 <= options.maxEvaluations) {
        const change = predicted - m0;
        const agrees = value !== null && Math.abs(value - predicted) <= REFINE_TOLERANCE * Math.abs(change) + 1e-12 * Math.abs(m0);
        if (agrees || value === null) break;
        if (options.nearLimitOnly !== false) {
          const room = roomToLimit(value, sign, cache.get(corner.key)?.limits.get(quantity));
          if (room !== null && room >= REACH_FACTOR * Math.abs(value - predicted)) {
            farFromLimit++;
            break;
          }
        }
        // Re-linearise at the corner: one-sided differences back into the band. The steps give
        // every quantity's gradient there, kept for any other quantity that needs the same corner.
        let gradients = options.reuseGradients === false ? undefined : relinearised.get(corner.key);
        if (gradients === undefined) {
          const atCorner = cache.get(corner.key)!.values;
          gradients = new Map([...atCorner.keys()].map((k) => [k, new Float64Array(params.length)]));
          const probe = Float64Array.from(corner.values);
          for (const i of banded) {
            const p = params[i]!;
            const v = corner.values[i]!;
            const h = stepOf(p, v) * (v >= p.max ? -1 : 1);
            probe[i] = v + h;
            const r = await measure(probe);
            probe[i] = v;
            evaluations++;
            refinementEvaluations++;
            for (const [k, g] of gradients) {
              const m = r?.get(k);
              g[i] = m === undefined ? 0 : (m - atCorner.get(k)!) / h;
            }
          }
          remember(corner.key, gradients);
        } else reusedRelinearisations++;
        const g = gradients.get(quantity)!;
        refinements++;
        const next = cornerOf(params, g, sign, banded);
        if (tried.has(next.key)) break;
        tried.add(next.key);
        predicted = value;
        for (const i of banded) predicted += g[i]! * (next.values[i]! - corner.values[i]!);
        corner = next;
        value = (await solveCorner(corner))?.values.get(quantity) ?? null;
        if (value !== null && (bestValue === null || worse(value, bestValue, sign))) {
          best = corner;
          bestValue = value;
        }
      }
      worst.push({ quantity, direction, corner: best.key, values: best.values, predicted, verified: bestValue, refinements });
    }
    if (truncated) break;
  }
  return { worst, corners: cache.size, refinementEvaluations, reusedRelinearisations, farFromLimit, truncated };
}
