// supply-budget: the common-emitter stage's supply current and power against budgets.
import { ruleTester } from "../src/review/tester.js";
import { analysis, at, circuit, op } from "../test/review/fixtures.js";
import { npnStage, pnpStage } from "../test/review/circuits.js";
import supplyBudget from "./supply-budget.js";

const budget = (b: string) => `  supplies:\n    - { source: VCC, ${b} }`;
// A negative rail delivers a negative current; budgets compare magnitudes (DESIGN.md section 3).
const rails = circuit({ specs: { supplies: [{ source: "VEE", maxCurrent: 2e-3, pos: at(50) }] } });
const vee = (current: number) => [analysis(rails, op({}, { VEE: { current, power: Math.abs(current) * 12, voltage: -12 } }))];

ruleTester(supplyBudget).run([
  // Hand estimate: IC ≈ 1.17 mA plus the divider's 12 V/68 kΩ ≈ 0.18 mA → ≈ 1.35 mA, ≈ 16 mW.
  { name: "NPN stage draws ≈ 1.35 mA of a 2 mA budget", circuit: npnStage({ specs: budget("maxCurrent: 2 mA") }), expect: [], passed: ["VCC"] },
  { name: "NPN stage over a 1 mA budget", circuit: npnStage({ specs: budget("maxCurrent: 1 mA") }), expect: [{ subject: "VCC", messageIncludes: "over its budget of 1 mA" }] },
  { name: "NPN stage over a 10 mW power budget", circuit: npnStage({ specs: budget("maxCurrent: 2 mA, maxPower: 10 mW") }), expect: [{ subject: "VCC", messageIncludes: "W, over its budget of 10 mW" }] },
  { name: "PNP stage within 2 mA and 20 mW", circuit: pnpStage({ specs: budget("maxCurrent: 2 mA, maxPower: 20 mW") }), expect: [], passed: ["VCC"] },
  { name: "negative rail: −2.001 mA is over a 2 mA budget", circuit: rails, analyses: vee(-2.001e-3), expect: [{ subject: "VEE" }] },
  { name: "negative rail: −1.999 mA is within it", circuit: rails, analyses: vee(-1.999e-3), expect: [], passed: ["VEE"] },
]);
