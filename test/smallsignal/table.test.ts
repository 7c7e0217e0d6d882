// Text renderings for the command line: the device table, the gains table, the sweep table and
// its CSV, on small hand-checkable circuits.

import { describe, expect, it } from "vitest";
import { solveOperatingPoint } from "../../src/solve/index.js";
import type { OperatingPoint } from "../../src/solve/types.js";
import { analyseSmallSignal, defaultSweepRange, sweepGain } from "../../src/smallsignal/index.js";
import { formatSi, renderSmallSignal, renderSweep, sweepCsv } from "../../src/smallsignal/table.js";
import { bjtModel, circuit, linearOp } from "./build.js";

describe("formatSi", () => {
  it("uses SI prefixes (SI brochure) and marks open and missing values", () => {
    expect(formatSi(4700, "Ω")).toBe("4.7 kΩ");
    expect(formatSi(0.0386, "S")).toBe("38.6 mS");
    expect(formatSi(2.2e-6, "F")).toBe("2.2 µF");
    expect(formatSi(Infinity, "Ω")).toBe("∞ Ω");
    expect(formatSi(undefined, "Ω")).toBe("—");
    expect(formatSi(999.96, "Hz")).toBe("1 kHz");
  });
});

describe("renderSmallSignal", () => {
  it("lists device parameters and gains with window, impedances and band points", () => {
    const c = circuit("tide-gauge-stage")
      .vsource("VCC", "vcc", "gnd", 12)
      .vsource("VIN", "in", "gnd", 0, 1)
      .capacitor("CIN", "in", "b", 10e-6)
      .resistor("R1", "vcc", "b", 82e3)
      .resistor("R2", "b", "gnd", 15e3)
      .resistor("RC", "vcc", "c", 6.8e3)
      .resistor("RE", "e", "gnd", 1.5e3)
      .capacitor("CE", "e", "gnd", 100e-6)
      .bjt("Q1", bjtModel("tg-npn", "npn", { earlyVoltage: 90 }), "c", "b", "e")
      .gain("stage", "VIN", "c")
      .gain("broken", "NOPE", "c")
      .band(20, 20e3)
      .build();
    const op = solveOperatingPoint(c) as OperatingPoint;
    expect(op.ok).toBe(true);
    const result = analyseSmallSignal(c, op);
    const text = renderSmallSignal(c, op, result);
    const q = op.devices.Q1;
    if (q?.kind !== "npn") throw new Error("no Q1");
    expect(text).toContain("Q1");
    expect(text).toContain(formatSi(q.transconductance, "S"));
    expect(text).toContain(formatSi(q.inputResistance, "Ω"));
    expect(text).toContain(formatSi(q.outputResistance, "Ω"));
    const g = result.gains[0]!;
    expect(text).toContain(String(Number(g.midband.toPrecision(4))));
    expect(text).toContain(formatSi(g.inputImpedance, "Ω"));
    expect(text).toMatch(/stage at 20 Hz: .* V\/V at .*°.*20 kHz/);
    expect(text).toMatch(/broken: not computed: input `NOPE`/);
  });

  it("says so when there are no devices or gains", () => {
    const c = circuit("plain").vsource("V1", "a", "gnd", 1).resistor("R1", "a", "gnd", 1e3).build();
    const text = renderSmallSignal(c, linearOp(), analyseSmallSignal(c, linearOp()));
    expect(text).toContain("(no transistors or diodes)");
    expect(text).toContain("(no gains in specs.gains)");
  });
});

describe("sweep output", () => {
  const R = 10e3;
  const C = 1e-9;
  const c = circuit("vane-filter").vsource("VIN", "in", "gnd", 0, 1).resistor("R1", "in", "out", R).capacitor("C1", "out", "gnd", C).gain("lp", "VIN", "out").band(10, 1e4).build();
  const s = sweepGain(c, linearOp(), "lp", { start: 10, stop: 1e6, points: 5 });

  it("CSV has the header and one full-precision row per point", () => {
    const lines = sweepCsv(s).trimEnd().split("\n");
    expect(lines[0]).toBe("frequency_hz,magnitude,db,phase_deg,re,im");
    expect(lines).toHaveLength(6);
    const row = lines[3]!.split(",").map(Number);
    const p = s.points[2]!;
    expect(row).toEqual([p.frequency, p.magnitude, p.db, p.phaseDeg, p.re, p.im]);
    // 3.16 kHz on a 15.9 kHz RC: |H| = 1/√(1+(f/fc)²) (handbook formula).
    const fc = 1 / (2 * Math.PI * R * C);
    expect(row[0]).toBeCloseTo(10 ** 3.5, 6);
    expect(row[1]).toBeCloseTo(1 / Math.sqrt(1 + (row[0]! / fc) ** 2), 12);
  });

  it("the text table names both corners", () => {
    const text = renderSweep(s);
    expect(text).toContain("Frequency response of lp");
    expect(text).toMatch(/upper −3 dB: 15\.92 kHz/);
    expect(text).toMatch(/lower −3 dB: not inside the sweep/);
  });

  it("a failed sweep renders its reason", () => {
    expect(renderSweep(sweepGain(c, linearOp(), "nope", { start: 1, stop: 10, points: 3 }))).toMatch(/not computed: no gain named `nope`/);
  });

  it("the default range is the band ± two decades at 10 points per decade", () => {
    expect(defaultSweepRange(c)).toEqual({ start: 0.1, stop: 1e6, points: 71 });
    const noBand = circuit("x").vsource("V", "a", "gnd", 0).build();
    expect(defaultSweepRange(noBand)).toEqual({ start: 1, stop: 100e6, points: 81 });
  });
});
