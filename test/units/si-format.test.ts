// The shared SI display prefixes: the table against the SI Brochure and the choice of prefix at
// its edges, for both ways of writing the number in front of it.
import { describe, expect, it } from "vitest";
import { formatSiPrefixed, SI_DISPLAY_PREFIXES, siPrefix } from "../../src/units/si-format.js";

describe("SI display prefixes", () => {
  it("are the SI Brochure (9th edition, table 7) prefixes tera to femto, each a thousand apart", () => {
    // SI Brochure 9th edition, table 7 (from memory): T 1e12, G 1e9, M 1e6, k 1e3, m 1e-3, µ 1e-6, n 1e-9, p 1e-12, f 1e-15.
    expect(SI_DISPLAY_PREFIXES.map(([, s]) => s).join("")).toBe("TGMkmµnpf");
    expect(SI_DISPLAY_PREFIXES.map(([scale]) => Math.round(Math.log10(scale)))).toEqual([12, 9, 6, 3, 0, -3, -6, -9, -12, -15]);
  });

  it("takes the larger prefix once a value rounds to a thousand of the smaller at three digits", () => {
    expect(siPrefix(0.9995e3)[1]).toBe("k");
    expect(siPrefix(0.99949e3)[1]).toBe("");
    expect(siPrefix(1e-20)[1]).toBe("f"); // below the table: femto
    expect(siPrefix(1e20)[1]).toBe("T"); // above it: tera
  });

  it("writes significant digits or decimals by size, with the same missing, infinite and zero texts", () => {
    expect(formatSiPrefixed(4700, "Ω", { significant: 4 })).toBe("4.7 kΩ");
    expect(formatSiPrefixed(-4700, "Ω", { significant: 4 })).toBe("-4.7 kΩ");
    expect(formatSiPrefixed(4700, "Ω", "by-size")).toBe("4.70 kΩ");
    expect(formatSiPrefixed(-0.0047, "A", "by-size")).toBe("−4.70 mA");
    expect(formatSiPrefixed(1e-16, "A", "by-size")).toBe("1.0e-16 A");
    expect(formatSiPrefixed(1e-16, "A", { significant: 4 })).toBe("0.1 fA");
    for (const digits of [{ significant: 3 }, "by-size"] as const) {
      expect(formatSiPrefixed(undefined, "V", digits)).toBe("—");
      expect(formatSiPrefixed(Number.NaN, "V", digits)).toBe("—");
      expect(formatSiPrefixed(-Infinity, "Ω", digits)).toBe("−∞ Ω");
      expect(formatSiPrefixed(0, "", digits)).toBe("0");
    }
  });
});
