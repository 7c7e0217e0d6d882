// Zener (reverse breakdown) and LED (forward voltage at a test current) diodes, loaded from
// circuit text the way a board file writes them, solved, and checked against closed forms.
import { describe, expect, it } from "vitest";
import { loadCircuitText } from "../../src/circuit/index.js";
import type { Circuit } from "../../src/circuit/types.js";
import { MODEL_TEMPERATURE, thermalVoltage } from "../../src/devices/thermal.js";
import { solveOperatingPoint } from "../../src/solve/index.js";
import type { BjtPoint, DiodePoint, OperatingPoint } from "../../src/solve/types.js";
import { kclError } from "./kcl.js";
import { lambertWOfExp } from "./lambert-w.js";

/** Loads circuit text, at the temperature model parameters are given at (so VT is the datasheet's). */
function load(body: string, temperature = MODEL_TEMPERATURE): Circuit {
  const r = loadCircuitText(`format: opgate-circuit/1\nname: t\n${body}`, "t.yaml");
  if (!r.ok) throw new Error(r.errors.map((e) => `${e.line}:${e.column} ${e.message}`).join("\n"));
  return { ...r.circuit, temperature };
}

function solve(c: Circuit): OperatingPoint {
  const r = solveOperatingPoint(c);
  if (!r.ok) throw new Error(r.reason);
  return r;
}

const VT = thermalVoltage(MODEL_TEMPERATURE);
// A 5.1 V reference Zener as a datasheet states it (invented Tidewater part values).
const VZ = 5.1;
const IZT = 5e-3;
const ZZT = 10;
const ZENER = `  z5v1: { kind: diode, saturationCurrent: 1 nA, breakdown: { voltage: 5.1 V, current: 5 mA, resistance: 10 Ω } }\n`;

/**
 * The textbook piecewise-linear Zener model: V = VZ0 + rz·IZ with rz = ZZT and VZ0 chosen so the
 * line passes through the datasheet point, VZ0 = VZ − rz·IZT (Sedra & Smith, Zener diode model).
 */
const VZ0 = VZ - ZZT * IZT;

describe("Zener breakdown", () => {
  it("at its test current the Zener sits exactly at VZ with the dynamic resistance ZZT", () => {
    // A current source forces IZT into the cathode: the datasheet's own test condition.
    const c = load(`models:\n${ZENER}components:\n  - { id: I1, kind: current-source, pins: { from: gnd, to: k }, current: 5 mA }\n  - { id: D1, kind: diode, model: z5v1, pins: { anode: gnd, cathode: k } }\n`);
    const op = solve(c);
    const d = op.devices.D1 as DiodePoint;
    // The junction's own reverse saturation current (1 nA) takes 1 nA of the 5 mA: 10 nV lower.
    expect(op.nodes.k).toBeCloseTo(VZ, 7);
    expect(d.current).toBeCloseTo(-IZT, 12);
    expect(d.dynamicResistance).toBeCloseTo(ZZT, 6);
  });

  for (const [vs, r] of [
    [12, 1000],
    [9, 470],
    [24, 2200],
    [48, 1500],
  ] as const) {
    it(`a clamp from ${vs} V through ${r} Ω matches the piecewise-linear closed form`, () => {
      const c = load(`models:\n${ZENER}components:\n  - { id: V1, kind: voltage-source, pins: { plus: s, minus: gnd }, voltage: ${vs} V }\n  - { id: R1, kind: resistor, pins: [s, k], value: ${r} }\n  - { id: D1, kind: diode, model: z5v1, pins: { anode: gnd, cathode: k } }\n`);
      const op = solve(c);
      // Closed form of the loop: IZ = (VS − VZ0)/(R + rz), V = VZ0 + rz·IZ.
      const iz = (vs - VZ0) / (r + ZZT);
      const v = VZ0 + ZZT * iz;
      // The model rounds the line's corner (a softplus a few mV wide) and meets ZZT exactly at IZT,
      // so away from IZT it departs from the straight line by < 0.1 mV at these currents.
      expect(Math.abs(op.nodes.k! - v)).toBeLessThan(1e-4);
      expect(Math.abs((op.devices.D1 as DiodePoint).current + iz) / iz).toBeLessThan(1e-3);
      expect(kclError(c, op).worst).toBeLessThan(1e-9);
      expect(op.stats.iterations).toBeLessThan(60);
    });
  }

  it("below breakdown (3 V through 1 kΩ) it blocks: only leakage flows", () => {
    const c = load(`models:\n${ZENER}components:\n  - { id: V1, kind: voltage-source, pins: { plus: s, minus: gnd }, voltage: 3 V }\n  - { id: R1, kind: resistor, pins: [s, k], value: 1k }\n  - { id: D1, kind: diode, model: z5v1, pins: { anode: gnd, cathode: k } }\n`);
    const op = solve(c);
    expect(op.nodes.k).toBeCloseTo(3, 5);
    expect(Math.abs((op.devices.D1 as DiodePoint).current)).toBeLessThan(1e-8);
  });

  it("forward biased it is an ordinary diode (Shockley)", () => {
    const c = load(`models:\n${ZENER}components:\n  - { id: V1, kind: voltage-source, pins: { plus: s, minus: gnd }, voltage: 5 V }\n  - { id: R1, kind: resistor, pins: [s, a], value: 1k }\n  - { id: D1, kind: diode, model: z5v1, pins: { anode: a, cathode: gnd } }\n`);
    const op = solve(c);
    const d = op.devices.D1 as DiodePoint;
    expect(d.voltage).toBeCloseTo(VT * Math.log(d.current / 1e-9 + 1), 6);
  });

  it("a clamp straight from 200 V through 10 kΩ converges", () => {
    const c = load(`models:\n${ZENER}components:\n  - { id: V1, kind: voltage-source, pins: { plus: s, minus: gnd }, voltage: 200 V }\n  - { id: R1, kind: resistor, pins: [s, k], value: 10k }\n  - { id: D1, kind: diode, model: z5v1, pins: { anode: gnd, cathode: k } }\n`);
    const op = solve(c);
    const iz = (200 - VZ0) / (10000 + ZZT);
    expect(Math.abs(op.nodes.k! - (VZ0 + ZZT * iz))).toBeLessThan(1e-4);
  });

  it("its breakdown voltage drifts by the temperature coefficient", () => {
    const model = `  z: { kind: diode, saturationCurrent: 1 nA, breakdown: { voltage: 5.1 V, current: 5 mA, resistance: 10 Ω, temperatureCoefficient: 2 mV/K } }\n`;
    const body = `models:\n${model}components:\n  - { id: I1, kind: current-source, pins: { from: gnd, to: k }, current: 5 mA }\n  - { id: D1, kind: diode, model: z, pins: { anode: gnd, cathode: k } }\n`;
    const hot = solve(load(body, MODEL_TEMPERATURE + 50));
    // At +50 K the junction's reverse saturation current is ~0.7 µA of the 5 mA: ~7 µV lower.
    expect(hot.nodes.k).toBeCloseTo(5.1 + 50 * 0.002, 4);
  });

  it("a Zener-referenced emitter follower gives V_out = V_Z − V_BE", () => {
    // VCC 12 V, 1 kΩ into the Zener (its cathode is the base), NPN follower with 1 kΩ to ground.
    const beta = 200;
    const is = 1e-14;
    const c = load(
      `models:\n${ZENER}  q: { kind: npn, beta: ${beta}, saturationCurrent: ${is} A }\ncomponents:\n` +
        `  - { id: VCC, kind: voltage-source, pins: { plus: vcc, minus: gnd }, voltage: 12 V }\n` +
        `  - { id: RZ, kind: resistor, pins: [vcc, z], value: 1k }\n` +
        `  - { id: D1, kind: diode, model: z5v1, pins: { anode: gnd, cathode: z } }\n` +
        `  - { id: Q1, kind: npn, model: q, pins: { collector: vcc, base: z, emitter: out } }\n` +
        `  - { id: RE, kind: resistor, pins: [out, gnd], value: 1k }\n`,
    );
    const op = solve(c);
    // Closed form by fixed-point iteration of the textbook relations: V_out = V_Z − V_BE,
    // IE = V_out/RE, IC = β/(β+1)·IE, IB = IE/(β+1), V_BE = VT·ln(IC/IS + 1) (Shockley, forward
    // active), IZ = (VCC − V_Z)/RZ − IB, V_Z = VZ0 + rz·IZ (piecewise-linear Zener model).
    let vz = VZ;
    let vout = VZ - 0.65;
    for (let k = 0; k < 200; k++) {
      const ie = vout / 1000;
      const vbe = VT * Math.log(((beta / (beta + 1)) * ie) / is + 1);
      const iz = (12 - vz) / 1000 - ie / (beta + 1);
      vz = VZ0 + ZZT * iz;
      vout = vz - vbe;
    }
    expect(Math.abs(op.nodes.out! - vout)).toBeLessThan(1e-4);
    expect(Math.abs(op.nodes.z! - vz)).toBeLessThan(1e-4);
    const q = op.devices.Q1 as BjtPoint;
    expect(op.nodes.out).toBeCloseTo(op.nodes.z! - q.baseEmitterVoltage, 12);
  });
});

describe("LED in its datasheet form (forward voltage at a test current)", () => {
  // An invented Tidewater status LED: VF = 2.0 V at IF = 20 mA; ideality defaults to 2.
  const LED = `  red-led: { kind: diode, forward: { voltage: 2.0 V, current: 20 mA }, ratings: { forwardCurrent: 30 mA } }\n`;
  const driven = (vs: number, r: number) =>
    load(`models:\n${LED}components:\n  - { id: V1, kind: voltage-source, pins: { plus: s, minus: gnd }, voltage: ${vs} V }\n  - { id: R1, kind: resistor, pins: [s, a], value: ${r} }\n  - { id: D1, kind: diode, model: red-led, pins: { anode: a, cathode: gnd } }\n`);

  it("through the resistor the datasheet's own sizing gives, it carries exactly IF", () => {
    // Datasheet sizing: R = (VS − VF)/IF = (5 − 2)/20 mA = 150 Ω; at I = IF the LED drops exactly VF.
    const op = solve(driven(5, 150));
    expect((op.devices.D1 as DiodePoint).current).toBeCloseTo(0.02, 9);
    expect((op.devices.D1 as DiodePoint).voltage).toBeCloseTo(2.0, 7);
  });

  for (const [vs, r] of [
    [3.3, 68],
    [12, 1000],
    [5, 330],
  ] as const) {
    it(`from ${vs} V through ${r} Ω: the exponential closed form around the datasheet point`, () => {
      // VS = I·R + VF + n·VT·ln(I/IF)  ⇒  I = (n·VT/R)·W((IF·R/(n·VT))·exp((VS − VF)/(n·VT)))
      // (Shockley referred to the datasheet point, solved by the Lambert W function).
      const nvt = 2 * VT;
      const exact = (nvt / r) * lambertWOfExp(Math.log((0.02 * r) / nvt) + (vs - 2) / nvt);
      const op = solve(driven(vs, r));
      const i = (op.devices.D1 as DiodePoint).current;
      expect(Math.abs(i / exact - 1)).toBeLessThan(1e-8);
      // The first-order estimate (VS − VF)/R is close where the current is near IF.
      if (vs === 3.3) expect(Math.abs(i - (vs - 2) / r) / i).toBeLessThan(0.05);
    });
  }

  it("ideality and a series resistance are honoured in the conversion", () => {
    const c = load(
      `models:\n  led: { kind: diode, forward: { voltage: 3.1 V, current: 20 mA }, ideality: 3.5, seriesResistance: 10 }\ncomponents:\n  - { id: I1, kind: current-source, pins: { from: gnd, to: a }, current: 20 mA }\n  - { id: D1, kind: diode, model: led, pins: { anode: a, cathode: gnd } }\n`,
    );
    expect(solve(c).nodes.a).toBeCloseTo(3.1, 8);
  });

  it("the forward voltage spread becomes a saturation-current spread (highest VF, lowest IS)", () => {
    const c = load(`models:\n  led: { kind: diode, forward: { voltage: { min: 1.8 V, typ: 2.0 V, max: 2.4 V }, current: 20 mA } }\ncomponents:\n  - { id: I1, kind: current-source, pins: { from: gnd, to: a }, current: 20 mA }\n  - { id: D1, kind: diode, model: led, pins: { anode: a, cathode: gnd } }\n`);
    const m = c.models.get("led")!;
    if (m.kind !== "diode") throw new Error("diode model expected");
    expect(m.saturationCurrent.min).toBeLessThan(m.saturationCurrent.typ);
    expect(0.02 / Math.expm1(2.4 / (2 * VT))).toBeCloseTo(m.saturationCurrent.min, 30);
    expect(m.ideality.typ).toBe(2);
  });
});

describe("model errors", () => {
  const errors = (model: string) => {
    const r = loadCircuitText(`format: opgate-circuit/1\nname: t\nmodels:\n  d: ${model}\ncomponents:\n  - { id: I1, kind: current-source, pins: { from: gnd, to: a }, current: 1 mA }\n  - { id: D1, kind: diode, model: d, pins: { anode: a, cathode: gnd } }\n`, "t.yaml");
    if (r.ok) throw new Error("expected errors");
    return r.errors;
  };
  it("a diode model with neither saturationCurrent nor forward is refused at the model's line", () => {
    expect(errors("{ kind: diode }")[0]).toMatchObject({ line: 4, message: expect.stringContaining("needs saturationCurrent or forward") });
  });
  it("both forms at once are refused", () => {
    expect(errors("{ kind: diode, saturationCurrent: 1 nA, forward: { voltage: 2 V, current: 20 mA } }")[0]!.message).toContain("both");
  });
  it("a breakdown without its dynamic resistance is refused by the schema", () => {
    expect(errors("{ kind: diode, saturationCurrent: 1 nA, breakdown: { voltage: 5.1 V, current: 5 mA } }")[0]!.line).toBe(4);
  });
  it("a zero dynamic resistance is refused with a hint", () => {
    expect(errors("{ kind: diode, saturationCurrent: 1 nA, breakdown: { voltage: 5.1 V, current: 5 mA, resistance: 0 } }")[0]!.hint).toContain("ZZT");
  });
});
