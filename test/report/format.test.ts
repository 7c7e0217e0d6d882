// SI prefixes and number formatting of the human-facing reports.
// Prefix symbols and factors: SI Brochure, 9th edition (BIPM 2019), table 7.
import { describe, expect, it } from "vitest";
import { formatMargin, formatNumber, formatQuantity, measuredVsLimit } from "../../src/report/format.js";

describe("formatQuantity", () => {
  it("uses SI prefixes (SI Brochure table 7)", () => {
    expect(formatQuantity(6.8e-3, "A")).toBe("6.8 mA");
    expect(formatQuantity(6e-3, "A")).toBe("6 mA");
    expect(formatQuantity(4700, "Ω")).toBe("4.7 kΩ");
    expect(formatQuantity(2.2e-12, "F")).toBe("2.2 pF");
    expect(formatQuantity(10e-6, "F")).toBe("10 µF");
    expect(formatQuantity(1.5e6, "Ω")).toBe("1.5 MΩ");
    expect(formatQuantity(12, "V")).toBe("12 V");
    expect(formatQuantity(-0.25, "V")).toBe("-250 mV");
    expect(formatQuantity(3e-15, "A")).toBe("3 fA");
  });
  it("keeps the exponent of values beyond the prefix table", () => {
    // Below the smallest prefix the number itself carries an exponent; trimming zeros must not eat it.
    expect(formatQuantity(2.5e-25, "A")).not.toMatch(/e-1 /);
    expect(formatQuantity(2.5e-25, "A")).toMatch(/e-/);
  });
  it("carries a rounded 1000 to the next prefix", () => {
    expect(formatQuantity(999.96e-3, "V")).toBe("1 V");
    expect(formatQuantity(0.99996, "mA" as string)).toBe("1 mA");
  });
  it("prints ratios and unknown units without prefixes", () => {
    expect(formatQuantity(0.962, "V/V")).toBe("0.962 V/V");
    expect(formatQuantity(19.66, "dB")).toBe("19.7 dB");
    expect(formatQuantity(null, "A")).toBe("—");
    expect(formatQuantity(Infinity, "Ω")).toBe("∞ Ω");
  });
  it("keeps three significant digits", () => {
    expect(formatNumber(1.23456)).toBe("1.23");
    expect(formatNumber(123456)).toBe("123000");
    expect(formatNumber(1.5e-4)).toBe("1.5e-4");
    expect(formatNumber(2.5e7)).toBe("2.5e7");
  });
});

describe("formatMargin", () => {
  it("shows a signed percentage", () => {
    expect(formatMargin(-0.1333)).toBe("-13.3%");
    expect(formatMargin(0.345)).toBe("+34.5%");
    expect(formatMargin(-2.25)).toBe("-225%");
    expect(formatMargin(0)).toBe("0%");
    expect(formatMargin(null)).toBe("—");
  });
  it("composes measured vs limit", () => {
    expect(measuredVsLimit({ rule: "r", subject: "s", measured: 6.8e-3, limit: 6e-3, unit: "A", margin: -0.1333, scenario: "nominal" })).toBe(
      "measured 6.8 mA vs limit 6 mA, margin -800 µA",
    );
    // The margin in the quantity's own unit, never a percentage of dB or of a signed voltage
    // (11.3 dB against a 1 dB limit is 10.3 dB over; -236 mV against 500 mV is 736 mV short).
    expect(measuredVsLimit({ rule: "r", subject: "s", measured: 11.3, limit: 1, unit: "dB", margin: -10.3, scenario: "nominal" })).toBe("measured 11.3 dB vs limit 1 dB, margin -10.3 dB");
    expect(measuredVsLimit({ rule: "r", subject: "s", measured: -0.236, limit: 0.5, unit: "V", margin: -1.47, scenario: "nominal" })).toBe("measured -236 mV vs limit 500 mV, margin -736 mV");
    expect(measuredVsLimit({ rule: "r", subject: "s", measured: 2e-3, limit: 3e-3, unit: "A", margin: 0.33, scenario: "nominal" })).toBe("measured 2 mA vs limit 3 mA, margin +1 mA");
  });
});
