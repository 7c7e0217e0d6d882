// gain-window: a degenerated common-emitter stage against windows around the textbook gain.
import { expect, it } from "vitest";
import { verifyRule, runRuleCase } from "../src/review/tester.js";
import { testsFromVerdict } from "../test/verdict-tests.js";
import { analysis, at, circuit, gain, op, small } from "../test/review/fixtures.js";
import { npnStage, pnpStage } from "../test/review/circuits.js";
import gainWindow from "./gain-window.js";

const spec = (target: string, tolerance = "5%") => `  gains:\n    - { name: stage, input: VIN, output: out, target: ${target}, tolerance: ${tolerance} }`;
const windowed = circuit({ specs: { gains: [{ name: "stage", input: "VIN", output: { plus: "out", minus: "gnd" }, target: -10, window: { min: -11, max: -9 }, pos: at(40) }] } });
const judged = (g: number) => [analysis(windowed, op({}), "nominal", small([gain("stage", g)]))];

testsFromVerdict(await verifyRule(gainWindow, [
  // Hand estimate: −β(RC‖RL‖ro)/(rπ + (β+1)RE) ≈ −250·3.09k/(5.75k + 251·1.2k) ≈ −2.52.
  { name: "NPN stage gain inside −2.5 ± 5%", circuit: npnStage({ specs: spec("-2.5") }), expect: [], passed: ["stage"] },
  { name: "NPN stage gain above a −3 ± 5% window", circuit: npnStage({ specs: spec("-3") }), expect: [{ subject: "stage", messageIncludes: "above its window" }] },
  { name: "the sign counts: +2.5 is not −2.5", circuit: npnStage({ specs: spec("2.5") }), expect: [{ subject: "stage", messageIncludes: "below its window" }] },
  { name: "PNP mirror stage inverts too", circuit: pnpStage({ specs: spec("-2.5", "10%") }), expect: [], passed: ["stage"] },
  { name: "boundary: −11.0001 is below the window", circuit: windowed, analyses: judged(-11.0001), expect: [{ subject: "stage", messageIncludes: "below" }] },
  { name: "boundary: −10.9999 is inside", circuit: windowed, analyses: judged(-10.9999), expect: [], passed: ["stage"] },
  { name: "boundary: −8.9999 is above the window", circuit: windowed, analyses: judged(-8.9999), expect: [{ subject: "stage", messageIncludes: "above" }] },
  // The advice goes by magnitude: for an inverting window, "above" means too little gain.
  { name: "inverting window, −8.9 V/V is too little gain", circuit: windowed, analyses: judged(-8.9), expect: [{ subject: "stage", messageIncludes: "(too little gain)" }] },
  { name: "inverting window, −11.5 V/V is too much gain", circuit: windowed, analyses: judged(-11.5), expect: [{ subject: "stage", messageIncludes: "(too much gain)" }] },
  { name: "inverting window, +10 V/V has the wrong sign", circuit: windowed, analyses: judged(10), expect: [{ subject: "stage", messageIncludes: "(the sign is wrong)" }] },
  {
    name: "a gain the small-signal stage could not compute is a finding with its reason",
    circuit: windowed,
    analyses: [analysis(windowed, op({}), "nominal", small([], [{ gain: "stage", message: "the small-signal network is singular" }]))],
    expect: [{ subject: "stage", messageIncludes: "singular" }],
  },
]));

it("tells an inverting stage with too little gain to raise its magnitude", async () => {
  const r = await runRuleCase(gainWindow, { name: "hint", circuit: windowed, analyses: judged(-5), expect: [] });
  expect(r.findings[0]!.hint).toMatch(/^raise the gain's magnitude/);
});

it("judges the gain the textbook formula gives from the solved small-signal parameters", async () => {
  const r = await runRuleCase(gainWindow, { name: "formula", circuit: npnStage({ specs: spec("-3") }), expect: [] });
  const f = r.findings[0]!;
  // Degenerated common emitter, hybrid-π (textbook): Av = −β·(RC‖RL) / (rπ + (β+1)·RE); ro sits
  // from collector to emitter, and with 1.2 kΩ of degeneration it raises the output resistance
  // far above RC‖RL, so it drops out. β = 250 (model typ), rπ = β·VT/IC = 250·25.85 mV/1.175 mA.
  const beta = 250;
  const rBaseInput = (beta * 0.02585) / 1.175e-3;
  const rcRl = 1 / (1 / 4700 + 1 / 10000);
  const av = (-beta * rcRl) / (rBaseInput + (beta + 1) * 1200);
  expect(f.measured! / av).toBeCloseTo(1, 2);
  expect(f).toMatchObject({ limit: -2.85, unit: "V/V" });
  expect(f.margin).toBeLessThan(0);
});
