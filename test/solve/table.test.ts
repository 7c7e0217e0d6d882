// The operating-point table: SI prefixes (SI brochure prefixes), aligned columns, failure text.
import { describe, expect, it } from "vitest";
import { solveOperatingPoint } from "../../src/solve/index.js";
import { alignTable, formatSi, renderOperatingPoint, renderSolveResult } from "../../src/solve/table.js";
import { circuit } from "./build.js";

describe("formatSi", () => {
  it("uses SI prefixes with three significant digits", () => {
    expect(formatSi(0.00123, "A")).toBe("1.23 mA");
    expect(formatSi(4700, "Ω")).toBe("4.70 kΩ");
    expect(formatSi(12, "V")).toBe("12.0 V");
    expect(formatSi(-0.661, "V")).toBe("−661 mV");
    expect(formatSi(2.2e-6, "F")).toBe("2.20 µF");
    expect(formatSi(1e-12, "A")).toBe("1.00 pA");
    expect(formatSi(0, "W")).toBe("0 W");
    expect(formatSi(0.9999, "V")).toBe("1.00 V");
    expect(formatSi(999.96e-3, "A")).toBe("1.00 A");
  });
  it("never prints NaN or a bare exponent overflow", () => {
    expect(formatSi(Number.NaN, "V")).toBe("—");
    expect(formatSi(Infinity, "Ω")).toBe("∞ Ω");
  });
});

describe("operating-point table", () => {
  it("aligns columns and lists nodes, sources and devices", () => {
    expect(alignTable([["a", "1"], ["long", "22"]])).toBe("a      1\nlong  22");
    const c = circuit()
      .bjtModel("n", "npn", { beta: 100 })
      .v("VCC", "vcc", "gnd", 12)
      .r("R1", "vcc", "b", 100e3)
      .r("R2", "b", "gnd", 22e3)
      .r("RC", "vcc", "c", 4.7e3)
      .r("RE", "e", "gnd", 1e3)
      .q("Q1", "npn", "c", "b", "e", "n")
      .build();
    const r = solveOperatingPoint(c);
    if (!r.ok) throw new Error(r.reason);
    const text = renderOperatingPoint(r);
    expect(text).toMatch(/^Node voltages\n/);
    expect(text).toMatch(/Q1\s+npn\s+active\s+\d/);
    expect(text).toMatch(/VCC\s+12\.0 V/);
    const lines = text.split("\n").filter((l) => l.startsWith("  ") && l.includes("resistor"));
    expect(new Set(lines.map((l) => l.length)).size).toBe(1); // right-aligned: equal widths
  });
  it("a failure prints the reason, parts and nodes", () => {
    const f = solveOperatingPoint(circuit().v("V1", "a", "gnd", 1).c("C1", "a", "b", 1e-6).build());
    expect(renderSolveResult(f)).toMatch(/^No operating point: node `b` has no DC path to ground.*\n  parts: C1\n  nodes: b\n$/s);
  });
});
