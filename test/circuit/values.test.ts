// Value parser: SI prefixes and units, IEC 60062 letter-position codes, temperatures, tolerances.
import { describe, expect, it } from "vitest";
import { parseFraction, parseValue, type Quantity } from "../../src/circuit/values.js";

function value(raw: unknown, q: Quantity): number {
  const r = parseValue(raw, q);
  if (!r.ok) throw new Error(`expected ${String(raw)} to parse: ${r.message}`);
  return r.value;
}
function failure(raw: unknown, q: Quantity): { message: string; hint?: string } {
  const r = parseValue(raw, q);
  if (r.ok) throw new Error(`expected ${String(raw)} to be rejected, got ${r.value}`);
  return r;
}
const close = (a: number, b: number) => expect(a).toBeCloseTo(b, 12 - Math.max(0, Math.ceil(Math.log10(Math.abs(b) || 1))));

describe("IEC 60062 letter-position codes", () => {
  // IEC 60062 (marking codes for resistors and capacitors): the letter stands for the decimal
  // point and the multiplier — R (×1), K (×10³), M (×10⁶), G, T for resistance; p, n, µ, m for
  // capacitance; a whole value puts the letter last (100R, 10K). Examples from memory of the
  // standard's tables.
  it.each([
    ["4k7", 4700],
    ["4K7", 4700],
    ["2R2", 2.2],
    ["R47", 0.47],
    ["1M5", 1.5e6],
    ["100R", 100],
    ["10K", 10e3],
    ["4.7", 4.7],
    ["6M8", 6.8e6],
    ["1G0", 1e9],
    ["0R1", 0.1],
  ])("resistance %s", (code, expected) => {
    close(value(code, "resistance"), expected);
  });
  it.each([
    ["4n7", 4.7e-9],
    ["4u7", 4.7e-6],
    ["4µ7", 4.7e-6],
    ["2p2", 2.2e-12],
    ["p47", 0.47e-12],
    ["3m3", 3.3e-3],
  ])("capacitance %s", (code, expected) => close(value(code, "capacitance"), expected as number));
  it("rejects R as a decimal mark outside resistances", () => {
    expect(failure("2R2", "capacitance").message).toMatch(/resist/);
  });
});

describe("SI prefixes (SI Brochure, 9th edition, table of prefixes)", () => {
  it.each([
    ["1f", 1e-15],
    ["1p", 1e-12],
    ["1n", 1e-9],
    ["1u", 1e-6],
    ["1µ", 1e-6], // U+00B5 micro sign
    ["1μ", 1e-6], // U+03BC Greek mu: the SI symbol; both are accepted
    ["1m", 1e-3],
    ["1k", 1e3],
    ["1M", 1e6],
    ["1G", 1e9],
    ["1T", 1e12],
  ])("%s", (text, expected) => close(value(text, "resistance"), expected as number));
  it("prefix symbols are case-sensitive: m is milli and M is mega", () => {
    expect(value("2.2m", "resistance")).toBeCloseTo(2.2e-3, 15);
    expect(value("2.2M", "resistance")).toBeCloseTo(2.2e6, 6);
  });
  it("rejects meg with a hint to write M", () => {
    for (const t of ["1meg", "1Meg", "1MEG", "4.7megΩ"]) {
      const f = failure(t, "resistance");
      expect(f.message).toMatch(/not an SI prefix/);
      expect(f.hint).toMatch(/write M/);
    }
  });
  it("rejects K as kilo outside resistances (K is the kelvin), with a hint to write k", () => {
    expect(failure("10K", "capacitance").hint).toMatch(/k for kilo/);
    expect(failure("10 KV", "voltage").hint).toMatch(/k for kilo/);
  });
});

describe("unit symbols checked against the field", () => {
  it.each<[string, Quantity, number]>([
    ["2.2 kΩ", "resistance", 2200],
    ["2.2 k\u2126", "resistance", 2200], // U+2126 ohm sign
    ["470 ohm", "resistance", 470],
    ["10 uF", "capacitance", 10e-6],
    ["100 nF", "capacitance", 100e-9],
    ["10 uH", "inductance", 10e-6],
    ["100 mA", "current", 0.1],
    ["12 V", "voltage", 12],
    ["-12 V", "voltage", -12],
    ["125 mW", "power", 0.125],
    ["20 kHz", "frequency", 20e3],
    ["1 ms", "time", 1e-3],
    ["10 um", "length", 10e-6],
    ["1 m", "length", 1],
    ["1e-14 A", "current", 1e-14],
    ["200u", "transconductance-parameter", 200e-6],
    ["200 uA/V²", "transconductance-parameter", 200e-6],
    ["0.02 1/V", "per-volt", 0.02],
    ["1.11 eV", "energy-ev", 1.11],
    ["-2 mV/K", "volt-per-kelvin", -2e-3],
    ["40 dB", "gain", 100], // 20·log10(100) = 40 dB (definition of the decibel for voltage ratios)
    ["4.7k", "resistance", 4700],
    [".5", "dimensionless", 0.5],
  ])("%s as %s", (text, q, expected) => close(value(text, q), expected));
  it("rejects 10 uF on a resistance, naming the expected unit", () => {
    const f = failure("10 uF", "resistance");
    expect(f.message).toMatch(/capacitance.*resistance/);
    expect(f.hint).toMatch(/Ω/);
  });
  it("rejects unknown units and garbage", () => {
    expect(failure("3 furlongs", "resistance").message).toMatch(/unknown unit/);
    expect(failure("abc", "resistance").message).toMatch(/not a number/);
    expect(failure("", "resistance").message).toMatch(/empty/);
    expect(parseValue(Infinity, "resistance").ok).toBe(false);
    expect(parseValue(null, "resistance").ok).toBe(false);
  });
});

describe("temperatures (SI Brochure: T/K = t/°C + 273.15)", () => {
  it("27 °C is 300.15 K", () => expect(value("27 °C", "temperature")).toBeCloseTo(300.15, 10));
  it("300 K is 300 K", () => expect(value("300 K", "temperature")).toBe(300));
  it("-40 °C is 233.15 K", () => expect(value("-40 °C", "temperature")).toBeCloseTo(233.15, 10));
  it("refuses prefixes on °C and a bare C", () => {
    expect(parseValue("27 m°C", "temperature").ok).toBe(false);
    expect(failure("27 C", "temperature").hint).toMatch(/°C/);
  });
});

describe("tolerances", () => {
  it('"5%" is 0.05 and a fraction ≤ 1 is taken as it is', () => {
    expect(parseFraction("5%")).toEqual({ ok: true, value: 0.05 });
    expect(parseFraction("0.5 %")).toEqual({ ok: true, value: 0.005 });
    expect(parseFraction(0.05)).toEqual({ ok: true, value: 0.05 });
    expect(parseFraction(1)).toEqual({ ok: true, value: 1 });
  });
  it('a bare number > 1 is rejected with a hint to write "5%"', () => {
    const r = parseFraction(5);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.hint).toContain('"5%"');
  });
  it("negative or non-percentage tolerances are rejected", () => {
    expect(parseFraction(-0.1).ok).toBe(false);
    expect(parseFraction("5 ohm").ok).toBe(false);
  });
});
