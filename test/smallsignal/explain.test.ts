// The hand-analysis chain (src/smallsignal/explain) on circuits built for the test. For each
// stage type the formula's value must equal the textbook closed form computed here from the
// device's reported α (= β/(β+1), β = gm·rπ), re, gm and the resistances a reviewer reads off
// the schematic (parallel/series combinations worked out by hand below). Closed forms: the
// standard hybrid-π and square-law small-signal results, as in Sedra & Smith, "Microelectronic
// Circuits" (from memory):
//   CE with emitter resistor  −α·R_C/(re + R_E)      CB  α·R_C/re       CC  R_E/(re + R_E)
//   CS with degeneration      −gm·R_D/(1 + gm·R_S)   differential pair ±α·R_C/(2·re)
// Then constructed cases where the exact stage gain differs from the formula, one per
// assumption of the hand method, and the stated reason must be that assumption.

import { describe, expect, it } from "vitest";
import { readFileSync } from "node:fs";
import { solveOperatingPoint } from "../../src/solve/index.js";
import type { BjtPoint, MosPoint, OperatingPoint } from "../../src/solve/types.js";
import { explainGains, AGREEMENT, type GainExplanation, type StageExplanation } from "../../src/smallsignal/explain/index.js";
import type { Circuit } from "../../src/circuit/types.js";
import { load } from "../circuit/helpers.js";

/** Formula vs closed form: same arithmetic on resistances measured through a 1e-12 S probe leak. */
const SAME = 1e-6;
/** Formula vs exact where every assumption holds: only the models' 1e-12 S leaks differ. */
const EXACT = 1e-4;

const par = (...rs: number[]): number => 1 / rs.reduce((s, r) => s + 1 / r, 0);

function run(text: string): { circuit: Circuit; op: OperatingPoint; chains: GainExplanation[] } {
  const circuit = load(text);
  const op = solveOperatingPoint(circuit);
  if (!op.ok) throw new Error(op.reason);
  return { circuit, op, chains: explainGains(circuit, op) };
}

const NPN = `models:
  n1: { kind: npn, beta: 200, saturationCurrent: 1e-14 A }
`;
const head = (extra = ""): string => `format: opgate-circuit/1\nname: t\n${NPN}${extra}`;
const bjt = (op: OperatingPoint, id: string) => op.devices[id] as BjtPoint;
const alphaOf = (b: BjtPoint): number => {
  const beta = b.transconductance * b.inputResistance;
  return beta / (beta + 1);
};
const only = (g: GainExplanation): StageExplanation => {
  expect(g.stages).toHaveLength(1);
  return g.stages[0]!;
};
const rel = (a: number, b: number): number => Math.abs(a / b - 1);

// Common emitter, emitter resistor split: RE1 unbypassed, RE2 bypassed by CE.
const CE_SPLIT = (gainExtra = "", rc = "3k3", model = "n1", c2 = "470u") => `${head()}components:
  - { id: VCC, kind: voltage-source, pins: { plus: vcc, minus: gnd }, voltage: 12 V }
  - { id: VIN, kind: voltage-source, pins: { plus: in, minus: gnd }, voltage: 0 V }
  - { id: C1, kind: capacitor, pins: [in, b], value: 470u }
  - { id: R1, kind: resistor, pins: [vcc, b], value: 47k }
  - { id: R2, kind: resistor, pins: [b, gnd], value: 10k }
  - { id: Q1, kind: npn, model: ${model}, pins: { collector: c, base: b, emitter: e } }
  - { id: RC, kind: resistor, pins: [vcc, c], value: ${rc} }
  - { id: RE1, kind: resistor, pins: [e, e2], value: 100 }
  - { id: RE2, kind: resistor, pins: [e2, gnd], value: 1k }
  - { id: CE, kind: capacitor, pins: [e2, gnd], value: 100u }
  - { id: C2, kind: capacitor, pins: [c, out], value: ${c2} }
  - { id: RL, kind: resistor, pins: [out, gnd], value: 10k }
specs:
  gains:
    - { name: g, input: VIN, output: out, target: -20, tolerance: 50%${gainExtra} }
`;

describe("formula values against the textbook closed forms", () => {
  it("common emitter with a split emitter resistor: −α·(RC‖RL)/(re + RE1)", () => {
    const { op, chains } = run(CE_SPLIT());
    const s = only(chains[0]!);
    expect(s.configuration).toBe("common-emitter");
    const q = bjt(op, "Q1");
    const rc = par(3300, 10e3); // RC ‖ RL (C2 a short at midband)
    const closed = (-alphaOf(q) * rc) / (q.emitterResistance + 100); // RE2 bypassed: only RE1 remains
    expect(rel(s.formula.value, closed)).toBeLessThan(SAME);
    // The resistances a reviewer reads off the schematic, measured on the network.
    const r = Object.fromEntries(s.resistances.map((x) => [x.terminal, x.own]));
    expect(r.base).toBeCloseTo(0, 6); // the ideal input source through C1
    expect(rel(r.emitter as number, 100)).toBeLessThan(SAME);
    expect(rel(r.collector as number, rc)).toBeLessThan(SAME);
    // No Early effect: the hybrid-π result is exactly the formula.
    expect(s.difference).toBeLessThan(EXACT);
    expect(s.agrees).toBe(true);
    expect(s.reasons).toEqual([]);
    expect(rel(chains[0]!.formulaProduct as number, chains[0]!.exact)).toBeLessThan(EXACT);
  });

  it("common base: α·(RC‖RL)/re, base bypassed", () => {
    const { op, chains } = run(`${head()}components:
  - { id: VCC, kind: voltage-source, pins: { plus: vcc, minus: gnd }, voltage: 12 V }
  - { id: VIN, kind: voltage-source, pins: { plus: in, minus: gnd }, voltage: 0 V }
  - { id: C1, kind: capacitor, pins: [in, e], value: 470u }
  - { id: R1, kind: resistor, pins: [vcc, b], value: 47k }
  - { id: R2, kind: resistor, pins: [b, gnd], value: 10k }
  - { id: CB, kind: capacitor, pins: [b, gnd], value: 100u }
  - { id: Q1, kind: npn, model: n1, pins: { collector: c, base: b, emitter: e } }
  - { id: RE, kind: resistor, pins: [e, gnd], value: 1k }
  - { id: RC, kind: resistor, pins: [vcc, c], value: 3k3 }
  - { id: C2, kind: capacitor, pins: [c, out], value: 470u }
  - { id: RL, kind: resistor, pins: [out, gnd], value: 10k }
specs:
  gains:
    - { name: g, input: VIN, output: out, target: 100, tolerance: 50% }
`);
    const s = only(chains[0]!);
    expect(s.configuration).toBe("common-base");
    const q = bjt(op, "Q1");
    const closed = (alphaOf(q) * par(3300, 10e3)) / q.emitterResistance;
    expect(rel(s.formula.value, closed)).toBeLessThan(SAME);
    expect(s.agrees).toBe(true);
    expect(s.reasons).toEqual([]);
  });

  it("emitter follower: (RE‖RL)/(re + RE‖RL)", () => {
    const { op, chains } = run(`${head()}components:
  - { id: VCC, kind: voltage-source, pins: { plus: vcc, minus: gnd }, voltage: 12 V }
  - { id: VIN, kind: voltage-source, pins: { plus: in, minus: gnd }, voltage: 0 V }
  - { id: C1, kind: capacitor, pins: [in, b], value: 470u }
  - { id: R1, kind: resistor, pins: [vcc, b], value: 10k }
  - { id: R2, kind: resistor, pins: [b, gnd], value: 10k }
  - { id: Q1, kind: npn, model: n1, pins: { collector: vcc, base: b, emitter: e } }
  - { id: RE, kind: resistor, pins: [e, gnd], value: 2k2 }
  - { id: C2, kind: capacitor, pins: [e, out], value: 470u }
  - { id: RL, kind: resistor, pins: [out, gnd], value: 1k }
specs:
  gains:
    - { name: g, input: VIN, output: out, target: 0.95, tolerance: 10% }
`);
    const s = only(chains[0]!);
    expect(s.configuration).toBe("common-collector");
    const q = bjt(op, "Q1");
    const re = par(2200, 1000);
    expect(rel(s.formula.value, re / (q.emitterResistance + re))).toBeLessThan(SAME);
    expect(s.agrees).toBe(true);
  });

  it("common source with an unbypassed source resistor: −gm·(RD‖RL)/(1 + gm·RS)", () => {
    const { op, chains } = run(`format: opgate-circuit/1
name: t
models:
  m1: { kind: nmos, threshold: 1 V, kPrime: 200u, width: 10 um, length: 1 um }
components:
  - { id: VDD, kind: voltage-source, pins: { plus: vdd, minus: gnd }, voltage: 12 V }
  - { id: VIN, kind: voltage-source, pins: { plus: in, minus: gnd }, voltage: 0 V }
  - { id: C1, kind: capacitor, pins: [in, g], value: 1u }
  - { id: R1, kind: resistor, pins: [vdd, g], value: 1M }
  - { id: R2, kind: resistor, pins: [g, gnd], value: 470k }
  - { id: M1, kind: nmos, model: m1, pins: { drain: d, gate: g, source: s } }
  - { id: RD, kind: resistor, pins: [vdd, d], value: 4k7 }
  - { id: RS, kind: resistor, pins: [s, gnd], value: 1k }
  - { id: C2, kind: capacitor, pins: [d, out], value: 470u }
  - { id: RL, kind: resistor, pins: [out, gnd], value: 47k }
specs:
  gains:
    - { name: g, input: VIN, output: out, target: -2, tolerance: 50% }
`);
    const s = only(chains[0]!);
    expect(s.configuration).toBe("common-source");
    const gm = (op.devices.M1 as MosPoint).transconductance;
    const closed = (-gm * par(4700, 47e3)) / (1 + gm * 1000);
    expect(rel(s.formula.value, closed)).toBeLessThan(SAME);
    expect(s.agrees).toBe(true);
  });

  const PAIR = `${head()}components:
  - { id: VCC, kind: voltage-source, pins: { plus: vcc, minus: gnd }, voltage: 12 V }
  - { id: VEE, kind: voltage-source, pins: { plus: gnd, minus: vee }, voltage: 12 V }
  - { id: VIN, kind: voltage-source, pins: { plus: in, minus: gnd }, voltage: 0 V }
  - { id: Q1, kind: npn, model: n1, pins: { collector: c1, base: in, emitter: tail } }
  - { id: Q2, kind: npn, model: n1, pins: { collector: c2, base: gnd, emitter: tail } }
  - { id: RT, kind: resistor, pins: [tail, vee], value: 11k }
  - { id: RC1, kind: resistor, pins: [vcc, c1], value: 10k }
  - { id: RC2, kind: resistor, pins: [vcc, c2], value: 10k }
specs:
  gains:
    - { name: other-side, input: VIN, output: c2, target: 100, tolerance: 50% }
    - { name: same-side, input: VIN, output: c1, target: -100, tolerance: 50% }
`;

  it("differential pair, single-ended outputs: ±α·RC/(2·re)", () => {
    const { op, chains } = run(PAIR);
    const q = bjt(op, "Q1");
    const closed = (alphaOf(q) * 10e3) / (2 * q.emitterResistance);
    const other = only(chains[0]!);
    expect(other.configuration).toBe("differential-pair");
    expect([other.device, other.partner]).toEqual(["Q1", "Q2"]);
    expect(rel(other.formula.value, closed)).toBeLessThan(SAME);
    const same = only(chains[1]!);
    expect(same.configuration).toBe("differential-pair");
    expect(rel(same.formula.value, -closed)).toBeLessThan(SAME);
    // Tail 11 kΩ against re ≈ 50 Ω: the textbook's "tail ≫ re" holds to well under 5 %.
    expect(other.agrees).toBe(true);
    expect(same.agrees).toBe(true);
  });
});

describe("the stated reason where the exact stage gain differs", () => {
  it("ro not negligible: a low Early voltage against a large collector resistor", () => {
    const text = CE_SPLIT("", "4k7").replace("n1: { kind: npn, beta: 200, saturationCurrent: 1e-14 A }", "n1: { kind: npn, beta: 200, saturationCurrent: 1e-14 A, earlyVoltage: 5 V }");
    const s = only(run(text).chains[0]!);
    expect(s.difference).toBeGreaterThan(AGREEMENT);
    expect(s.reasons.map((r) => r.code)).toEqual(["output-resistance"]);
  });

  it("a bypass capacitor that is not a short at the gain's frequency, named", () => {
    const s = only(run(CE_SPLIT(", frequency: 5 Hz")).chains[0]!);
    expect(s.difference).toBeGreaterThan(AGREEMENT);
    expect(s.reasons.map((r) => r.code)).toEqual(["bypass"]);
    expect(s.reasons[0]!.text).toMatch(/^CE \(100 µF/);
  });

  it("the next stage loading this one: a follower into a 100 Ω load on the collector", () => {
    const { chains } = run(`format: opgate-circuit/1
name: t
models:
  n1: { kind: npn, beta: 100, saturationCurrent: 1e-14 A }
components:
  - { id: VCC, kind: voltage-source, pins: { plus: vcc, minus: gnd }, voltage: 12 V }
  - { id: VIN, kind: voltage-source, pins: { plus: in, minus: gnd }, voltage: 0 V }
  - { id: C1, kind: capacitor, pins: [in, b], value: 470u }
  - { id: R1, kind: resistor, pins: [vcc, b], value: 100k }
  - { id: R2, kind: resistor, pins: [b, gnd], value: 10k }
  - { id: Q1, kind: npn, model: n1, pins: { collector: c1, base: b, emitter: e1 } }
  - { id: RC, kind: resistor, pins: [vcc, c1], value: 10k }
  - { id: RE, kind: resistor, pins: [e1, gnd], value: 470 }
  - { id: Q2, kind: npn, model: n1, pins: { collector: vcc, base: c1, emitter: e2 } }
  - { id: RE2, kind: resistor, pins: [e2, gnd], value: 2k2 }
  - { id: C3, kind: capacitor, pins: [e2, out], value: 4700u }
  - { id: RL, kind: resistor, pins: [out, gnd], value: 100 }
specs:
  gains:
    - { name: g, input: VIN, output: out, target: -10, tolerance: 50% }
`);
    const [ce, cc] = chains[0]!.stages;
    expect([ce!.configuration, cc!.configuration]).toEqual(["common-emitter", "common-collector"]);
    expect(ce!.reasons.map((r) => r.code)).toEqual(["loading"]);
    expect(ce!.reasons[0]!.text).toMatch(/^the next stage \(Q2\) loads the collector/);
    // With the loaded resistance the formula is the exact gain again (no ro, no feedback).
    expect(rel(ce!.formulaLoaded, ce!.exact.re)).toBeLessThan(EXACT);
    expect(cc!.agrees).toBe(true);
  });

  it("the device not in its amplifying region: the failing example (Q1 saturated)", () => {
    const text = readFileSync(new URL("../../examples/tide-gauge-preamp-rev-b.yaml", import.meta.url), "utf8");
    const s = only(run(text).chains[0]!);
    expect(s.region).toBe("saturation");
    expect(s.reasons.map((r) => r.code)).toEqual(["region"]);
    expect(s.agrees).toBe(false);
  });

  it("a path the formula leaves out: a 1 kΩ feed-forward path from base to collector (1 mS against the stage's ≈ 8 mS)", () => {
    const text = CE_SPLIT().replace(
      "  - { id: C2,",
      "  - { id: CF, kind: capacitor, pins: [b, f], value: 470u }\n  - { id: RF, kind: resistor, pins: [f, c], value: 1k }\n  - { id: C2,",
    );
    const s = only(run(text).chains[0]!);
    expect(s.reasons.map((r) => r.code)).toEqual(["unexplained"]);
  });

  it("body effect: a common-drain stage whose body is tied to ground", () => {
    const { chains } = run(`format: opgate-circuit/1
name: t
models:
  m1: { kind: nmos, threshold: 1 V, kPrime: 200u, width: 10 um, length: 1 um, bodyEffect: 0.8 }
components:
  - { id: VDD, kind: voltage-source, pins: { plus: vdd, minus: gnd }, voltage: 12 V }
  - { id: VIN, kind: voltage-source, pins: { plus: in, minus: gnd }, voltage: 0 V }
  - { id: C1, kind: capacitor, pins: [in, g], value: 1u }
  - { id: R1, kind: resistor, pins: [vdd, g], value: 1M }
  - { id: R2, kind: resistor, pins: [g, gnd], value: 1M }
  - { id: M1, kind: nmos, model: m1, pins: { drain: vdd, gate: g, source: s, body: gnd } }
  - { id: RS, kind: resistor, pins: [s, gnd], value: 10k }
specs:
  gains:
    - { name: g, input: VIN, output: s, target: 0.8, tolerance: 30% }
`);
    const s = only(chains[0]!);
    expect(s.configuration).toBe("common-drain");
    expect(s.reasons.map((r) => r.code)).toEqual(["body-effect"]);
  });
});
