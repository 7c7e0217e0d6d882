// Physical constants and temperature laws of the device models.
import { describe, expect, it } from "vitest";
import { BOLTZMANN, ELEMENTARY_CHARGE, MODEL_TEMPERATURE, saturationCurrentAt, thermalVoltage } from "../../src/devices/thermal.js";

describe("thermal voltage and temperature laws", () => {
  it("uses the exact CODATA 2018 / SI 2019 values of k and q", () => {
    expect(BOLTZMANN).toBe(1.380649e-23); // CODATA 2018, exact
    expect(ELEMENTARY_CHARGE).toBe(1.602176634e-19); // CODATA 2018, exact
  });
  it("VT ≈ 25.85 mV at 300 K (common practice, from CODATA k and q)", () => {
    expect(thermalVoltage(300)).toBeCloseTo(0.02585, 5);
    expect(thermalVoltage(300)).toBeCloseTo((1.380649e-23 * 300) / 1.602176634e-19, 18);
  });
  it("IS(T) is unchanged at the model temperature and rises about 15–20 %/K near room temperature (common practice)", () => {
    expect(saturationCurrentAt(1e-14, MODEL_TEMPERATURE, 1.11, 3)).toBe(1e-14);
    const r = saturationCurrentAt(1e-14, MODEL_TEMPERATURE + 1, 1.11, 3) / 1e-14;
    expect(r).toBeGreaterThan(1.12);
    expect(r).toBeLessThan(1.2);
  });
});
