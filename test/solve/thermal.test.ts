// Physical constants and temperature laws of the device models: the drifts a model states (as a
// datasheet gives them) are what the solved circuit shows.
import { describe, expect, it } from "vitest";
import { BOLTZMANN, ELEMENTARY_CHARGE, MODEL_TEMPERATURE, relativeDriftAt, saturationCurrentAt, thermalVoltage } from "../../src/devices/thermal.js";
import { solveOperatingPoint } from "../../src/solve/index.js";
import type { OperatingPoint, SolveResult } from "../../src/solve/types.js";
import { circuit } from "./build.js";

function solved(r: SolveResult): OperatingPoint {
  if (!r.ok) throw new Error(r.reason);
  return r;
}

const T0 = MODEL_TEMPERATURE;
/** Central difference step, K: small enough that the curvature of V(T) is far below 1 %. */
const DT = 1;

describe("thermal voltage and temperature laws", () => {
  it("uses the exact CODATA 2018 / SI 2019 values of k and q", () => {
    expect(BOLTZMANN).toBe(1.380649e-23); // CODATA 2018, exact
    expect(ELEMENTARY_CHARGE).toBe(1.602176634e-19); // CODATA 2018, exact
  });
  it("VT ≈ 25.85 mV at 300 K (common practice, from CODATA k and q)", () => {
    expect(thermalVoltage(300)).toBeCloseTo(0.02585, 5);
    expect(thermalVoltage(300)).toBeCloseTo((1.380649e-23 * 300) / 1.602176634e-19, 18);
  });
  it("IS(T) is unchanged at 25 °C and, for −2 mV/°C at 1 mA, rises about 15–20 %/K near room temperature (common practice)", () => {
    const drift = { voltage: -0.002, current: 1e-3 };
    expect(saturationCurrentAt(1e-14, T0, 1, drift)).toBe(1e-14);
    const r = saturationCurrentAt(1e-14, T0 + 1, 1, drift) / 1e-14;
    expect(r).toBeGreaterThan(1.12);
    expect(r).toBeLessThan(1.2);
  });
  it("a relative drift: (dx/dT)/x equals the stated %/°C", () => {
    const up = relativeDriftAt(200, T0 + DT, 0.005);
    const down = relativeDriftAt(200, T0 - DT, 0.005);
    expect(Math.abs((up - down) / (2 * DT) / 200 / 0.005 - 1)).toBeLessThan(1e-4);
  });
});

describe("stated drifts are what the solved circuit shows (to 1 %)", () => {
  it("a diode's forward voltage at its stated current drifts by forwardVoltageDrift", () => {
    for (const [drift, current, ideality, rs] of [
      [-0.002, 1e-3, 1, 0],
      [-0.0018, 10e-3, 1.8, 2],
      [-0.0025, 100e-6, 1, 0],
    ] as const) {
      const vf = (t: number): number => {
        // An ideal current source holds the stated current exactly.
        const c = circuit().at(t).diodeModel("d", { ideality, seriesResistance: rs, drift: { voltage: drift, current } }).i("I1", "gnd", "a", current).d("D1", "a", "gnd", "d").build();
        return solved(solveOperatingPoint(c)).nodes.a!;
      };
      const measured = (vf(T0 + DT) - vf(T0 - DT)) / (2 * DT);
      expect(Math.abs(measured / drift - 1)).toBeLessThan(0.01);
    }
  });

  it("a BJT's VBE at its stated collector current drifts by baseEmitterDrift", () => {
    const drift = -0.0021;
    const ic = 2e-3;
    // VBE that gives IC = ic at temperature t, VCE = 5 V: Newton on the solved circuit with
    // dVBE = VT·ln(ic/IC) (the exponential law), to 1e-12 relative.
    const vbeAt = (t: number): number => {
      let vbe = 0.65;
      for (let k = 0; k < 40; k++) {
        const c = circuit().at(t).bjtModel("n", "npn", { beta: 150, earlyVoltage: 80, drift: { voltage: drift, current: ic } }).v("VC", "c", "gnd", 5).v("VB", "b", "gnd", vbe).q("Q1", "npn", "c", "b", "gnd", "n").build();
        const got = (solved(solveOperatingPoint(c)).devices.Q1 as { collectorCurrent: number }).collectorCurrent;
        const step = thermalVoltage(t) * Math.log(ic / got);
        vbe += step;
        if (Math.abs(step) < 1e-13) break;
      }
      return vbe;
    };
    const measured = (vbeAt(T0 + DT) - vbeAt(T0 - DT)) / (2 * DT);
    expect(Math.abs(measured / drift - 1)).toBeLessThan(0.01);
  });

  it("a BJT's current gain drifts by betaDrift (%/°C)", () => {
    const gainAt = (t: number): number => {
      const c = circuit().at(t).bjtModel("n", "npn", { beta: 150, betaDrift: 0.007 }).v("VC", "c", "gnd", 5).i("IB", "gnd", "b", 10e-6).q("Q1", "npn", "c", "b", "gnd", "n").build();
      const q = solved(solveOperatingPoint(c)).devices.Q1 as { collectorCurrent: number; baseCurrent: number };
      return q.collectorCurrent / q.baseCurrent;
    };
    const measured = (gainAt(T0 + DT) - gainAt(T0 - DT)) / (2 * DT) / gainAt(T0);
    expect(Math.abs(measured / 0.007 - 1)).toBeLessThan(0.01);
  });
});
