// supply-budget: the common-emitter stage's supply current and power against budgets.
import { verifyRule } from "../src/review/tester.js";
import { testsFromVerdict } from "../test/verdict-tests.js";
import { analysis, at, circuit, op } from "../test/review/fixtures.js";
import { npnStage, pnpStage, relayDriver } from "../test/review/circuits.js";
import supplyBudget from "./supply-budget.js";

const budget = (b: string) => `  supplies:\n    - { source: VCC, ${b} }`;
// A negative rail delivers a negative current; budgets compare magnitudes (DESIGN.md section 3).
const rails = circuit({ specs: { supplies: [{ source: "VEE", maxCurrent: 2e-3, pos: at(50) }] } });
const vee = (current: number) => [analysis(rails, op({}, { VEE: { current, power: Math.abs(current) * 12, voltage: -12 } }))];

testsFromVerdict(await verifyRule(supplyBudget, [
  // Hand estimate: IC ≈ 1.17 mA plus the divider's 12 V/68 kΩ ≈ 0.18 mA → ≈ 1.35 mA, ≈ 16 mW.
  { name: "NPN stage draws ≈ 1.35 mA of a 2 mA budget", circuit: npnStage({ specs: budget("maxCurrent: 2 mA") }), expect: [], passed: ["VCC"] },
  { name: "NPN stage over a 1 mA budget", circuit: npnStage({ specs: budget("maxCurrent: 1 mA") }), expect: [{ subject: "VCC", messageIncludes: "over its budget of 1 mA" }] },
  { name: "NPN stage over a 10 mW power budget", circuit: npnStage({ specs: budget("maxCurrent: 2 mA, maxPower: 10 mW") }), expect: [{ subject: "VCC", messageIncludes: "W, over its budget of 10 mW" }] },
  { name: "PNP stage within 2 mA and 20 mW", circuit: pnpStage({ specs: budget("maxCurrent: 2 mA, maxPower: 20 mW") }), expect: [], passed: ["VCC"] },
  { name: "negative rail: −2.001 mA is over a 2 mA budget", circuit: rails, analyses: vee(-2.001e-3), expect: [{ subject: "VEE" }] },
  { name: "negative rail: −1.999 mA is within it", circuit: rails, analyses: vee(-1.999e-3), expect: [], passed: ["VEE"] },
]));

// A coil marked `role: coil` is skipped by part ratings but still draws from the supply:
// ≈ 29.8 mA (coil) + ≈ 4.6 mA (LED, (12 − ≈1.8 V)/2.2 kΩ) ≈ 34.4 mA (the base current comes from
// VLOGIC, not VCC).
testsFromVerdict(await verifyRule(supplyBudget, [
  { name: "a marked coil's current still counts against the supply budget", circuit: relayDriver({ coil: ", role: coil", specs: budget("maxCurrent: 32 mA") }), expect: [{ subject: "VCC", messageIncludes: "over its budget of 32 mA" }] },
  { name: "and fits a 40 mA budget", circuit: relayDriver({ coil: ", role: coil", specs: budget("maxCurrent: 40 mA") }), expect: [], passed: ["VCC"] },
]));
