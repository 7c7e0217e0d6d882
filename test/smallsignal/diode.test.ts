// A forward-biased diode as a small-signal resistance rd = n·VT/ID (+ series resistance):
// the Shockley equation's derivative (handbook formula), on a bias-current-fed attenuator.

import { describe, expect, it } from "vitest";
import type { DiodeModel } from "../../src/circuit/types.js";
import { solveOperatingPoint } from "../../src/solve/index.js";
import type { DiodePoint } from "../../src/solve/types.js";
import { analyseSmallSignal } from "../../src/smallsignal/index.js";
import { circuit, relErr } from "./build.js";
import { VT } from "./hand.js";

function diodeModel(seriesResistance: number): DiodeModel {
  const s = (v: number) => ({ min: v, typ: v, max: v });
  return {
    id: "clamp",
    kind: "diode",
    pos: { file: "test.yaml", line: 1, column: 1 },
    saturationCurrent: s(1e-14),
    ideality: s(1.8),
    seriesResistance,
    drift: { voltage: -0.002, current: 1e-3 },
  };
}

describe("diode attenuator", () => {
  it.each([0, 5])("gain rd/(R + rd) with rd = n·VT/ID + RS (RS = %d Ω)", (rs) => {
    const R = 10e3;
    const base = circuit("soil-probe-attenuator")
      .vsource("VIN", "in", "gnd", 0, 1)
      .capacitor("CIN", "in", "x", 10e-6)
      .resistor("R1", "x", "d", R)
      .resistor("RB", "vb", "d", 4.7e3)
      .vsource("VB", "vb", "gnd", 5)
      .diode("D1", "d", "gnd", "clamp")
      .gain("att", "VIN", "d")
      .build();
    const c = { ...base, models: new Map([["clamp", diodeModel(rs)]]) };
    const op = solveOperatingPoint(c);
    if (!op.ok) throw new Error(op.reason);
    const d = op.devices.D1 as DiodePoint;
    const g = analyseSmallSignal(c, op).gains[0]!;
    // With the tool's rd, R ∥ RB feeds rd: exact divider (Ohm's law), the 1e-12 S leak aside.
    const rdEff = (d.dynamicResistance * 4.7e3) / (d.dynamicResistance + 4.7e3);
    expect(relErr(g.midband, rdEff / (R + rdEff))).toBeLessThan(1e-7);
    // Hand: rd = n·VT/ID + RS with ID from the tool's bias current (Shockley derivative).
    const rdHand = (1.8 * VT) / d.current + rs;
    expect(relErr(d.dynamicResistance, rdHand)).toBeLessThan(1e-6);
    // Output impedance: rd ∥ R ∥ RB.
    expect(relErr(g.outputImpedance, 1 / (1 / d.dynamicResistance + 1 / R + 1 / 4.7e3))).toBeLessThan(1e-7);
  });
});
