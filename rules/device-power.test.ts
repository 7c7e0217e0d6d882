// device-power: transistor dissipation against half the model's rating, derated above 25 °C.
import { verifyRule } from "../src/review/tester.js";
import { testsFromVerdict } from "../test/verdict-tests.js";
import { analysis, bjt, bjtPoint, circuit, op } from "../test/review/fixtures.js";
import type { BjtModel } from "../src/circuit/types.js";
import { npnStage, pmosStage, pnpStage } from "../test/review/circuits.js";
import devicePower from "./device-power.js";

const model = (powerRating: number): BjtModel => ({ id: "q", kind: "pnp", pos: { file: "x", line: 5, column: 3 }, powerRating, beta: { min: 100, typ: 200, max: 300 }, reverseBeta: { min: 1, typ: 1, max: 1 }, saturationCurrent: { min: 1e-14, typ: 1e-14, max: 1e-14 }, earlyVoltage: { min: Infinity, typ: Infinity, max: Infinity }, saturationEdge: 0.3, drift: { voltage: -0.002, current: 1e-3 }, betaDrift: 0.005, betaAt: { collectorEmitterVoltage: 5, collectorCurrent: 2e-3 } });
const hot = (power: number, temperatureK: number) => {
  const c = circuit({ components: [bjt("Q1", "pnp", 10)], models: [model(0.2)], temperature: temperatureK });
  return { circuit: c, analyses: [analysis(c, op({ Q1: bjtPoint("pnp", { power }) }))] };
};
const smallNpn = `  tw-npn: { kind: npn, beta: { min: 150, typ: 250, max: 400 }, saturationCurrent: 1e-14 A, earlyVoltage: 100 V, powerRating: 10 mW }`;

testsFromVerdict(await verifyRule(devicePower, [
  // Q1 dissipates ≈ IC·VCE ≈ 1.17 mA · 5.1 V ≈ 6 mW.
  { name: "NPN stage: 6 mW of a 250 mW part", circuit: npnStage(), expect: [], passed: ["Q1"] },
  { name: "NPN stage: 6 mW in a 10 mW part (5 mW allowed) fails", circuit: npnStage({ model: smallNpn }), expect: [{ subject: "Q1", messageIncludes: "50% of 10 mW" }] },
  { name: "PNP stage: 6 mW of a 250 mW part", circuit: pnpStage(), expect: [], passed: ["Q1"] },
  // ID·|VDS| = 1 mA · 6.3 V = 6.3 mW (square-law closed form of this stage).
  { name: "PMOS: 6.3 mW in a 10 mW part fails", circuit: pmosStage({ powerRating: "10 mW" }), expect: [{ subject: "M1" }] },
  { name: "PMOS: 6.3 mW in a 20 mW part passes", circuit: pmosStage({ powerRating: "20 mW" }), expect: [], passed: ["M1"] },
  // At 87.5 °C the linear derating from 25 °C to 150 °C leaves half: 0.2 W · 0.5 · 0.5 = 50 mW.
  { name: "boundary at 87.5 °C: 50.001 mW fails", ...hot(0.050001, 360.65), expect: [{ subject: "Q1", messageIncludes: "derated to 88 °C" }] },
  { name: "boundary at 87.5 °C: 49.999 mW passes", ...hot(0.049999, 360.65), expect: [], passed: ["Q1"] },
]));
