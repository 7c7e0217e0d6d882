// The example team rule (examples/team-rules/divider-current.ts), loaded the way a repository
// loads it — through the example config and tsx — and tested with the rule tester.
import { resolve } from "node:path";
import { expect, it } from "vitest";
import { loadConfig } from "../../src/review/config.js";
import { loadPlugins } from "../../src/review/plugins.js";
import { verifyRule, runRuleCase } from "../../src/review/tester.js";
import { testsFromVerdict } from "../verdict-tests.js";
import { npnStage, pnpStage } from "./circuits.js";

const ROOT = resolve(import.meta.dirname, "..", "..");
const config = await loadConfig({ cwd: ROOT, configPath: "examples/opgate.config.yaml" });
const [plugin] = await loadPlugins(config);
const rule = plugin!.rules[0]!;

it("is the one rule of the example plugin", () => {
  expect(plugin!.shown).toBe("team-rules/divider-current.ts");
  expect(rule.id).toBe("tidewater/divider-current");
});

testsFromVerdict(await verifyRule(rule, [
  // R2 = 12 kΩ carries VB/R2 ≈ 2.1 V/12 kΩ ≈ 175 µA; IB ≈ IC/β ≈ 4.7 µA: 37 × IB.
  { name: "the NPN stage's 56k/12k divider is stiff", circuit: npnStage(), expect: [], passed: ["Q1"] },
  // Ten times larger resistors: the divider current drops to ≈ 16 µA, under 10 × IB ≈ 47 µA.
  { name: "a 560k/120k divider is not", circuit: npnStage({ r1: "560k", r2: "120k" }), expect: [{ subject: "Q1", severity: "warning", messageIncludes: "less than 10 × IB" }] },
  { name: "the PNP mirror stage's divider is stiff", circuit: pnpStage(), expect: [], passed: ["Q1"] },
  { name: "a weak PNP divider fails the same way", circuit: pnpStage({ r1: "120k", r2: "560k" }), expect: [{ subject: "Q1" }] },
  { name: "a ratio of 40 from the config fails the stiff NPN divider", circuit: npnStage(), options: { ratio: 40 }, expect: [{ subject: "Q1" }] },
  { name: "a single base resistor is not a divider", circuit: npnStage({ r2: "1G" }).replace("  - { id: R2, kind: resistor, pins: [base, gnd], value: 1G, tolerance: 1%, package: \"0603\" }\n", ""), expect: [] },
]));

it("measures the smaller leg: the lower resistor for NPN, the upper for PNP", async () => {
  const npn = await runRuleCase(rule, { name: "npn", circuit: npnStage({ r1: "560k", r2: "120k" }), expect: [] });
  const f = npn.findings[0]!;
  // Lower leg = VB/R2; upper leg = lower + IB (KCL at the base node).
  expect(f.measured).toBeGreaterThan(10e-6);
  expect(f.measured).toBeLessThan(25e-6);
  expect(f.limit! / 10).toBeGreaterThan(3e-6);
});
