// capacitor-polarity: a polarised capacitor's reverse DC bias against the allowance.
import { describe, expect, it } from "vitest";
import { verifyRule, runRuleCase } from "../src/review/tester.js";
import { testsFromVerdict } from "../test/verdict-tests.js";
import { analysis, capacitor, circuit, op } from "../test/review/fixtures.js";
import { npnStage, pnpStage } from "../test/review/circuits.js";
import capacitorPolarity from "./capacitor-polarity.js";

// An emitter bypass electrolytic: the emitter sits at ≈ 1.45 V (npnStage hand estimate), so with
// its + on the emitter it is forward-biased, with its + on ground reversed by ≈ 1.45 V.
const bypass = (positive: string) => `  - { id: CE, kind: capacitor, pins: [emit, gnd], value: 100u, voltageRating: 16 V, positive: ${positive} }`;
// In the PNP stage the emitter is at ≈ 10.55 V and its bypass goes to the rail (12 V).
const pnpBypass = (positive: string) => `  - { id: CE, kind: capacitor, pins: [vcc, emit], value: 100u, positive: ${positive} }`;
const rated = { ...capacitor("C1", 12, 25), positive: "a" };
const hand = circuit({ components: [rated] });
const across = (v: number) => [analysis(hand, op({ C1: { kind: "capacitor", voltage: v } }))];

testsFromVerdict(await verifyRule(capacitorPolarity, [
  { name: "an emitter bypass with + on the emitter is the right way round", circuit: npnStage({ parts: bypass("emit") }), expect: [], passed: ["CE"] },
  { name: "a reversed electrolytic (+ on ground below a 1.45 V emitter) is found", circuit: npnStage({ parts: bypass("gnd") }), expect: [{ subject: "CE", messageIncludes: "reverse-biased by 1.4" }] },
  { name: "PNP: + on the rail is right", circuit: pnpStage({ parts: pnpBypass("vcc") }), expect: [], passed: ["CE"] },
  { name: "PNP: + on the emitter is reversed by ≈ 1.45 V", circuit: pnpStage({ parts: pnpBypass("emit") }), expect: [{ subject: "CE" }] },
  { name: "a larger allowance from the config lets it pass", circuit: npnStage({ parts: bypass("gnd") }), options: { allowance: 2 }, expect: [], passed: ["CE"] },
  { name: "boundary: 0.501 V reverse fails", circuit: hand, analyses: across(-0.501), expect: [{ subject: "C1" }] },
  { name: "boundary: 0.499 V reverse passes", circuit: hand, analyses: across(-0.499), expect: [], passed: ["C1"] },
  { name: "non-polarised capacitors are not judged", circuit: npnStage(), expect: [] },
]));

describe("across corners", () => {
  it("the reversed electrolytic is worst where the emitter is highest (supply at its high end)", async () => {
    const result = await runRuleCase(capacitorPolarity, { name: "corners", circuit: npnStage({ parts: bypass("gnd") }), variation: { mode: "corners", samples: 1, seed: 1 }, expect: [] });
    const nominal = await runRuleCase(capacitorPolarity, { name: "nominal", circuit: npnStage({ parts: bypass("gnd") }), expect: [] });
    expect(result.findings).toHaveLength(1);
    expect(result.findings[0]!.measured!).toBeGreaterThan(nominal.findings[0]!.measured!);
    expect(result.findings[0]!.scenario).not.toBe("nominal");
  });
});
