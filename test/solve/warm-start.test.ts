// Warm starts (variation scenarios solved from the nominal point) and the junction limiting they
// rely on. A warm-started solve must reach the same operating point as a solve from zero, to the
// convergence tolerance, whatever moved: temperature (saturation currents by decades), resistor
// values, model spreads. The expected values here come from the Shockley law
// I = IS·(exp(V/nVT) − 1) (textbook; common practice), not from the solver.
import { describe, expect, it } from "vitest";
import type { Circuit, Component, Model } from "../../src/circuit/types.js";
import { solveOperatingPoint, type OperatingPoint, type SolveResult, type WarmStart } from "../../src/solve/index.js";
import { UPDATE_RELTOL, VOLTAGE_ABSTOL } from "../../src/solve/convergence.js";
import {
  criticalVoltage,
  JUNCTION_DOWN_FACTOR,
  JUNCTION_REFERENCE_FLOOR,
  limitJunction,
  warmJunctionVoltage,
} from "../../src/solve/limiting.js";
import { randomBiasCircuit } from "./generate.js";
import { kclError } from "./kcl.js";

function solved(r: SolveResult, what: string): OperatingPoint {
  if (!r.ok) throw new Error(`${what}: ${r.reason}`);
  return r;
}

/** The circuit with every resistor scaled by `factor` and the temperature set (a tolerance corner). */
function varied(c: Circuit, factor: number, kelvin: number): Circuit {
  const components = c.components.map((p): Component => (p.kind === "resistor" ? { ...p, value: { ...p.value, nominal: p.value.nominal * factor } } : p));
  return { ...c, components, temperature: kelvin };
}

/** The same circuit with every model's saturation current and k′ moved (a spread corner). */
function spread(c: Circuit, isFactor: number, kFactor: number): Circuit {
  const models = new Map<string, Model>();
  for (const [id, m] of c.models) {
    if (m.kind === "diode" || m.kind === "npn" || m.kind === "pnp") models.set(id, { ...m, saturationCurrent: { ...m.saturationCurrent, typ: m.saturationCurrent.typ * isFactor } });
    else if (m.kind === "nmos" || m.kind === "pmos") models.set(id, { ...m, kPrime: { ...m.kPrime, typ: m.kPrime.typ * kFactor } });
    else models.set(id, m);
  }
  return { ...c, models };
}

describe("warm start from a solved nominal point", () => {
  it("reaches the cold solve's operating point to the convergence tolerance, in fewer iterations", () => {
    let warmIterations = 0;
    let coldIterations = 0;
    let cases = 0;
    for (let seed = 1; seed <= 40; seed++) {
      const nominal = randomBiasCircuit(seed, seed % 2 === 0);
      const start: WarmStart = { x: null };
      const first = solveOperatingPoint(nominal, { warmStart: start });
      if (!first.ok) continue;
      expect(start.x, `seed ${seed}: the nominal solve keeps its point`).not.toBeNull();
      expect(start.state, `seed ${seed}: …and its devices' currents`).toBeInstanceOf(Float64Array);
      const variants: [string, Circuit][] = [
        ["−40 °C", varied(nominal, 1, 233.15)],
        ["85 °C", varied(nominal, 1, 358.15)],
        ["resistors −5 %, 60 °C", varied(nominal, 0.95, 333.15)],
        ["resistors +5 %, −20 °C", varied(nominal, 1.05, 253.15)],
        ["IS ×3, k′ −20 %", spread(nominal, 3, 0.8)],
      ];
      for (const [what, c] of variants) {
        const cold = solveOperatingPoint(c);
        if (!cold.ok) continue;
        const warm = solved(solveOperatingPoint(c, { warmStart: start }), `seed ${seed}, ${what}`);
        cases++;
        warmIterations += warm.stats.iterations;
        coldIterations += cold.stats.iterations;
        for (const [node, v] of Object.entries(cold.nodes)) {
          const tol = VOLTAGE_ABSTOL + UPDATE_RELTOL * Math.abs(v);
          expect(Math.abs(warm.nodes[node]! - v), `seed ${seed}, ${what}, node ${node}`).toBeLessThanOrEqual(tol);
        }
        // Kirchhoff's current law from the reported currents (outside the solver's matrices).
        expect(kclError(c, warm).worst, `seed ${seed}, ${what}`).toBeLessThan(1e-9);
      }
      // The warm start must not have been overwritten by the variants.
      expect(start.x!.length).toBeGreaterThan(0);
    }
    expect(cases).toBeGreaterThan(150);
    expect(warmIterations).toBeLessThan(coldIterations);
  });

  it("a solved point restarts in one iteration (nothing moved, nothing primed)", () => {
    const c = randomBiasCircuit(3, false);
    const start: WarmStart = { x: null };
    const first = solved(solveOperatingPoint(c, { warmStart: start }), "nominal");
    const again = solved(solveOperatingPoint(c, { warmStart: start }), "again");
    expect(again.stats.iterations).toBe(1);
    for (const [node, v] of Object.entries(first.nodes)) expect(Math.abs(again.nodes[node]! - v)).toBeLessThanOrEqual(VOLTAGE_ABSTOL + UPDATE_RELTOL * Math.abs(v));
  });

  it("state of another topology is ignored, not misapplied", () => {
    const start: WarmStart = { x: null };
    solved(solveOperatingPoint(randomBiasCircuit(5, false), { warmStart: start }), "first");
    const other = randomBiasCircuit(6, false);
    const cold = solved(solveOperatingPoint(other), "cold");
    const warm = solved(solveOperatingPoint(other, { warmStart: start }), "warm");
    for (const [node, v] of Object.entries(cold.nodes)) expect(Math.abs(warm.nodes[node]! - v)).toBeLessThanOrEqual(VOLTAGE_ABSTOL + UPDATE_RELTOL * Math.abs(v));
  });
});

describe("junction voltage limiting", () => {
  const nvt = 0.025852; // kT/q at 300 K, V (common practice)
  const is = 1e-14;
  const vcrit = criticalVoltage(nvt, is);
  const shockley = (v: number, sat = is): number => sat * Math.expm1(v / nvt);

  it("leaves small steps alone in both directions", () => {
    expect(limitJunction(0.65 + nvt, 0.65, nvt, vcrit)).toBe(0.65 + nvt);
    expect(limitJunction(0.65 - 0.4 * nvt, 0.65, nvt, vcrit)).toBe(0.65 - 0.4 * nvt);
    expect(limitJunction(-3, -2, nvt, vcrit)).toBe(-3);
    expect(limitJunction(0.3, 0.1, nvt, vcrit)).toBe(0.3);
  });

  it("an upward step lands where the junction carries the linearised current", () => {
    const vold = 0.7;
    const vnew = 0.9;
    const v = limitJunction(vnew, vold, nvt, vcrit);
    // Linearised at vold: I(vold) + g·Δ with g = I(vold)/nVT (exp ≫ 1 here).
    const predicted = shockley(vold) * (1 + (vnew - vold) / nvt);
    expect(shockley(v) / predicted).toBeCloseTo(1, 6);
  });

  it("from a reverse-biased or barely conducting junction, the step is taken from vcrit − 10·nVT", () => {
    const from = vcrit - JUNCTION_REFERENCE_FLOOR * nvt;
    for (const vold of [-2, 0, 0.1]) {
      const v = limitJunction(1.5, vold, nvt, vcrit);
      expect(v).toBeCloseTo(from + nvt * Math.log(1 + (1.5 - from) / nvt), 12);
      expect(v).toBeGreaterThan(from);
    }
  });

  it("a downward step of a conducting junction follows the predicted fall of its current", () => {
    const vold = 0.7;
    const vnew = vold - 0.8 * nvt; // Newton from above predicts the current falls to 20 %
    const v = limitJunction(vnew, vold, nvt, vcrit);
    expect(shockley(v) / shockley(vold)).toBeCloseTo(0.2, 6);
    // A predicted reversal turns the junction off: at least the JUNCTION_DOWN_FACTOR fall, and
    // as far as Newton went when that is further.
    expect(shockley(limitJunction(vold - 1.5 * nvt, vold, nvt, vcrit)) / shockley(vold)).toBeCloseTo(JUNCTION_DOWN_FACTOR, 6);
    expect(limitJunction(-1, vold, nvt, vcrit)).toBe(-1);
  });

  it("a warm start puts a conducting junction where it carries the saved current under the new saturation current", () => {
    const current = shockley(0.65);
    const hot = 40 * is;
    const v = warmJunctionVoltage(0.65, current, hot, nvt, criticalVoltage(nvt, hot));
    expect(shockley(v, hot) / current).toBeCloseTo(1, 9);
    // A junction that was off keeps its voltage.
    expect(warmJunctionVoltage(0.1, shockley(0.1), hot, nvt, criticalVoltage(nvt, hot))).toBe(0.1);
    expect(warmJunctionVoltage(-1, -is, hot, nvt, criticalVoltage(nvt, hot))).toBe(-1);
  });
});
