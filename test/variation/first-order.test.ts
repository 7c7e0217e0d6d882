// Hints are built from the nominal sensitivities only where those explain the finding's worst
// scenario (src/variation/first-order.ts). Closed forms: a linear quantity is predicted exactly
// by its derivatives (Taylor's theorem, first order); min(x, y) switches terms where x = y, so the
// derivatives of the term that binds at nominal say nothing about the other term.
import { describe, expect, it } from "vitest";
import region from "../../rules/region.js";
import headroom from "../../rules/headroom.js";
import { checkCircuit } from "../../src/pipeline/check-file.js";
import type { Parameter } from "../../src/variation/parameters.js";
import { firstOrderExplains } from "../../src/variation/first-order.js";
import type { SensitivityTable } from "../../src/variation/sensitivity.js";
import { builtin, CELSIUS, checkContext, load } from "./helpers.js";

const param = (key: string, nominal: number): Parameter => ({ key, name: key, kind: "tolerance", nominal, min: nominal * 0.9, max: nominal * 1.1 }) as unknown as Parameter;

function table(params: Parameter[], key: string, base: number, derivatives: number[]): SensitivityTable {
  return {
    parameters: params,
    at: Float64Array.from(params, (p) => p.nominal),
    base: new Map([[key, base]]),
    derivatives: new Map([[key, Float64Array.from(derivatives)]]),
    evaluations: 2 * params.length,
    failedSides: 0,
  };
}

describe("firstOrderExplains", () => {
  const a = param("A", 10);
  const b = param("B", 20);

  it("a linear quantity m = 2a + 3b is explained at every corner (its first-order prediction is exact)", () => {
    const t = table([a, b], "m", 2 * 10 + 3 * 20, [2, 3]);
    for (const [va, vb] of [[9, 22], [11, 18], [11, 22]] as const) {
      expect(firstOrderExplains(t, "m", [{ parameter: "A", value: va }, { parameter: "B", value: vb }], 2 * va + 3 * vb)).toBe(true);
    }
  });

  it("m = min(a − 1.5, b − 11) binds on a at nominal and on b at a corner: not explained there", () => {
    // Nominal: min(8.5, 9) = 8.5, a binds: ∂m/∂a = 1, ∂m/∂b = 0.
    const m = (va: number, vb: number) => Math.min(va - 1.5, vb - 11);
    const t = table([a, b], "m", m(10, 20), [1, 0]);
    // Corner a high, b low: m = min(9.5, 7) = 7, b binds; the prediction 8.5 + 1·1 = 9.5 misses a change of −1.5 by 2.5.
    expect(firstOrderExplains(t, "m", [{ parameter: "A", value: 11 }, { parameter: "B", value: 18 }], m(11, 18))).toBe(false);
    // Corner a low, b high: a still binds; exact.
    expect(firstOrderExplains(t, "m", [{ parameter: "A", value: 9 }, { parameter: "B", value: 22 }], m(9, 22))).toBe(true);
  });

  it("a quantity the table does not hold is not explained", () => {
    expect(firstOrderExplains(table([a], "m", 1, [1]), "other", [], 1)).toBe(false);
  });
});

describe("a region finding whose binding term changes between nominal and its worst corner", () => {
  it("keeps the rule's advice instead of naming parts from the base-drive term's sensitivities", async () => {
    // A differential pair with a PNP mirror load and no feedback (an invented trial circuit): the
    // output node is set by the mismatch of the mirror's and Q2's currents into RL, so at the worst
    // corner Q4 saturates. At nominal Q4 is active with 2.2 V of headroom and its region margin is
    // the base-emitter drive term (≈ 0.25 V), whose derivatives are tiny and point the other way
    // (they said "raise VN" while the headroom hint, correctly, says "lower VN").
    const c = load(`models:
  hn: { kind: npn, beta: { min: 120, typ: 200, max: 320 }, saturationCurrent: 5e-15 A, earlyVoltage: 80 V }
  hp: { kind: pnp, beta: { min: 80, typ: 150, max: 250 }, saturationCurrent: 5e-15 A, earlyVoltage: 60 V }
components:
  - { id: VP, kind: voltage-source, pins: { plus: vp, minus: gnd }, voltage: 9 V, tolerance: 5% }
  - { id: VN, kind: voltage-source, pins: { plus: gnd, minus: vn }, voltage: 9 V, tolerance: 5% }
  - { id: RB2, kind: resistor, pins: [inn, gnd], value: 1k, tolerance: 1% }
  - { id: VIN, kind: voltage-source, pins: { plus: inp, minus: gnd }, voltage: 0 V }
  - { id: Q1, kind: npn, model: hn, pins: { collector: c1, base: inp, emitter: tail } }
  - { id: Q2, kind: npn, model: hn, pins: { collector: out, base: inn, emitter: tail } }
  - { id: Q3, kind: pnp, model: hp, pins: { collector: c1, base: c1, emitter: vp } }
  - { id: Q4, kind: pnp, model: hp, pins: { collector: out, base: c1, emitter: vp } }
  - { id: RT, kind: resistor, pins: [tail, vn], value: 8k2, tolerance: 1% }
  - { id: RL, kind: resistor, pins: [out, gnd], value: 100k, tolerance: 1% }
specs:
  supplies: []`);
    const ctx = checkContext([builtin(region), builtin(headroom)], { mode: "corners", samples: 1, seed: 1, temperature: { min: CELSIUS, max: CELSIUS + 50 } });
    const r = await checkCircuit(c, ctx, "pair.yaml");
    const regionQ4 = r.findings.find((f) => f.rule === "region" && f.subject === "Q4");
    const headroomQ4 = r.findings.find((f) => f.rule === "headroom" && f.subject === "Q4");
    expect(regionQ4?.measured).toBeLessThan(0);
    expect(headroomQ4?.measured).toBeLessThan(0);
    // The headroom hint is explained by its sensitivities and names VN in the right direction.
    expect(headroomQ4!.hint).toMatch(/lower VN: \+[0-9.]+ mV headroom per −10 %/);
    // The region hint is the rule's own advice; no part is named from the wrong term.
    expect(regionQ4!.hint).toBe("re-bias the stage so that it amplifies, or name the intended region in specs.devices");
    expect(regionQ4!.sensitivities).toBeUndefined();
  });
});
