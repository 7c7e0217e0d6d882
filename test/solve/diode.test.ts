// Diode circuits against exact solutions (Lambert W) and symmetry; hard cases that need limiting.
import { describe, expect, it } from "vitest";
import { thermalVoltage } from "../../src/devices/thermal.js";
import { solveOperatingPoint } from "../../src/solve/index.js";
import type { DiodePoint, OperatingPoint, SolveResult } from "../../src/solve/types.js";
import { circuit } from "./build.js";
import { kclError } from "./kcl.js";
import { diodeResistorCurrent, lambertWOfExp } from "./lambert-w.js";

function solved(r: SolveResult): OperatingPoint {
  if (!r.ok) throw new Error(r.reason);
  return r;
}

const T = 298.15;
const VT = thermalVoltage(T);
/**
 * The model puts 1e-12 S across every junction (JUNCTION_LEAK_CONDUCTANCE); at ~0.7 V that is
 * < 1 pA beside mA-level currents, so a relative agreement of 1e-8 with the leak-free closed form
 * leaves ample room for it and none for a wrong equation.
 */
const REL = 1e-8;

describe("Lambert W reference", () => {
  it("satisfies w·e^w = x (definition)", () => {
    for (const x of [1e-6, 0.1, 1, Math.E, 10, 1e6]) {
      const w = lambertWOfExp(Math.log(x));
      expect(Math.abs((w * Math.exp(w)) / x - 1)).toBeLessThan(1e-14);
    }
    expect(lambertWOfExp(1)).toBeCloseTo(1, 15); // W(e) = 1 (definition)
  });
});

describe("diode and resistor", () => {
  for (const [v, r, is, n] of [
    [5, 1000, 1e-14, 1],
    [1, 100, 1e-12, 1.8],
    [12, 4700, 2.5e-9, 2],
    [0.8, 10, 1e-14, 1],
  ] as const) {
    it(`${v} V, ${r} Ω, IS ${is} A, n ${n}: current equals the Lambert-W closed form`, () => {
      const c = circuit().diodeModel("d", { saturationCurrent: is, ideality: n }).v("V1", "a", "gnd", v).r("R1", "a", "k", r).d("D1", "k", "gnd", "d").build();
      const op = solved(solveOperatingPoint(c));
      const exact = diodeResistorCurrent(v, r, is, n * VT);
      const d = op.devices.D1 as DiodePoint;
      expect(Math.abs(d.current / exact - 1)).toBeLessThan(REL);
      expect(d.dynamicResistance).toBeCloseTo((n * VT) / (d.current + is), 6);
      expect(kclError(c, op).worst).toBeLessThan(1e-9);
    });
  }

  it("series resistance in the model adds to the loop resistance (Lambert W with R + Rs)", () => {
    const c = circuit().diodeModel("d", { saturationCurrent: 1e-14, seriesResistance: 25 }).v("V1", "a", "gnd", 3).r("R1", "a", "k", 100).d("D1", "k", "gnd", "d").build();
    const op = solved(solveOperatingPoint(c));
    const exact = diodeResistorCurrent(3, 125, 1e-14, VT);
    const d = op.devices.D1 as DiodePoint;
    expect(Math.abs(d.current / exact - 1)).toBeLessThan(REL);
    // vd is the terminal voltage (junction plus series drop); rd includes Rs.
    expect(d.voltage).toBeCloseTo(op.nodes.k!, 15);
    expect(d.dynamicResistance).toBeCloseTo(VT / (d.current + 1e-14) + 25, 6);
    expect(Object.keys(op.nodes).sort()).toEqual(["a", "gnd", "k"]);
  });

  it("20 V straight across a diode with 1 Ω converges (plain Newton would overflow exp without limiting)", () => {
    // Without limiting the first linear step puts ~20 V on the junction: exp(20/VT) = e^773 > 1.8e308.
    expect(Math.exp(20 / VT)).toBe(Infinity);
    const c = circuit().diodeModel("d").v("V1", "a", "gnd", 20).r("R1", "a", "k", 1).d("D1", "k", "gnd", "d").build();
    const r = solveOperatingPoint(c);
    const op = solved(r);
    const exact = diodeResistorCurrent(20, 1, 1e-14, VT);
    expect(Math.abs((op.devices.D1 as DiodePoint).current / exact - 1)).toBeLessThan(REL);
    expect(op.stats.iterations).toBeLessThan(50);
  });

  it("a stack of six forward diodes straight across a stiff 5 V source shares it equally (symmetry)", () => {
    const b = circuit().diodeModel("d").v("V1", "n0", "gnd", 5);
    for (let k = 0; k < 6; k++) b.d(`D${k + 1}`, `n${k}`, k === 5 ? "gnd" : `n${k + 1}`, "d");
    const c = b.build();
    const op = solved(solveOperatingPoint(c));
    const each = 5 / 6;
    const expected = 1e-14 * Math.expm1(each / VT) + 1e-12 * each;
    for (let k = 1; k <= 6; k++) {
      const d = op.devices[`D${k}`] as DiodePoint;
      expect(d.voltage).toBeCloseTo(each, 9);
      expect(Math.abs(d.current / expected - 1)).toBeLessThan(1e-7);
    }
    expect(kclError(c, op).worst).toBeLessThan(1e-9);
  });

  it("a reverse-biased diode passes −IS less the leakage (Shockley equation)", () => {
    const c = circuit().diodeModel("d", { saturationCurrent: 1e-9 }).v("V1", "a", "gnd", -5).r("R1", "a", "k", 1000).d("D1", "k", "gnd", "d").build();
    const op = solved(solveOperatingPoint(c));
    expect((op.devices.D1 as DiodePoint).current).toBeCloseTo(-1e-9 - 5e-12, 14);
  });
});

describe("textbook worked examples", () => {
  it("a silicon diode in series with 1 kΩ across 5 V carries about 4.3 mA (from memory: the usual first diode example, solved by iterating VD ≈ 0.7 V)", () => {
    const c = circuit().diodeModel("si", { saturationCurrent: 1e-14 }).v("V1", "a", "gnd", 5).r("R1", "a", "k", 1000).d("D1", "k", "gnd", "si").build();
    const op = solved(solveOperatingPoint(c));
    const d = op.devices.D1 as DiodePoint;
    // The iterative hand method converges to VD ≈ 0.68–0.72 V and I = (5 − VD)/1 kΩ ≈ 4.3 mA.
    expect(d.voltage).toBeGreaterThan(0.66);
    expect(d.voltage).toBeLessThan(0.74);
    expect(d.current / 4.3e-3).toBeCloseTo(1, 1);
    // and the solver's own point is self-consistent with Ohm's law on the resistor
    expect(Math.abs((5 - d.voltage) / 1000 - d.current)).toBeLessThan(1e-12);
  });
});
