// Hints that name the part: from the sensitivities, not from a fixed sentence per rule.
import { describe, expect, it } from "vitest";
import { checkCircuit } from "../../src/pipeline/check-file.js";
import headroom from "../../rules/headroom.js";
import { builtin, CELSIUS, checkContext, load } from "./helpers.js";

const CORNERS = { mode: "corners" as const, samples: 1, seed: 1, temperature: { min: CELSIUS - 20, max: CELSIUS + 60 } };

describe("hints from sensitivities", () => {
  it("the lower device of a cascode short of headroom is pointed at the cascode's base divider, not the collector resistor", async () => {
    // Q1's VCE = V(b2) − VBE2 − V(e1): the upper device's base divider RB3/RB4 sets it; RC sets
    // only the upper device's collector. The fixed sentence used to say "reduce the collector resistor".
    const c = load(`models:
  q: { kind: npn, beta: { min: 150, typ: 250, max: 400 }, saturationCurrent: 1e-14 A, earlyVoltage: 100 V }
components:
  - { id: VCC, kind: voltage-source, pins: { plus: vcc, minus: gnd }, voltage: 12 V, tolerance: 5% }
  - { id: RB1, kind: resistor, pins: [vcc, b1], value: 100k, tolerance: 1% }
  - { id: RB2, kind: resistor, pins: [b1, gnd], value: 22k, tolerance: 1% }
  - { id: RB3, kind: resistor, pins: [vcc, b2], value: 150k, tolerance: 1% }
  - { id: RB4, kind: resistor, pins: [b2, gnd], value: 39k, tolerance: 1% }
  - { id: RE, kind: resistor, pins: [e1, gnd], value: 1k5, tolerance: 1% }
  - { id: RC, kind: resistor, pins: [vcc, c2], value: 4k7, tolerance: 1% }
  - { id: Q1, kind: npn, model: q, pins: { collector: c1, base: b1, emitter: e1 } }
  - { id: Q2, kind: npn, model: q, pins: { collector: c2, base: b2, emitter: c1 } }
`);
    const result = await checkCircuit(c, checkContext([builtin(headroom)], CORNERS), "cascode.yaml");
    const f = result.findings.find((x) => x.rule === "headroom" && x.subject === "Q1")!;
    expect(f, JSON.stringify(result.findings.map((x) => [x.subject, x.measured]))).toBeDefined();
    // The two parts named first are the cascode's base divider.
    const named = [...f.hint!.matchAll(/(?:raise|lower) (\w+):/g)].map((m) => m[1]);
    expect(named.slice(0, 2).sort()).toEqual(["RB3", "RB4"]);
    expect(f.hint).toMatch(/raise RB4/);
    expect(f.hint).not.toMatch(/collector resistor/);
    expect(f.sensitivities!.length).toBeGreaterThan(0);
    expect(f.corner!.label).toMatch(/RB3 \+1 %, RB4 −1 %/);
  });

  it("a differential pair with no emitter resistors is pointed at its collector resistor and tail, never an emitter resistor", async () => {
    const c = load(`models:
  q: { kind: npn, beta: { min: 150, typ: 250, max: 400 }, saturationCurrent: 1e-14 A, earlyVoltage: 100 V }
components:
  - { id: VCC, kind: voltage-source, pins: { plus: vcc, minus: gnd }, voltage: 12 V, tolerance: 5% }
  - { id: VEE, kind: voltage-source, pins: { plus: gnd, minus: vee }, voltage: 12 V, tolerance: 5% }
  - { id: RC1, kind: resistor, pins: [vcc, c1], value: 18k, tolerance: 5% }
  - { id: RC2, kind: resistor, pins: [vcc, c2], value: 18k, tolerance: 5% }
  - { id: RT, kind: resistor, pins: [t, vee], value: 10k, tolerance: 5% }
  - { id: Q1, kind: npn, model: q, pins: { collector: c1, base: gnd, emitter: t } }
  - { id: Q2, kind: npn, model: q, pins: { collector: c2, base: gnd, emitter: t } }
`);
    const result = await checkCircuit(c, checkContext([builtin(headroom)], CORNERS), "pair.yaml");
    const f = result.findings.find((x) => x.rule === "headroom" && x.subject === "Q1")!;
    expect(f, JSON.stringify(result.findings.map((x) => [x.subject, x.measured]))).toBeDefined();
    const named = [...f.hint!.matchAll(/(?:raise|lower) (\w+):/g)].map((m) => m[1]);
    // The supplies and the tail set the pair's current; RC1 turns it into Q1's drop.
    for (const part of named.slice(0, 3)) expect(["VCC", "VEE", "RT", "RC1"]).toContain(part);
    expect(f.hint).toMatch(/raise RT/);
    expect(f.sensitivities!.find((e) => e.parameter === "RC1.value")!.derivative).toBeLessThan(0);
    expect(f.hint).not.toMatch(/emitter resistor/);
  });
});
