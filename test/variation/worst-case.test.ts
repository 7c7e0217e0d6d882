// Worst-case corners against closed forms and against the full 2^n factorial computed here.
import { describe, expect, it } from "vitest";
import deviceCurrent from "../../rules/device-current.js";
import headroom from "../../rules/headroom.js";
import { defineRule } from "../../src/review/rule.js";
import type { BjtPoint, MosPoint } from "../../src/solve/types.js";
import { judgeWindow } from "../../src/review/window.js";
import { roomToLimit } from "../../src/variation/worst-case.js";
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

// Re-linearisation runs only where it can change the verdict. A quantity with a cross term,
//   f = x − 2·x·y + 3·y,   x = (R1 − 1 kΩ)/50 Ω, y = (R2 − 1 kΩ)/50 Ω (each ±5 %: x, y ∈ [−1, 1]),
// has ∂f/∂x = 1 − 2y and ∂f/∂y = 3 − 2x (algebra). At nominal both are positive, so the linear
// corner for its maximum is (1, 1), where f = 2 against a prediction of 4; there ∂f/∂x = −1 has
// flipped sign, and the corner it points to, (−1, 1), gives f = 4: the maximum of the four corners
// (2, 4, 0, −6), the 2² factorial the test also computes.
const bilinear = (limit: number) =>
  defineRule({
    id: "cross-term",
    description: "Reads a quantity with a cross term of R1 and R2",
    severity: "error",
    docs: "test rule",
    check({ circuit }, report) {
      const value = (id: string) => (circuit.components.find((c) => c.id === id) as { value: { nominal: number } }).value.nominal;
      const x = (value("R1") - 1000) / 50;
      const y = (value("R2") - 1000) / 50;
      const f = x - 2 * x * y + 3 * y;
      const check = { measured: f, limit, unit: "V", bound: "max" as const };
      if (f <= limit) report.pass("f", check);
      else report.fail({ subject: "f", message: `f is ${f}`, ...check });
    },
  });

const crossTerm = `components:
  - { id: VIN, kind: voltage-source, pins: { plus: in, minus: gnd }, voltage: 1 V }
  - { id: R1, kind: resistor, pins: [in, out], value: 1k, tolerance: 5% }
  - { id: R2, kind: resistor, pins: [out, gnd], value: 1k, tolerance: 5% }
`;

describe("re-linearisation only near a limit", () => {
  const settings = { mode: "corners" as const, samples: 1, seed: 1 };
  const f = (r1: number, r2: number): number => {
    const x = (r1 - 1000) / 50;
    const y = (r2 - 1000) / 50;
    return x - 2 * x * y + 3 * y;
  };
  const full = Math.max(f(950, 950), f(950, 1050), f(1050, 950), f(1050, 1050));

  it("re-linearises a corner within reach of its limit and follows the sign flip to the factorial's maximum", async () => {
    const r = await run(load(crossTerm), [builtin(bilinear(3.5))], settings);
    expect(full).toBe(4);
    const finding = r.findings.find((x) => x.rule === "cross-term")!;
    expect(finding).toBeDefined();
    expect(Math.abs(finding.measured! - full)).toBeLessThan(1e-9);
    expect(r.v.cornerOf(finding.scenario)!.label).toBe("R1 −5 %, R2 +5 %");
    expect(r.v.summary!.refinementAnalyses).toBeGreaterThan(0);
    expect(r.v.summary!.refinedQuantities).toBe(1);
  });

  it("leaves a disagreeing corner far from the limit as verified: no re-linearisation, same verdict", async () => {
    const far = await run(load(crossTerm), [builtin(bilinear(100))], settings);
    expect(far.findings).toEqual([]);
    expect(far.v.summary!.refinementAnalyses).toBe(0);
    expect(far.v.search!.farFromLimit).toBeGreaterThan(0);
    // The verified corner (1, 1) is what the worst case reports: 2, short of the maximum 4 but
    // 96 away from the limit, so the verdict is the factorial's.
    expect(far.passed.find((p) => p.rule === "cross-term")!.measured).toBeCloseTo(2, 9);
  });

  it("a bound on the room to an unreported window edge never exceeds the true distance (window.ts reports the nearer edge)", () => {
    // Property check over random windows and passing values, against src/review/window.ts itself.
    let seed = 12345;
    const random = (): number => ((seed = (seed * 1103515245 + 12345) % 2147483648) / 2147483648);
    let checked = 0;
    for (let k = 0; k < 20000; k++) {
      const a = (random() - 0.5) * 200;
      const b = a + random() * 100;
      const v = a + (b - a) * random();
      const verdict = judgeWindow(v, { min: a, max: b });
      if (!verdict.ok) continue;
      const sign = verdict.bound === "min" ? 1 : -1; // push toward the edge that was not reported
      const reported = verdict.bound === "min" ? { lower: verdict.limit, upper: null } : { lower: null, upper: verdict.limit };
      const room = roomToLimit(v, sign, reported);
      if (room === null) continue;
      const truth = sign > 0 ? b - v : v - a;
      expect(room).toBeLessThanOrEqual(truth * (1 + 1e-12) + 1e-12);
      checked++;
    }
    expect(checked).toBeGreaterThan(5000);
    // One-sided: a limit reported on the side pushed to is the distance itself.
    expect(roomToLimit(2, 1, { lower: null, upper: 3.5 })).toBe(1.5);
    expect(roomToLimit(4, 1, { lower: null, upper: 3.5 })).toBe(-0.5);
    expect(roomToLimit(2, 1, undefined)).toBeNull();
  });
});
