// Resolution into the Circuit value: units, defaults, tolerances, spreads, specs and positions.
import { describe, expect, it } from "vitest";
import * as D from "../../src/circuit/defaults.js";
import type { BjtModel, MosfetModel, Resistor } from "../../src/circuit/types.js";
import { VCC, errorsOf, load, yaml } from "./helpers.js";

const NPN = "models:\n  q: { kind: npn, beta: 200, saturationCurrent: 1e-14 A }\n";
const BIAS = `${VCC}  - { id: RB, kind: resistor, pins: [vcc, b], value: 100k }\n  - { id: RC, kind: resistor, pins: [vcc, c], value: 1k }\n  - { id: Q1, kind: npn, model: q, pins: { collector: c, base: b, emitter: gnd } }\n`;

describe("defaults (DESIGN.md section 3)", () => {
  it("temperature 25 °C (the datasheet reference) and ground gnd when not given", () => {
    const c = load(yaml(BIAS, NPN));
    expect(c.temperature).toBeCloseTo(298.15, 10);
    expect(c.ground).toBe("gnd");
    expect(c.nodes).toEqual(["b", "c", "vcc"]);
  });
  it("BJT model defaults", () => {
    const m = load(yaml(BIAS, NPN)).models.get("q") as BjtModel;
    expect(m.reverseBeta).toEqual({ min: 1, typ: 1, max: 1 });
    expect(m.earlyVoltage.typ).toBe(Infinity);
    expect(m.saturationEdge).toBe(0.3);
    expect(m.drift).toEqual({ voltage: -0.002, current: 1e-3 }); // −2 mV/°C at 1 mA, src/circuit/defaults.ts
    expect(m.betaDrift).toBe(0.005); // 0.5 %/°C
    expect(m.beta).toEqual({ min: 200, typ: 200, max: 200 });
  });
  it("MOSFET model defaults, body pin defaulting to source, and the sign warning", () => {
    const text = yaml(
      `${VCC}  - { id: RD, kind: resistor, pins: [vcc, d], value: 10k }\n  - { id: RG, kind: resistor, pins: [vcc, g], value: 1M }\n  - { id: M1, kind: nmos, model: n, pins: { drain: d, gate: g, source: gnd } }\n`,
      "models:\n  n: { kind: nmos, threshold: -1 V, kPrime: 200u, width: 10 um, length: 1 um }\n",
    );
    const c = load(text);
    const m = c.models.get("n") as MosfetModel;
    expect(m.channelLengthModulation.typ).toBe(D.DEFAULT_CHANNEL_LENGTH_MODULATION);
    expect(m.bodyEffect).toBe(0);
    expect(m.fermiPotential).toBe(0.35); // φF = VT·ln(NA/ni), src/circuit/defaults.ts
    expect(m.thresholdTempco).toBe(-0.002);
    expect(m.kPrimeExponent).toBe(-1.5);
    expect(m.width).toBeCloseTo(10e-6, 15);
    const m1 = c.components.find((x) => x.id === "M1");
    expect(m1?.kind === "nmos" && m1.pins.body).toBe("gnd");
    expect(c.warnings.some((w) => /NMOS threshold of -1 V is negative/.test(w.message) && /write 1 V/.test(w.hint ?? ""))).toBe(true);
  });
  it("a PMOS with a positive threshold is a warning naming both readings", () => {
    const text = yaml(
      `${VCC}  - { id: RD, kind: resistor, pins: [d, gnd], value: 10k }\n  - { id: RG, kind: resistor, pins: [g, gnd], value: 1M }\n  - { id: M1, kind: pmos, model: p, pins: { drain: d, gate: g, source: vcc } }\n`,
      "models:\n  p: { kind: pmos, threshold: 1 V, kPrime: 100u, width: 10 um, length: 1 um }\n",
    );
    const w = load(text).warnings.find((x) => /PMOS/.test(x.message));
    expect(w?.message).toMatch(/depletion-mode PMOS/);
    expect(w?.hint).toMatch(/-1 V/);
  });
  it("bare temperatures are kelvin, with a warning when they look like °C", () => {
    const c = load(yaml(BIAS, `temperature: 27\n${NPN}`));
    expect(c.temperature).toBe(27);
    expect(c.warnings[0]?.hint).toMatch(/27 °C/);
  });
});

describe("tolerances and spreads", () => {
  const r = (tol: string) => (load(yaml(`${VCC}  - { id: R1, kind: resistor, pins: [vcc, gnd], value: 4k7, tolerance: ${tol} }\n`)).components[1] as Resistor).value;
  it('"5%" gives a symmetric band', () => {
    const v = r("5%");
    expect(v.nominal).toBe(4700);
    expect(v.min).toBeCloseTo(4465, 9);
    expect(v.max).toBeCloseTo(4935, 9);
  });
  it("a fraction ≤ 1 is a relative tolerance", () => expect(r("0.01").max).toBeCloseTo(4747, 9));
  it("{min, max} are absolute limits in the field unit, or signed percentages", () => {
    expect(r("{ min: 4.6k, max: 4.8k }")).toEqual({ nominal: 4700, min: 4600, max: 4800 });
    const c = r('{ min: "-20%", max: "+80%" }');
    expect(c.min).toBeCloseTo(3760, 9);
    expect(c.max).toBeCloseTo(8460, 9);
  });
  it("limits that do not enclose the nominal are rejected", () => {
    expect(errorsOf(yaml(`${VCC}  - { id: R1, kind: resistor, pins: [vcc, gnd], value: 4k7, tolerance: { min: 5k, max: 6k } }\n`))[0]?.message).toMatch(/do not enclose/);
  });
  it("tolerance: 5 is rejected with the hint to write \"5%\"", () => {
    const e = errorsOf(yaml(`${VCC}  - { id: R1, kind: resistor, pins: [vcc, gnd], value: 1k, tolerance: 5 }\n`))[0]!;
    expect(e.hint).toContain('"5%"');
    expect([e.line, e.column]).toEqual([5, 71]);
  });
  it("spreads need typ and min ≤ typ ≤ max", () => {
    const m = load(yaml(BIAS, "models:\n  q: { kind: npn, beta: { min: 100, typ: 200 }, saturationCurrent: 1e-14 A }\n")).models.get("q") as BjtModel;
    expect(m.beta).toEqual({ min: 100, typ: 200, max: 200 });
    expect(errorsOf(yaml(BIAS, "models:\n  q: { kind: npn, beta: { min: 100, max: 300 }, saturationCurrent: 1e-14 A }\n"))[0]?.message).toMatch(/missing the key `typ`/);
  });
});

describe("parameters and expressions", () => {
  it("parameters may use units and other parameters, in any order", () => {
    const c = load(yaml(`${VCC}  - { id: R1, kind: resistor, pins: [vcc, gnd], value: "= rHalf" }\n`, 'parameters:\n  rHalf: "= rLoad / 2"\n  rLoad: 2k2\n'));
    expect(c.parameters.get("rLoad")).toBe(2200);
    expect((c.components[1] as Resistor).value.nominal).toBe(1100);
  });
  it("a cycle is an error naming it", () => {
    const e = errorsOf(yaml(`${VCC}  - { id: R1, kind: resistor, pins: [vcc, gnd], value: "= a" }\n`, 'parameters:\n  a: "= b * 2"\n  b: "= c + 1"\n  c: "= a / 4"\n'));
    expect(e.map((x) => x.message)).toContain("parameters form a cycle: a → b → c → a");
    expect(e[0]?.line).toBe(4);
  });
  it("a parameter that refers to itself is a cycle", () => {
    const e = errorsOf(yaml(`${VCC}  - { id: R1, kind: resistor, pins: [vcc, gnd], value: 1k }\n`, 'parameters:\n  a: "= a + 1"\n'));
    expect(e[0]?.message).toBe("parameters form a cycle: a → a");
  });
  it("an unknown parameter gets a did-you-mean", () => {
    const e = errorsOf(yaml(`${VCC}  - { id: R1, kind: resistor, pins: [vcc, gnd], value: 1k }\n`, 'parameters:\n  rLoad: 1k\n  r2: "= rLaod"\n'));
    expect(e[0]?.hint).toMatch(/did you mean `rLoad`/);
  });
});

describe("specs", () => {
  const specs = (s: string) => load(yaml(`${VCC}  - { id: VIN, kind: voltage-source, pins: { plus: in, minus: gnd }, voltage: 0 }\n  - { id: R1, kind: resistor, pins: [in, out], value: 1k }\n  - { id: R2, kind: resistor, pins: [out, gnd], value: 1k }\n  - { id: R3, kind: resistor, pins: [vcc, gnd], value: 1k }\n`) + `specs:\n${s}`).specs;
  it("a target of −40 with 5% gives the window {−42, −38}; a single-node output is against ground", () => {
    const g = specs("  gains:\n    - { name: g, input: VIN, output: out, target: -40, tolerance: 5% }\n").gains[0]!;
    expect(g.window.min).toBeCloseTo(-42, 12);
    expect(g.window.max).toBeCloseTo(-38, 12);
    expect(g.output).toEqual({ plus: "out", minus: "gnd" });
    expect(g.pos.line).toBe(11);
  });
  it("an explicit window, a differential output, a frequency, band, supplies and devices", () => {
    const s = specs(
      "  gains:\n    - { name: g, input: VIN, output: { plus: out, minus: in }, target: -0.5, tolerance: { min: -0.6, max: -0.4 }, frequency: 1 kHz }\n  band: { low: 20 Hz, high: 20 kHz }\n  supplies:\n    - { source: V1, maxCurrent: 20 mA, maxPower: 250 mW }\n",
    );
    expect(s.gains[0]).toMatchObject({ window: { min: -0.6, max: -0.4 }, output: { plus: "out", minus: "in" }, frequency: 1000 });
    expect(s.band).toMatchObject({ low: 20, high: 20000 });
    expect(s.supplies[0]).toMatchObject({ source: "V1", maxCurrent: 0.02, maxPower: 0.25 });
  });
  it("review overrides become Circuit.overrides with their reason and position", () => {
    const c = load(yaml(`${VCC}  - { id: R1, kind: resistor, pins: [vcc, gnd], value: 1k }\n`) + "review:\n  resistor-power:\n    options: { maxFraction: 0.8 }\n    reason: the heatsink pad doubles the rating\n");
    expect(c.overrides).toEqual([{ rule: "resistor-power", options: { maxFraction: 0.8 }, reason: "the heatsink pad doubles the rating", pos: expect.objectContaining({ line: 7, column: 3 }) }]);
  });
});

describe("positions and immutability", () => {
  it("a value problem names its component or model as the part (the finding's subject)", () => {
    const wrongUnit = errorsOf(yaml(`${VCC}  - { id: R2, kind: resistor, pins: [vcc, gnd], value: 10 uF }\n`));
    expect(wrongUnit[0]).toMatchObject({ line: 5, parts: ["R2"] });
    const badModel = errorsOf(yaml(BIAS, "models:\n  q: { kind: npn, beta: 200 V, saturationCurrent: 1e-14 A }\n"));
    expect(badModel[0]!.parts).toEqual(["q"]);
  });
  it("every component carries its line and column", () => {
    const c = load(yaml(BIAS, NPN), "boards/amp.yaml");
    expect(c.components.map((x) => [x.id, x.pos.line, x.pos.column])).toEqual([
      ["V1", 6, 5],
      ["RB", 7, 5],
      ["RC", 8, 5],
      ["Q1", 9, 5],
    ]);
    expect(c.components[0]!.pos.file).toBe("boards/amp.yaml");
    expect(c.models.get("q")!.pos.line).toBe(4);
  });
  it("the circuit is frozen", () => {
    const c = load(yaml(BIAS, NPN));
    expect(Object.isFrozen(c)).toBe(true);
    expect(Object.isFrozen(c.components[1])).toBe(true);
    expect(() => (c.components as unknown as unknown[]).push(1)).toThrow();
  });
  it("JSON files load the same as YAML", () => {
    const json = JSON.stringify({ format: "opgate-circuit/1", name: "j", components: [{ id: "V1", kind: "voltage-source", pins: { plus: "a", minus: "gnd" }, voltage: "5 V" }, { id: "R1", kind: "resistor", pins: ["a", "gnd"], value: "4k7" }] }, null, 2);
    const c = load(json, "j.json");
    expect((c.components[1] as Resistor).value.nominal).toBe(4700);
    expect(c.components[1]!.pos.line).toBe(14);
  });
});

describe("the format example of DESIGN.md section 3", () => {
  // Copied from the design document so the documented format and the loader cannot drift apart.
  const text = `format: opgate-circuit/1
name: line-driver            # identifier, unique in a repository
description: Emitter-follower buffer for the sensor line
temperature: 25 °C           # nominal ambient; default 25 °C
ground: gnd                  # name of the reference node; default gnd
parameters:                  # named values usable in "=" expressions
  rLoad: 2k2
models:
  small-npn:
    kind: npn
    beta: { min: 100, typ: 200, max: 300 }
    saturationCurrent: 1e-14 A
    earlyVoltage: 90 V       # omit for no Early effect
    saturationEdge: 0.3 V    # VCE at the edge of saturation, for headroom
components:
  - { id: VCC, kind: voltage-source, pins: { plus: vcc, minus: gnd }, voltage: 12 V, tolerance: 5% }
  - { id: VIN, kind: voltage-source, pins: { plus: in, minus: gnd }, voltage: 0 }
  - { id: R1, kind: resistor, pins: [vcc, b], value: 47k, tolerance: 1%, powerRating: 0.125 W }
  - { id: R2, kind: resistor, pins: [b, gnd], value: 68k, tolerance: 1%, package: "0603" }
  - { id: C1, kind: capacitor, pins: [in, b], value: 10u, voltageRating: 25 V }
  - { id: Q1, kind: npn, model: small-npn, pins: { collector: vcc, base: b, emitter: out } }
  - { id: RL, kind: resistor, pins: [out, gnd], value: "= rLoad" }
specs:
  gains:
    - { name: buffer, input: VIN, output: out, target: 0.98, tolerance: 3% }
  band: { low: 20 Hz, high: 20 kHz }
  supplies:
    - { source: VCC, maxCurrent: 6 mA }
  devices:
    Q1: { region: active, minCurrent: 1 mA, maxCurrent: 5 mA }
`;
  it("loads, with every value in SI base units", () => {
    const c = load(text);
    expect(c.name).toBe("line-driver");
    expect(c.nodes).toEqual(["b", "in", "out", "vcc"]);
    const byId = new Map(c.components.map((x) => [x.id, x]));
    const vcc = byId.get("VCC");
    expect(vcc?.kind === "voltage-source" && vcc.voltage.min).toBeCloseTo(11.4, 12);
    const r1 = byId.get("R1");
    expect(r1?.kind === "resistor" && r1.powerRating).toBe(0.125);
    const c1 = byId.get("C1");
    expect(c1?.kind === "capacitor" && c1.value.nominal).toBeCloseTo(10e-6, 15);
    expect((byId.get("RL") as Resistor).value.nominal).toBe(2200);
    const m = c.models.get("small-npn") as BjtModel;
    expect(m.earlyVoltage.typ).toBe(90);
    expect(c.specs.gains[0]!.window.min).toBeCloseTo(0.9506, 12);
    expect(c.specs.supplies[0]!.maxCurrent).toBeCloseTo(6e-3, 15);
    expect(c.specs.devices[0]).toMatchObject({ device: "Q1", region: "active", minCurrent: 1e-3, maxCurrent: 5e-3 });
    expect(c.specs.band).toMatchObject({ low: 20, high: 20e3 });
  });
});

describe("component role (load / coil)", () => {
  it("reads role and the coil's must-operate values in SI", () => {
    const c = load(yaml(`${VCC}  - { id: K1, kind: resistor, pins: [vcc, gnd], value: 400, role: coil, mustOperateCurrent: 22 mA, mustOperateVoltage: 9 V }\n  - { id: RH, kind: resistor, pins: [vcc, gnd], value: 47, role: load }\n`));
    const k1 = c.components.find((x) => x.id === "K1") as Resistor;
    expect(k1.role).toBe("coil");
    expect(k1.mustOperateCurrent).toBeCloseTo(0.022, 15);
    expect(k1.mustOperateVoltage).toBe(9);
    expect((c.components.find((x) => x.id === "RH") as Resistor).role).toBe("load");
  });
  it("refuses a must-operate value on a resistor not marked as a coil, at the key's line", () => {
    const errs = errorsOf(yaml(`${VCC}  - { id: K1, kind: resistor, pins: [vcc, gnd], value: 400,\n      mustOperateCurrent: 22 mA }\n`));
    expect(errs[0]).toMatchObject({ line: 6, message: expect.stringContaining("not marked as one"), hint: expect.stringContaining("role: coil") });
  });
  it("refuses an unknown role through the schema", () => {
    const errs = errorsOf(yaml(`${VCC}  - { id: K1, kind: resistor, pins: [vcc, gnd], value: 400, role: relay }\n`));
    expect(errs[0]!.line).toBe(5);
  });
});
