// Whether the sensitivities taken at nominal describe a quantity at another scenario: the test a
// hint must pass before it names parts from them.
//
// A judged quantity can be the smaller of two terms: a BJT's region margin is the lesser of its
// base-emitter drive and its distance from saturation, and at nominal the drive may bind while at
// the worst corner the collector has saturated. The derivatives at nominal are then those of the
// other term, and a hint built from them names the wrong parts, in the wrong direction. A device
// that changes region between nominal and the corner does the same. So a hint is built from the
// nominal sensitivities only when their first-order prediction at the finding's own parameter set,
//   m̂ = m(nominal) + Σᵢ ∂m/∂pᵢ · (pᵢ − pᵢ,nominal),
// accounts for the measured change to within half of it: |m − m̂| ≤ ½·|m − m(nominal)|.
import type { SensitivityTable } from "./sensitivity.js";

/** Within this share of the measured change, the first-order prediction explains it. */
export const EXPLAINED_SHARE = 0.5;

/**
 * True when the table's derivatives of `key` predict `measured` at the scenario whose parameters
 * are `settings` (parameters not listed are at their nominal values), as above. A quantity the
 * table does not hold is not explained.
 */
export function firstOrderExplains(table: SensitivityTable, key: string, settings: readonly { readonly parameter: string; readonly value: number }[], measured: number): boolean {
  const d = table.derivatives.get(key);
  const base = table.base.get(key);
  if (!d || base === undefined) return false;
  const index = new Map(table.parameters.map((p, i) => [p.key, i]));
  let predicted = base;
  for (const s of settings) {
    const i = index.get(s.parameter);
    if (i !== undefined) predicted += d[i]! * (s.value - table.at[i]!);
  }
  const change = Math.abs(measured - base);
  const error = Math.abs(measured - predicted);
  // The floor keeps a scenario that moves the quantity by rounding only from failing the test.
  return error <= EXPLAINED_SHARE * change || error <= 1e-9 * Math.max(Math.abs(measured), Math.abs(base));
}
