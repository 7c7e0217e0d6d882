// impedance-window: midband input and output impedance windows on the NPN stage of
// test/review/circuits.ts. Hand figures (hybrid-π, textbook, from memory): with RE = 1k2
// unbypassed, Zin = R1 ‖ R2 ‖ (rπ + (β + 1)·RE) ≈ 56k ‖ 12k ‖ 306k ≈ 9.57 kΩ (β = 250,
// rπ ≈ 5.3 kΩ); Zout at `out` (C2 short) = RL ‖ RC ≈ 10k ‖ 4k7 ≈ 3.2 kΩ (the degenerated
// collector's own resistance is ~MΩ).
import { expect, it } from "vitest";
import { verifyRule, runRuleCase } from "../src/review/tester.js";
import { testsFromVerdict } from "../test/verdict-tests.js";
import { npnStage } from "../test/review/circuits.js";
import impedanceWindow from "./impedance-window.js";

const gain = (extra: string) => `  gains:\n    - { name: stage, input: VIN, output: out, target: -2.6, tolerance: 10%${extra} }`;

testsFromVerdict(await verifyRule(impedanceWindow, [
  { name: "input impedance inside 9 k…10 kΩ passes", circuit: npnStage({ specs: gain(", inputImpedance: { min: 9k, max: 10k }") }), expect: [], passed: ["stage input impedance"] },
  { name: "a 20 kΩ minimum input impedance fails", circuit: npnStage({ specs: gain(", inputImpedance: { min: 20k }") }), expect: [{ subject: "stage input impedance", severity: "error", messageIncludes: "below its min of 20 kΩ" }] },
  { name: "a 1 kΩ maximum output impedance fails", circuit: npnStage({ specs: gain(", outputImpedance: { max: 1k }") }), expect: [{ subject: "stage output impedance", messageIncludes: "the circuit's load included" }] },
  { name: "no window, nothing judged", circuit: npnStage({ specs: gain("") }), expect: [] },
]));

it("measures the hand figures", async () => {
  const r = await runRuleCase(impedanceWindow, { name: "both", circuit: npnStage({ specs: gain(", inputImpedance: { min: 1 }, outputImpedance: { max: 1M }") }), expect: [] });
  const zin = r.passed.find((p) => p.subject === "stage input impedance")!.measured!;
  const zout = r.passed.find((p) => p.subject === "stage output impedance")!.measured!;
  expect(Math.abs(zin / 9.57e3 - 1)).toBeLessThan(0.02);
  expect(Math.abs(zout / ((4.7e3 * 10e3) / 14.7e3) - 1)).toBeLessThan(0.01);
});
