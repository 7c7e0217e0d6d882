// Worst-case corners against closed forms and against the full 2^n factorial computed here.
import { describe, expect, it } from "vitest";
import deviceCurrent from "../../rules/device-current.js";
import headroom from "../../rules/headroom.js";
import { defineRule } from "../../src/review/rule.js";
import type { BjtPoint, MosPoint } from "../../src/solve/types.js";
import { builtin, CELSIUS, factorial, load, run } from "./helpers.js";

// A rule that reads one node voltage and bounds it on both sides (limits far away: it never fails),
// so the engine keeps the lowest value under subject "low" and the highest under "high".
const nodeProbe = (node: string) =>
  defineRule({
    id: "probe",
    description: "Reads one node voltage",
    severity: "error",
    docs: "test rule",
    check({ op }, report) {
      const v = op.nodes[node]!;
      report.pass("low", { measured: v, limit: -1e6, unit: "V", bound: "min" });
      report.pass("high", { measured: v, limit: 1e6, unit: "V", bound: "max" });
    },
  });

const divider = (tol: string) => `components:
  - { id: VIN, kind: voltage-source, pins: { plus: in, minus: gnd }, voltage: 10 V }
  - { id: R1, kind: resistor, pins: [in, out], value: 10k, tolerance: ${tol} }
  - { id: R2, kind: resistor, pins: [out, gnd], value: 4k7, tolerance: ${tol} }
`;

describe("worst case of a resistor divider", () => {
  for (const [tol, t] of [["1%", 0.01], ["5%", 0.05]] as const) {
    it(`output extremes under ±${tol} equal the analytic worst case to 1e-9`, async () => {
      // Ohm's law (closed form): Vout = Vin·R2/(R1 + R2); lowest with R1 high and R2 low, highest the other way.
      const r = await run(load(divider(tol)), [builtin(nodeProbe("out"))], { mode: "corners", samples: 1, seed: 1 });
      const low = r.passed.find((p) => p.subject === "low")!.measured!;
      const high = r.passed.find((p) => p.subject === "high")!.measured!;
      const lo = (10 * 4700 * (1 - t)) / (10000 * (1 + t) + 4700 * (1 - t));
      const hi = (10 * 4700 * (1 + t)) / (10000 * (1 - t) + 4700 * (1 + t));
      expect(Math.abs(low - lo)).toBeLessThan(1e-9);
      expect(Math.abs(high - hi)).toBeLessThan(1e-9);
    });
  }
});

// The mixed-corner CE stage: its worst headroom needs R1 low and R2 high (the divider ratio)
// against RC high and RE low — parts moving in opposite directions, which grouped corners missed.
const ceStage = `models:
  q: { kind: npn, beta: { min: 100, typ: 200, max: 300 }, saturationCurrent: 1e-14 A, earlyVoltage: 100 V }
components:
  - { id: VCC, kind: voltage-source, pins: { plus: vcc, minus: gnd }, voltage: 12 V, tolerance: 5% }
  - { id: R1, kind: resistor, pins: [vcc, b], value: 47k, tolerance: 5% }
  - { id: R2, kind: resistor, pins: [b, gnd], value: 10k, tolerance: 5% }
  - { id: RC, kind: resistor, pins: [vcc, c], value: 5k6, tolerance: 5% }
  - { id: RE, kind: resistor, pins: [e, gnd], value: 1k, tolerance: 5% }
  - { id: Q1, kind: npn, model: q, pins: { collector: c, base: b, emitter: e } }
`;
const AMBIENT = { min: CELSIUS - 20, max: CELSIUS + 60 };

describe("worst case against the full factorial", () => {
  it("the CE stage's worst headroom (7 parameters) is within 2 % of the 2^7 factorial", async () => {
    const circuit = load(ceStage);
    const settings = { mode: "corners" as const, samples: 1, seed: 1, temperature: AMBIENT };
    const r = await run(circuit, [builtin(headroom)], settings);
    const full = factorial(circuit, settings, (op) => (op.devices.Q1 as BjtPoint).headroom);
    expect(full.n).toBe(7);
    const q1 = [...r.findings, ...r.passed].find((f) => f.subject === "Q1")!;
    expect(full.min).toBeLessThan(0.5);
    expect(Math.abs(q1.measured! - full.min)).toBeLessThanOrEqual(0.02 * Math.abs(full.min));
    // …and the corner is the mixed one: R1 low, R2 high, RC high, RE low.
    const corner = r.v.cornerOf(q1.scenario)!.label;
    // 16 analyses (14 for the sensitivities, 2 corners) instead of the factorial's 128.
    expect(r.v.summary!.analyses).toBeLessThan(128);
    expect(corner).toMatch(/R1 −5 %, R2 \+5 %, RC \+5 %, RE −5 %/);
  });

  it("a circuit with 10 varied parameters: every bounded quantity's worst case is within 2 % of the 2^10 factorial", async () => {
    // The CE stage above driving an emitter follower (RB, RF, VEE), 10 banded parameters.
    const text = `${ceStage.replace("earlyVoltage: 100 V }", "earlyVoltage: 100 V }\n  f: { kind: npn, beta: { min: 80, typ: 150, max: 250 }, saturationCurrent: { min: 5e-15, typ: 1e-14, max: 2e-14 } }")}  - { id: RB, kind: resistor, pins: [c, fb], value: 1k }
  - { id: Q2, kind: npn, model: f, pins: { collector: vcc, base: fb, emitter: o } }
  - { id: RF, kind: resistor, pins: [o, gnd], value: 2k2, tolerance: 5% }
`;
    const circuit = load(text);
    const settings = { mode: "corners" as const, samples: 1, seed: 1, temperature: AMBIENT };
    const r = await run(circuit, [builtin(headroom, { bjt: 0 })], settings);
    for (const q of ["Q1", "Q2"]) {
      const full = factorial(circuit, settings, (op) => (op.devices[q] as BjtPoint).headroom);
      expect(full.n).toBe(10);
      const got = [...r.findings, ...r.passed].find((f) => f.subject === q)!.measured!;
      expect(Math.abs(got - full.min), `${q}: worst case ${got} vs factorial ${full.min}`).toBeLessThanOrEqual(0.02 * Math.abs(full.min));
    }
  });

  it("finds the CMOS stack's slow-slow corner at the cold end", async () => {
    // Two diode-connected devices in series: I = k/2·Vov² through both (square law, textbook).
    // With 2 V of supply the overdrives are small, so the higher thresholds at −40 °C (−2 mV/K)
    // outweigh the higher mobility: the lowest current is NMOS slow, PMOS slow, cold, supply low.
    const text = `models:
  n: { kind: nmos, threshold: { min: 0.6, typ: 0.7, max: 0.8 }, kPrime: { min: 80u, typ: 100u, max: 120u }, width: 10u, length: 1u }
  p: { kind: pmos, threshold: { min: -0.8, typ: -0.7, max: -0.6 }, kPrime: { min: 30u, typ: 40u, max: 50u }, width: 25u, length: 1u }
components:
  - { id: VDD, kind: voltage-source, pins: { plus: vdd, minus: gnd }, voltage: 2.2 V, tolerance: 5% }
  - { id: M2, kind: pmos, model: p, pins: { drain: x, gate: x, source: vdd } }
  - { id: M1, kind: nmos, model: n, pins: { drain: x, gate: x, source: gnd } }
specs:
  devices:
    M1: { region: saturation, minCurrent: 50 uA }
`;
    const circuit = load(text);
    const settings = { mode: "corners" as const, samples: 1, seed: 1, temperature: { min: CELSIUS - 40, max: CELSIUS + 85 } };
    const r = await run(circuit, [builtin(deviceCurrent)], settings);
    const full = factorial(circuit, settings, (op) => (op.devices.M1 as MosPoint).drainCurrent);
    const f = r.findings.find((x) => x.rule === "device-current")!;
    expect(f).toBeDefined();
    expect(Math.abs(f.measured! - full.min)).toBeLessThanOrEqual(0.02 * Math.abs(full.min));
    const label = r.v.cornerOf(f.scenario)!.label;
    expect(label).toContain("Vth(n) max");
    expect(label).toContain("Vth(p) min");
    expect(label).toContain("−40 °C");
  });
});
