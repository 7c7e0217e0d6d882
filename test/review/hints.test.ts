// Hints from sensitivities: the parts named are the ones that move the failing quantity, and a part
// whose effect is negligible against the shortfall is never offered as the fix.
import { describe, expect, it } from "vitest";
import type { SensitivityEntry } from "../../src/report/document.js";
import { sensitivityHint } from "../../src/review/hints.js";

const entry = (parameter: string, derivative: number, nominal: number): SensitivityEntry =>
  ({ parameter, name: parameter, derivative, normalised: derivative * nominal, low: -derivative * nominal * 0.05, high: derivative * nominal * 0.05 }) as unknown as SensitivityEntry;

describe("sensitivityHint", () => {
  const bands = new Map([
    ["C1", { nominal: 10e-6, min: 8e-6, max: 12e-6, kind: "tolerance" }],
    ["RE1", { nominal: 220, min: 217.8, max: 222.2, kind: "tolerance" }],
  ]);

  it("names the part that moves the quantity, with direction and size per 10 %", () => {
    // 1.26 dB over a 1 dB limit; C1 moves it 0.73 dB per 10 % (derivative in dB per farad).
    const h = sensitivityHint({ measured: 2.26, limit: 1, unit: "dB", quantity: "deviation", entries: [entry("C1", -0.729 / 1e-6, 10e-6)], bands });
    expect(h).toMatch(/^raise C1: −0\.729 dB deviation per \+10 %/);
  });

  it("offers no part whose effect is under 1 % of the shortfall (the rule's own advice is kept instead)", () => {
    // A microdecibel per 10 % against a 1.26 dB shortfall: noise, not a fix.
    const h = sensitivityHint({ measured: 2.26, limit: 1, unit: "dB", quantity: "deviation", entries: [entry("C1", -1.48e-6 / 1e-6, 10e-6), entry("RE1", -1.18e-6 / 22, 220)], bands });
    expect(h).toBeNull();
  });
});
