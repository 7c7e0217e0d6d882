// Sensitivities of every judged quantity to every parameter, by central differences on solves.
//
// Method: for parameter i at value p_i, two full analyses at p_i ± h_i (every other parameter
// unchanged, each solve warm-started from the point it perturbs) and
//   ∂m/∂p_i ≈ (m(p_i + h_i) − m(p_i − h_i)) / (2·h_i),   h_i = 1e-4·|p_i|  (0.01 K for temperature).
// The truncation error is h²·m‴/6, about 1e-8 of m for the exponential and square laws of the
// devices at this step; the solves are polished to ~1e-12 relative, which adds ~1e-12/1e-4 = 1e-8.
// Both are far below the 1 % the reports print (the tests check closed forms to 1e-6).
// A side whose solve fails (or whose rule did not report the quantity) falls back to the
// one-sided difference; both failing leaves the derivative at 0 and is counted.
import type { SensitivityEntry } from "../report/document.js";
import type { Parameter } from "./parameters.js";

/** Quantity key → measured value, from one analysis; null when its bias solve failed. */
export type Readings = ReadonlyMap<string, number>;
export type Measure = (values: Float64Array) => Promise<Readings | null>;

export const RELATIVE_STEP = 1e-4;
/** Kelvin. */
export const TEMPERATURE_STEP = 0.01;

export interface SensitivityTable {
  readonly parameters: readonly Parameter[];
  /** The point differentiated at (one value per parameter). */
  readonly at: Float64Array;
  /** Readings at that point. */
  readonly base: Readings;
  /** Per quantity key: ∂m/∂p_i for each parameter i (measured unit per parameter unit). */
  readonly derivatives: ReadonlyMap<string, Float64Array>;
  /** Analyses run. */
  readonly evaluations: number;
  /** Derivatives left at 0 because both sides of the difference failed. */
  readonly failedSides: number;
}

export function stepOf(p: Parameter, value: number): number {
  if (p.kind === "temperature") return TEMPERATURE_STEP;
  const scale = value !== 0 ? Math.abs(value) : Math.max(Math.abs(p.max), Math.abs(p.min));
  return RELATIVE_STEP * (scale || 1);
}

/**
 * Central differences around `at` for the parameters whose index `include` accepts (others get
 * 0). Deterministic: parameters in order, plus side before minus side.
 */
export async function sensitivities(
  params: readonly Parameter[],
  at: Float64Array,
  base: Readings,
  measure: Measure,
  include: (i: number) => boolean = () => true,
): Promise<SensitivityTable> {
  const derivatives = new Map<string, Float64Array>();
  for (const key of base.keys()) derivatives.set(key, new Float64Array(params.length));
  let evaluations = 0;
  let failedSides = 0;
  const values = Float64Array.from(at);
  for (let i = 0; i < params.length; i++) {
    if (!include(i)) continue;
    const h = stepOf(params[i]!, at[i]!);
    values[i] = at[i]! + h;
    const plus = await measure(values);
    values[i] = at[i]! - h;
    const minus = await measure(values);
    values[i] = at[i]!;
    evaluations += 2;
    for (const [key, d] of derivatives) {
      const m0 = base.get(key)!;
      const mp = plus?.get(key);
      const mm = minus?.get(key);
      if (mp !== undefined && mm !== undefined) d[i] = (mp - mm) / (2 * h);
      else if (mp !== undefined) d[i] = (mp - m0) / h;
      else if (mm !== undefined) d[i] = (m0 - mm) / h;
      else failedSides++;
    }
  }
  return { parameters: params, at, base, derivatives, evaluations, failedSides };
}

/** One parameter's effect on one quantity, as reports show it (the results document's type). */
export type { SensitivityEntry };

/** The entries of one quantity, largest effect across its band first; parameters without effect left out. */
export function sensitivityEntries(table: SensitivityTable, key: string): SensitivityEntry[] {
  const d = table.derivatives.get(key);
  const m = table.base.get(key);
  if (!d || m === undefined) return [];
  const out: SensitivityEntry[] = [];
  table.parameters.forEach((p, i) => {
    const di = d[i]!;
    if (di === 0 || !Number.isFinite(di)) return;
    const v = table.at[i]!;
    out.push({
      parameter: p.key,
      name: p.name,
      derivative: di,
      normalised: p.kind === "temperature" || m === 0 ? null : (di * v) / m,
      perDegree: p.kind === "temperature" ? di : null,
      low: di * (p.min - p.nominal),
      high: di * (p.max - p.nominal),
    });
  });
  const band = (e: SensitivityEntry): number => Math.max(Math.abs(e.low), Math.abs(e.high));
  return out.sort((a, b) => band(b) - band(a) || Math.abs(b.normalised ?? 0) - Math.abs(a.normalised ?? 0) || (a.parameter < b.parameter ? -1 : 1));
}
