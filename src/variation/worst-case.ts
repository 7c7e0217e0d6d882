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
// Limits: a quantity with an interior extreme (a maximum inside the band) or with sign changes
// that the re-linearisation does not follow can be missed; the tests compare with the full 2^n
// factorial on circuits with opposite-direction and slow-slow corners.
import { hasBand, type Parameter } from "./parameters.js";
import { stepOf, type Measure, type Readings, type SensitivityTable } from "./sensitivity.js";

export const MAX_REFINEMENTS = 2;
/** Verified and predicted changes may differ by this fraction before the corner is re-linearised. */
export const REFINE_TOLERANCE = 0.1;

export type Direction = "min" | "max";

/** Judges a corner (a scenario that counts) and returns its readings; null when its solve failed. */
export type Judge = (values: Float64Array, key: string) => Promise<Readings | null>;

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
}

export async function worstCaseCorners(table: SensitivityTable, judge: Judge, measure: Measure, options: WorstCaseOptions): Promise<WorstCaseResult> {
  const params = table.parameters;
  const banded = params.map((p, i) => (hasBand(p) ? i : -1)).filter((i) => i >= 0);
  const cache = new Map<string, Readings | null>();
  let evaluations = 0;
  let refinementEvaluations = 0;
  let truncated = false;
  const solveCorner = async (c: { key: string; values: Float64Array }): Promise<Readings | null> => {
    if (cache.has(c.key)) return cache.get(c.key)!;
    evaluations++;
    const r = await judge(c.values, c.key);
    cache.set(c.key, r);
    return r;
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
      let bestValue = (await solveCorner(corner))?.get(quantity) ?? null;
      let value = bestValue;
      let refinements = 0;
      const tried = new Set([corner.key]);
      while (refinements < MAX_REFINEMENTS && evaluations + banded.length + 1 <= options.maxEvaluations) {
        const change = predicted - m0;
        const agrees = value !== null && Math.abs(value - predicted) <= REFINE_TOLERANCE * Math.abs(change) + 1e-12 * Math.abs(m0);
        if (agrees || value === null) break;
        // Re-linearise at the corner: one-sided differences back into the band.
        const g = new Float64Array(params.length);
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
          const m = r?.get(quantity);
          g[i] = m === undefined ? 0 : (m - value) / h;
        }
        refinements++;
        const next = cornerOf(params, g, sign, banded);
        if (tried.has(next.key)) break;
        tried.add(next.key);
        predicted = value;
        for (const i of banded) predicted += g[i]! * (next.values[i]! - corner.values[i]!);
        corner = next;
        value = (await solveCorner(corner))?.get(quantity) ?? null;
        if (value !== null && (bestValue === null || worse(value, bestValue, sign))) {
          best = corner;
          bestValue = value;
        }
      }
      worst.push({ quantity, direction, corner: best.key, values: best.values, predicted, verified: bestValue, refinements });
    }
    if (truncated) break;
  }
  return { worst, corners: cache.size, refinementEvaluations, truncated };
}
