// Topology checks: each names the parts and nodes involved.
import { describe, expect, it } from "vitest";
import { VCC, errorsOf, load, yaml } from "./helpers.js";

const R = (id: string, a: string, b: string) => `  - { id: ${id}, kind: resistor, pins: [${a}, ${b}], value: 1k }\n`;

describe("topology", () => {
  it("duplicate ids name the first use", () => {
    const e = errorsOf(yaml(VCC + R("R1", "vcc", "gnd") + R("R1", "vcc", "gnd")));
    expect(e[0]).toMatchObject({ line: 6, message: expect.stringMatching(/duplicate component id `R1` \(first used on line 5\)/), parts: ["R1"] });
  });
  it("a node behind capacitors has no DC path; the capacitors are named", () => {
    const e = errorsOf(yaml(VCC + R("R1", "vcc", "gnd") + "  - { id: C1, kind: capacitor, pins: [vcc, mid], value: 1u }\n" + R("R2", "mid", "top") + "  - { id: C2, kind: capacitor, pins: [top, gnd], value: 1u }\n"));
    expect(e).toHaveLength(1);
    expect(e[0]!.message).toMatch(/nodes `mid`, `top` have no DC path to ground `gnd` \(isolated by capacitor C1, capacitor C2\)/);
    expect(e[0]!.nodes).toEqual(["mid", "top"]);
    expect(e[0]!.parts).toEqual(["C1", "C2"]);
  });
  it("a MOSFET gate alone does not bias a node", () => {
    const e = errorsOf(yaml(VCC + R("RD", "vcc", "d") + "  - { id: M1, kind: nmos, model: n, pins: { drain: d, gate: g, source: gnd } }\n  - { id: C1, kind: capacitor, pins: [g, gnd], value: 1n }\n", "models:\n  n: { kind: nmos, threshold: 1 V, kPrime: 100u, width: 10u, length: 1u }\n"));
    expect(e[0]!.message).toMatch(/node `g` has no DC path .*the gate of M1/);
  });
  it("a loop of voltage sources is named", () => {
    const e = errorsOf(yaml(VCC + "  - { id: V2, kind: voltage-source, pins: { plus: a, minus: gnd }, voltage: 1 V }\n  - { id: V3, kind: voltage-source, pins: { plus: vcc, minus: a }, voltage: 11 V }\n" + R("R1", "vcc", "gnd")));
    expect(e[0]!.message).toBe("loop of voltage sources and DC shorts: V1 → V3 → V2 → V1");
    expect(e[0]!.parts).toEqual(["V1", "V3", "V2"]);
  });
  it("an inductor is a DC short in such a loop unless it has winding resistance", () => {
    expect(errorsOf(yaml(VCC + "  - { id: L1, kind: inductor, pins: [vcc, gnd], value: 1m }\n"))[0]!.message).toMatch(/V1 → L1/);
    expect(() => load(yaml(VCC + "  - { id: L1, kind: inductor, pins: [vcc, gnd], value: 1m, seriesResistance: 2 }\n"))).not.toThrow();
  });
  it("a voltage source with both pins on one node is an error", () => {
    expect(errorsOf(yaml(VCC + R("R1", "vcc", "gnd") + "  - { id: V2, kind: voltage-source, pins: { plus: vcc, minus: vcc }, voltage: 1 }\n"))[0]!.message).toMatch(/both pins on node `vcc`/);
  });
  it("a node fed only by current sources is named with the sources", () => {
    const e = errorsOf(yaml(VCC + R("R1", "vcc", "gnd") + "  - { id: I1, kind: current-source, pins: { from: gnd, to: x }, current: 1 mA }\n  - { id: I2, kind: current-source, pins: { from: x, to: vcc }, current: 1 mA }\n"));
    expect(e[0]!.message).toMatch(/node `x` is fed only by current sources \(I1, I2\)/);
  });
  it("a single-connection node is only a warning", () => {
    const c = load(yaml(VCC + R("R1", "vcc", "gnd") + R("R2", "vcc", "dangling")));
    expect(c.warnings.map((w) => w.message)).toContain("node `dangling` has only one connection (R2.b)");
  });
  it("models: unknown (with did-you-mean) and of the wrong kind", () => {
    const models = "models:\n  small-npn: { kind: npn, beta: 100, saturationCurrent: 1f }\n";
    const base = VCC + R("RB", "vcc", "b") + R("RC", "vcc", "c");
    expect(errorsOf(yaml(base + "  - { id: Q1, kind: npn, model: smal-npn, pins: { collector: c, base: b, emitter: gnd } }\n", models))[0]!.hint).toBe("did you mean `small-npn`?");
    expect(errorsOf(yaml(base + "  - { id: Q1, kind: pnp, model: small-npn, pins: { collector: gnd, base: b, emitter: c } }\n", models))[0]!.message).toMatch(/Q1 is a pnp but model `small-npn` is of kind npn/);
  });
  it("a current-controlled source must sense a two-terminal part that exists", () => {
    expect(errorsOf(yaml(VCC + R("R1", "vcc", "gnd") + "  - { id: H1, kind: ccvs, pins: { plus: o, minus: gnd }, sense: E1, gain: 1k }\n  - { id: E1, kind: vcvs, pins: { plus: e, minus: gnd, controlPlus: vcc, controlMinus: gnd }, gain: 1 }\n" + R("R2", "o", "gnd") + R("R3", "e", "gnd")))[0]!.message).toMatch(/sense `E1` is a vcvs; a controlled source senses the current of a resistor, capacitor, inductor, voltage-source or current-source/);
    expect(load(yaml(VCC + R("R1", "vcc", "gnd") + "  - { id: F1, kind: cccs, pins: { plus: o, minus: gnd }, sense: R1, gain: 2 }\n" + R("R2", "o", "gnd"))).components.at(-2)).toMatchObject({ kind: "cccs", sense: "R1" });
    expect(errorsOf(yaml(VCC + R("R1", "vcc", "gnd") + "  - { id: F1, kind: cccs, pins: { plus: o, minus: gnd }, sense: V9, gain: 2 }\n" + R("R2", "o", "gnd")))[0]!.message).toMatch(/sense `V9` is not a component/);
  });
  it("spec references to missing parts and nodes, and a gain input that is not a source", () => {
    const base = VCC + R("R1", "vcc", "out") + R("R2", "out", "gnd");
    expect(errorsOf(yaml(base) + "specs:\n  gains:\n    - { name: g, input: V1, output: outt, target: 0.5 }\n")[0]).toMatchObject({ message: "gain spec `g`: output node `outt` does not exist", hint: "did you mean `out`?", line: 9 });
    expect(errorsOf(yaml(base) + "specs:\n  gains:\n    - { name: g, input: R1, output: out, target: 0.5 }\n")[0]!.message).toMatch(/input `R1` is a resistor, not an independent source/);
    expect(errorsOf(yaml(base) + "specs:\n  supplies:\n    - { source: VCC }\n")[0]!.message).toMatch(/source `VCC` is not a component/);
    expect(errorsOf(yaml(base) + "specs:\n  devices:\n    Q9: { region: active }\n")[0]!.message).toMatch(/`Q9` is not a component/);
    expect(errorsOf(yaml(base) + "specs:\n  devices:\n    R1: { region: active }\n")[0]!.message).toMatch(/`R1` is a resistor, not a transistor/);
  });
  it("ground that nothing touches is named, with a hint for node 0", () => {
    const e = errorsOf(yaml("  - { id: V1, kind: voltage-source, pins: { plus: vcc, minus: 0 }, voltage: 12 V }\n" + R("R1", "vcc", "0")));
    expect(e[0]).toMatchObject({ message: "no component connects to the ground node `gnd`", hint: expect.stringMatching(/ground: 0/) });
    expect(() => load(yaml("  - { id: V1, kind: voltage-source, pins: { plus: vcc, minus: 0 }, voltage: 12 V }\n" + R("R1", "vcc", "0"), "ground: 0\n"))).not.toThrow();
  });
});
