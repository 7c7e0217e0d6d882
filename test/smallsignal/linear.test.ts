// Small-signal solves of linear circuits (no transistors), with operating points built by hand:
// RC corners, divider impedances, controlled-source conventions, midband views, singular networks.

import { describe, expect, it } from "vitest";
import { analyseSmallSignal, sweepGain } from "../../src/smallsignal/index.js";
import { circuit, linearOp, relErr } from "./build.js";

const op = linearOp();

describe("RC corners", () => {
  it("single-pole RC low-pass: −3 dB at 1/(2πRC) to 0.1% (handbook formula)", () => {
    const R = 4.7e3;
    const C = 10e-9;
    const fc = 1 / (2 * Math.PI * R * C); // ≈ 3386 Hz
    const c = circuit("tide-gauge-filter").vsource("VIN", "in", "gnd", 0, 1).resistor("R1", "in", "out", R).capacitor("C1", "out", "gnd", C).gain("lp", "VIN", "out").build();
    const s = sweepGain(c, op, "lp", { start: 1, stop: 1e6, points: 61 });
    expect(s.error).toBeUndefined();
    // Flat-band midband: C1 sets the upper edge, so it is open there and the gain is 1 (issue 14:
    // a plain RC low-pass has the gain 1 at midband); the corner is relative to it.
    expect(s.midband).toBe(1);
    expect(s.reference).toBe(1);
    expect(s.lowCorner).toBeNull();
    expect(relErr(s.highCorner as number, fc)).toBeLessThan(1e-3);
    // Closed form |H| = 1/√(1+(f/fc)²) at every sweep point (handbook formula).
    for (const p of s.points) expect(relErr(p.magnitude, 1 / Math.sqrt(1 + (p.frequency / fc) ** 2))).toBeLessThan(1e-12);
    // Phase −atan(f/fc) (handbook formula).
    const mid = s.points[30]!;
    expect(mid.phaseDeg).toBeCloseTo((-Math.atan(mid.frequency / fc) * 180) / Math.PI, 9);
  });

  it("coupling capacitor into an input resistance: high-pass corner 1/(2πRC) to 0.1% (handbook formula)", () => {
    const C = 1e-6;
    const R = 22e3;
    const fc = 1 / (2 * Math.PI * R * C); // ≈ 7.23 Hz
    const c = circuit("soil-probe-coupling").vsource("VIN", "in", "gnd", 0, 1).capacitor("C1", "in", "b", C).resistor("RIN", "b", "gnd", R).gain("hp", "VIN", "b").band(20, 20e3).build();
    const s = sweepGain(c, op, "hp", { start: 0.01, stop: 1e5, points: 71 });
    expect(s.midband).toBeCloseTo(1, 15);
    expect(relErr(s.lowCorner as number, fc)).toBeLessThan(1e-3);
    expect(s.highCorner).toBeNull();
    const r = analyseSmallSignal(c, op);
    expect(r.errors).toEqual([]);
    const g = r.gains[0]!;
    expect(g.midband).toBeCloseTo(1, 15);
    // At band.low: H = jωRC/(1 + jωRC) (handbook formula).
    const w = 2 * Math.PI * 20 * R * C;
    const low = g.points[0]!;
    expect(low.frequency).toBe(20);
    expect(relErr(low.re, (w * w) / (1 + w * w))).toBeLessThan(1e-12);
    expect(relErr(low.im, w / (1 + w * w))).toBeLessThan(1e-12);
    expect(g.points.map((p) => p.frequency)).toEqual([20, 20e3]);
    expect(g.inputImpedance).toBeCloseTo(R, 6); // capacitor short at midband
  });

  it("series RL low-pass corner R/(2πL), inductor open at midband (handbook formula)", () => {
    const L = 10e-3;
    const R = 1e3;
    const fc = R / (2 * Math.PI * L);
    const c = circuit("wind-vane-choke").vsource("VIN", "in", "gnd", 0, 1).resistor("R1", "x", "gnd", R).inductor("L1", "in", "x", L, 0).gain("rl", "VIN", "x").build();
    const s = sweepGain(c, op, "rl", { start: 10, stop: 1e7, points: 61 });
    expect(s.midband).toBe(0); // choke open at midband
    expect(relErr(s.highCorner as number, fc)).toBeLessThan(1e-3);
    // Winding resistance divides at low frequency: |H(f→0)| = R/(R + Rs) (Ohm's law).
    const c2 = circuit("choke-r").vsource("VIN", "in", "gnd", 0, 1).resistor("R1", "x", "gnd", R).inductor("L1", "in", "x", L, 100).gain("rl", "VIN", "x").build();
    const s2 = sweepGain(c2, op, "rl", { start: 1e-3, stop: 1e-2, points: 2 });
    expect(relErr(s2.points[0]!.magnitude, R / (R + 100))).toBeLessThan(1e-9);
  });
});

describe("impedances by the test-source method", () => {
  const R1 = 47e3;
  const R2 = 68e3;
  const divider = () => circuit("gauge-divider").vsource("VIN", "in", "gnd", 0, 0.5).resistor("R1", "in", "mid", R1).resistor("R2", "mid", "gnd", R2).gain("div", "VIN", "mid");

  it("divider: gain R2/(R1+R2), input R1+R2, output Thevenin R1‖R2 (Ohm's law, Thevenin's theorem)", () => {
    const r = analyseSmallSignal(divider().build(), op);
    const g = r.gains[0]!;
    expect(relErr(g.midband, R2 / (R1 + R2))).toBeLessThan(1e-14);
    expect(relErr(g.inputImpedance, R1 + R2)).toBeLessThan(1e-14);
    expect(relErr(g.outputImpedance, (R1 * R2) / (R1 + R2))).toBeLessThan(1e-14);
    expect(g.judged).toBe(g.midband);
    expect(g.db).toBeCloseTo(20 * Math.log10(R2 / (R1 + R2)), 12);
  });

  it("a source's signal amplitude never scales the gain: with 0.5 V, 2 V or no signal the divider gives R2/(R1+R2) (gain is per unit of input)", () => {
    const gainWith = (signal?: number) =>
      analyseSmallSignal(circuit("gauge-divider").vsource("VIN", "in", "gnd", 0, signal).resistor("R1", "in", "mid", R1).resistor("R2", "mid", "gnd", R2).gain("div", "VIN", "mid").build(), op).gains[0]!.midband;
    expect(gainWith(0.5)).toBe(gainWith(undefined));
    expect(gainWith(2)).toBe(gainWith(undefined));
    expect(relErr(gainWith(2), R2 / (R1 + R2))).toBeLessThan(1e-14);
  });

  it("current-source input: gain in V/A is the transresistance, input impedance V/I across it (Ohm's law)", () => {
    const c = circuit("probe-current").isource("IIN", "gnd", "x", 1e-3, 2e-6).resistor("R1", "x", "gnd", 10e3).resistor("R2", "x", "y", 5e3).resistor("R3", "y", "gnd", 5e3).gain("z", "IIN", "y").build();
    const g = analyseSmallSignal(c, op).gains[0]!;
    const rin = (10e3 * 10e3) / (20e3); // R1 ‖ (R2 + R3)
    expect(relErr(g.inputImpedance, rin)).toBeLessThan(1e-14);
    expect(relErr(g.midband, rin / 2)).toBeLessThan(1e-14); // half of V(x) reaches y
    // Output impedance with the current input open: R3 ‖ (R2 + R1).
    expect(relErr(g.outputImpedance, (5e3 * 15e3) / 20e3)).toBeLessThan(1e-14);
  });

  it("a differential output (plus, minus) is V(plus) − V(minus) (DESIGN.md gain definition)", () => {
    const c = circuit("bridge").vsource("VIN", "in", "gnd", 0, 1).resistor("RA", "in", "p", 1e3).resistor("RB", "p", "gnd", 3e3).resistor("RC", "in", "m", 3e3).resistor("RD", "m", "gnd", 1e3).gain("bridge", "VIN", "p", "m").build();
    const g = analyseSmallSignal(c, op).gains[0]!;
    expect(g.midband).toBeCloseTo(0.75 - 0.25, 14);
    expect(g.outputImpedance).toBeCloseTo(2 * 750, 9); // two 1k‖3k arms in series
  });
});

describe("controlled sources follow the conventions of src/circuit/types.ts", () => {
  it("vcvs: V(plus) − V(minus) = gain·Vc", () => {
    const c = circuit("e").vsource("VIN", "in", "gnd", 0, 1).resistor("R0", "in", "gnd", 1e3).vcvs("E1", "out", "gnd", "in", "gnd", -7).resistor("RL", "out", "gnd", 1e3).gain("e", "VIN", "out").build();
    const g = analyseSmallSignal(c, op).gains[0]!;
    expect(g.midband).toBe(-7);
    expect(g.outputImpedance).toBeCloseTo(0, 12);
  });
  it("vccs: gain·Vc flows into node plus", () => {
    const c = circuit("g").vsource("VIN", "in", "gnd", 0, 1).vccs("G1", "out", "gnd", "in", "gnd", 2e-3).resistor("RL", "out", "gnd", 1e3).gain("g", "VIN", "out").build();
    expect(analyseSmallSignal(c, op).gains[0]!.midband).toBeCloseTo(2, 12);
  });
  it("cccs and ccvs: controlled by the current through the sensed part, first pin to second", () => {
    // R0 carries 1 V / 1 kΩ = 1 mA from in to gnd; VIN carries −1 mA plus → minus (it delivers 1 mA).
    const f = circuit("f").vsource("VIN", "in", "gnd", 0, 1).resistor("R0", "in", "gnd", 1e3).cccs("F1", "out", "gnd", "R0", 10).resistor("RL", "out", "gnd", 1e3).gain("f", "VIN", "out").build();
    expect(analyseSmallSignal(f, op).gains[0]!.midband).toBeCloseTo(10, 12);
    const h = circuit("h").vsource("VIN", "in", "gnd", 0, 1).resistor("R0", "in", "gnd", 1e3).ccvs("H1", "out", "gnd", "VIN", 500).resistor("RL", "out", "gnd", 1e3).gain("h", "VIN", "out").build();
    expect(analyseSmallSignal(h, op).gains[0]!.midband).toBeCloseTo(-0.5, 12);
    const hr = circuit("hr").vsource("VIN", "in", "gnd", 0, 1).resistor("R0", "in", "gnd", 2e3).ccvs("H1", "out", "gnd", "R0", 500).resistor("RL", "out", "gnd", 1e3).gain("h", "VIN", "out").build();
    expect(analyseSmallSignal(hr, op).gains[0]!.midband).toBeCloseTo(0.25, 12);
  });

  it("sense a capacitor: jωC·V at a frequency; an inductor: V/(R + jωL) (impedance of C and L, handbook formulas)", () => {
    const f0 = 1e3;
    const w = 2 * Math.PI * f0;
    const cap = circuit("fc").vsource("VIN", "in", "gnd", 0, 1).capacitor("C1", "in", "gnd", 1e-6).cccs("F1", "out", "gnd", "C1", 10).resistor("RL", "out", "gnd", 1e3).gain("c", "VIN", "out", "gnd", f0).build();
    expect(relErr(Math.abs(analyseSmallSignal(cap, op).gains[0]!.judged), 10 * w * 1e-6 * 1e3)).toBeLessThan(1e-12);
    const ind = circuit("fl").vsource("VIN", "in", "gnd", 0, 1).inductor("L1", "in", "gnd", 10e-3, 50).ccvs("H1", "out", "gnd", "L1", 100).resistor("RL", "out", "gnd", 1e3).gain("l", "VIN", "out", "gnd", f0).build();
    const g = analyseSmallSignal(ind, op).gains[0]!;
    expect(relErr(g.judged, 100 / Math.hypot(50, w * 10e-3))).toBeLessThan(1e-12); // real part > 0
    // At midband the inductor is open: no current, no output.
    expect(g.midband).toBeCloseTo(0, 15);
  });

  it("sense the gain's own current input: the drive is its current; any other current source is zeroed", () => {
    const c = circuit("fi").isource("I1", "gnd", "in", 0, 1e-6).resistor("R0", "in", "gnd", 1e3).cccs("F1", "out", "gnd", "I1", 3).resistor("RL", "out", "gnd", 2e3)
      .isource("I2", "gnd", "z", 1e-3).resistor("RZ", "z", "gnd", 1e3).ccvs("H2", "out2", "gnd", "I2", 100).resistor("R2", "out2", "gnd", 1e3)
      .gain("fi", "I1", "out").gain("zero", "I1", "out2").build();
    const r = analyseSmallSignal(c, op);
    expect(r.gains[0]!.midband).toBeCloseTo(3 * 2e3, 9); // V/A: 3·1 A into 2 kΩ
    expect(r.gains[1]!.midband).toBe(0);
  });
});

describe("midband view and frequency points", () => {
  it("a bypass capacitor across a supply does not make the midband view singular", () => {
    const c = circuit("decoupled").vsource("VCC", "vcc", "gnd", 5).capacitor("CD", "vcc", "gnd", 100e-9).capacitor("CD2", "vcc", "gnd", 10e-6)
      .vsource("VIN", "in", "gnd", 0, 1).resistor("R1", "in", "out", 1e3).resistor("R2", "out", "vcc", 1e3).gain("half", "VIN", "out").build();
    const r = analyseSmallSignal(c, op);
    expect(r.errors).toEqual([]);
    expect(r.gains[0]!.midband).toBeCloseTo(0.5, 14);
  });

  it("judged uses the spec's own frequency, signed by the midband gain (not by the real part); points are ascending", () => {
    const R = 1e3;
    const C = 1e-6;
    const c = circuit("lp-at-f").vsource("VIN", "in", "gnd", 0, 1).resistor("R1", "in", "x", R).capacitor("C1", "x", "gnd", C).vcvs("E1", "out", "gnd", "x", "gnd", -2).gain("inv", "VIN", "out", "gnd", 100).band(10, 1e4).build();
    const g = analyseSmallSignal(c, op).gains[0]!;
    expect(g.points.map((p) => p.frequency)).toEqual([10, 100, 1e4]);
    const w = 2 * Math.PI * 100 * R * C;
    expect(relErr(g.judged, -2 / Math.sqrt(1 + w * w))).toBeLessThan(1e-12); // |−2/(1+jωRC)|, inverting
    expect(g.midband).toBeCloseTo(-2, 15); // flat band: C1 sets the upper edge and is open
    expect(g.everyCapacitorShort).toBeCloseTo(0, 15); // the hand-analysis reference shorts it
    expect(g.openAtMidband).toEqual(["C1"]);
  });
});

describe("bad networks give errors, never NaN", () => {
  it("a node left floating at midband is named", () => {
    // `iso` reaches the rest only through a choke, which is open at midband.
    const c = circuit("floating").vsource("VIN", "in", "gnd", 0, 1).resistor("R1", "in", "out", 1e3).resistor("R2", "out", "gnd", 1e3).inductor("L1", "out", "iso", 1e-3).isource("I1", "gnd", "iso", 0).gain("g", "VIN", "out").build();
    const r = analyseSmallSignal(c, op);
    expect(r.gains).toEqual([]);
    expect(r.errors).toHaveLength(1);
    expect(r.errors[0]!.gain).toBe("g");
    expect(r.errors[0]!.message).toMatch(/node `iso`/);
    expect(r.errors[0]!.message).toMatch(/midband/);
  });

  it("an unknown input source and a non-source input are errors for that gain only", () => {
    const c = circuit("bad-inputs").vsource("VIN", "in", "gnd", 0, 1).resistor("R1", "in", "out", 1e3).resistor("R2", "out", "gnd", 1e3)
      .gain("good", "VIN", "out").gain("nosuch", "VX", "out").gain("resistor", "R1", "out").build();
    const r = analyseSmallSignal(c, op);
    expect(r.gains.map((g) => g.name)).toEqual(["good"]);
    expect(r.errors.map((e) => e.gain)).toEqual(["nosuch", "resistor"]);
  });

  it("a transistor without a linearised record is reported, not guessed", () => {
    const c = circuit("no-op").vsource("VIN", "in", "gnd", 0, 1).resistor("R1", "in", "out", 1e3).diode("D1", "out", "gnd", "d").gain("g", "VIN", "out").build();
    const r = analyseSmallSignal(c, op);
    expect(r.errors[0]!.message).toMatch(/D1/);
  });

  it("sweep arguments are checked", () => {
    const c = circuit("s").vsource("VIN", "in", "gnd", 0, 1).resistor("R1", "in", "gnd", 1e3).gain("g", "VIN", "in").build();
    expect(sweepGain(c, op, "g", { start: 0, stop: 10, points: 10 }).error).toMatch(/start/);
    expect(sweepGain(c, op, "g", { start: 1, stop: 10, points: 1 }).error).toMatch(/2 points/);
    expect(sweepGain(c, op, "nope", { start: 1, stop: 10, points: 10 }).error).toMatch(/known: g/);
  });
});

describe("sweep reference and singular loops", () => {
  it("band-pass (coupling C, buffer, load C): both corners to 0.1% with the midband view degenerate (handbook formulas)", () => {
    const R1 = 10e3;
    const C1 = 1e-6; // f1 = 15.9 Hz
    const R2 = 100;
    const C2 = 100e-12; // f2 = 15.9 MHz: 1e6 above f1, so the poles interact by ~1e-6 only
    const c = circuit("vane-bandpass")
      .vsource("VIN", "in", "gnd", 0, 1)
      .capacitor("C1", "in", "x", C1)
      .resistor("R1", "x", "gnd", R1)
      .vcvs("E1", "y", "gnd", "x", "gnd", 1)
      .resistor("R2", "y", "out", R2)
      .capacitor("C2", "out", "gnd", C2)
      .gain("bp", "VIN", "out")
      .build();
    const s = sweepGain(c, op, "bp", { start: 0.1, stop: 1e10, points: 111 });
    expect(s.midband).toBe(1); // flat band: C1 short, C2 open
    expect(s.reference).toBe(1);
    expect(relErr(s.lowCorner as number, 1 / (2 * Math.PI * R1 * C1))).toBeLessThan(1e-3);
    expect(relErr(s.highCorner as number, 1 / (2 * Math.PI * R2 * C2))).toBeLessThan(1e-3);
  });

  it("two voltage sources across the same nodes: singular, reported with the branch at fault", () => {
    const c = circuit("parallel-sources").vsource("VIN", "in", "gnd", 0, 1).vsource("V2", "in", "gnd", 0).resistor("R1", "in", "gnd", 1e3).gain("g", "VIN", "in").build();
    const r = analyseSmallSignal(c, op);
    expect(r.gains).toEqual([]);
    expect(r.errors[0]!.message).toMatch(/singular at midband .* branch current of (VIN|V2)/);
    const s = sweepGain(c, op, "g", { start: 1, stop: 10, points: 3 });
    expect(s.error).toMatch(/singular at 1 Hz/);
    expect(s.points).toEqual([]);
  });

  it("capacitors joining the input's pins at midband: an error for that gain; the sweep still runs", () => {
    const c = circuit("cap-divider").vsource("VIN", "in", "gnd", 0, 1).capacitor("C1", "in", "x", 1e-9).capacitor("C2", "x", "gnd", 1e-9).gain("g", "VIN", "x").build();
    const r = analyseSmallSignal(c, op);
    expect(r.gains).toEqual([]);
    expect(r.errors[0]!.message).toMatch(/joins the two pins of input `VIN`/);
    // Capacitive divider C1/(C1 + C2) = 0.5 at every frequency above 0 (handbook formula).
    const s = sweepGain(c, op, "g", { start: 1, stop: 1e6, points: 4 });
    expect(s.midband).toBeNull();
    for (const p of s.points) expect(p.magnitude).toBeCloseTo(0.5, 12);
  });

  it("a decoupling capacitor across the input source itself is harmless", () => {
    const c = circuit("input-decoupled").vsource("VIN", "in", "gnd", 0, 1).capacitor("C1", "in", "gnd", 1e-9).resistor("R1", "in", "out", 1e3).resistor("R2", "out", "gnd", 3e3).gain("g", "VIN", "out").build();
    const r = analyseSmallSignal(c, op);
    // C1 straight across VIN: the ideal source wins at every frequency, so at midband too.
    expect(r.errors).toEqual([]);
    expect(r.gains[0]!.midband).toBeCloseTo(0.75, 14);
    // Across VIN through the zeroed supply (C from `in` to vcc, VCC to ground): the same.
    const c2 = circuit("input-to-rail").vsource("VCC", "vcc", "gnd", 5).vsource("VIN", "in", "gnd", 0, 1).capacitor("C1", "in", "vcc", 1e-9).resistor("R1", "in", "out", 1e3).resistor("R2", "out", "vcc", 3e3).gain("g", "VIN", "out").build();
    expect(analyseSmallSignal(c2, op).gains[0]!.midband).toBeCloseTo(0.75, 14);
  });
});
