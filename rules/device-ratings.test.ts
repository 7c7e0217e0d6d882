// device-ratings: breakdowns, gate–source maximum, diode reverse voltage and forward current
// against 80 % of the datasheet ratings, NPN/PNP and NMOS/PMOS alike, at the worst corner.
import { describe, expect, it } from "vitest";
import { loadCaseCircuit, verifyRule, runRuleCase } from "../src/review/tester.js";
import { testsFromVerdict } from "../test/verdict-tests.js";
import { buildScenarios } from "../src/variation/index.js";
import { analysis, bjt, bjtPoint, circuit, mos, mosPoint, op } from "../test/review/fixtures.js";
import deviceRatings from "./device-ratings.js";

const CORNERS = { mode: "corners", samples: 1, seed: 1 } as const;

// An NMOS load switch: the gate is pulled straight to the rail, so VGS = VCC (Ohm's law, no gate current).
const gateAtRail = (rail: string, tolerance = "") => `models:
  sw: { kind: nmos, threshold: 2 V, kPrime: 50m, width: 1 um, length: 1 um, ratings: { gateSource: 20 V, drainSource: 60 V, drainCurrent: 0.5 A } }
components:
  - { id: VCC, kind: voltage-source, pins: { plus: vcc, minus: gnd }, voltage: ${rail}${tolerance} }
  - { id: RG, kind: resistor, pins: [vcc, g], value: 100k }
  - { id: RL, kind: resistor, pins: [vcc, d], value: 1k }
  - { id: M1, kind: nmos, model: sw, pins: { drain: d, gate: g, source: gnd } }
`;
// The PMOS high-side switch: gate pulled to ground, source at the rail: VGS = −VCC.
const pmosGate = (rail: string) => `models:
  hs: { kind: pmos, threshold: -2 V, kPrime: 50m, width: 1 um, length: 1 um, ratings: { gateSource: 20 V } }
components:
  - { id: VCC, kind: voltage-source, pins: { plus: vcc, minus: gnd }, voltage: ${rail} }
  - { id: RG, kind: resistor, pins: [g, gnd], value: 100k }
  - { id: RL, kind: resistor, pins: [d, gnd], value: 1k }
  - { id: M1, kind: pmos, model: hs, pins: { drain: d, gate: g, source: vcc } }
`;
// An NPN held off (base to ground): the whole rail is across it, VCE = VCC; VCEO 40 V → 32 V allowed.
const offNpn = (rail: string, polarity: "npn" | "pnp" = "npn") =>
  polarity === "npn"
    ? `models:
  q: { kind: npn, beta: 200, saturationCurrent: 1e-14 A, ratings: { collectorEmitter: 40 V, collectorBase: 60 V, emitterBase: 6 V, collectorCurrent: 200 mA } }
components:
  - { id: VCC, kind: voltage-source, pins: { plus: vcc, minus: gnd }, voltage: ${rail} }
  - { id: RB, kind: resistor, pins: [b, gnd], value: 10k }
  - { id: RC, kind: resistor, pins: [vcc, c], value: 10k }
  - { id: Q1, kind: npn, model: q, pins: { collector: c, base: b, emitter: gnd } }
`
    : `models:
  q: { kind: pnp, beta: 200, saturationCurrent: 1e-14 A, ratings: { collectorEmitter: 40 V } }
components:
  - { id: VCC, kind: voltage-source, pins: { plus: vcc, minus: gnd }, voltage: ${rail} }
  - { id: RB, kind: resistor, pins: [vcc, b], value: 10k }
  - { id: RC, kind: resistor, pins: [c, gnd], value: 10k }
  - { id: Q1, kind: pnp, model: q, pins: { collector: c, base: b, emitter: vcc } }
`;
// The emitter–base junction reverse-biased: base at ground, emitter pulled to 8 V (VEB = 8 V > 0.8·6 V).
const reversedEmitter = `models:
  q: { kind: npn, beta: 200, saturationCurrent: 1e-14 A, ratings: { emitterBase: 6 V } }
components:
  - { id: VCC, kind: voltage-source, pins: { plus: vcc, minus: gnd }, voltage: 12 V }
  - { id: VE, kind: voltage-source, pins: { plus: e, minus: gnd }, voltage: 8 V }
  - { id: RB, kind: resistor, pins: [b, gnd], value: 10k }
  - { id: Q1, kind: npn, model: q, pins: { collector: vcc, base: b, emitter: e } }
`;
// A status LED from 5 V: (5 − VF)/R with VF = 2.0 V at 20 mA (datasheet form); 30 mA rating → 24 mA allowed.
const led = (r: string) => `models:
  red: { kind: diode, forward: { voltage: 2.0 V, current: 20 mA }, ratings: { forwardCurrent: 30 mA, reverseVoltage: 5 V } }
components:
  - { id: V5, kind: voltage-source, pins: { plus: s, minus: gnd }, voltage: 5 V }
  - { id: R1, kind: resistor, pins: [s, a], value: ${r} }
  - { id: D1, kind: diode, model: red, pins: { anode: a, cathode: gnd } }
`;
// The same LED fitted the wrong way round across 5 V: 5 V reverse against 0.8·5 V.
const reversedLed = led("1k").replace("anode: a, cathode: gnd", "anode: gnd, cathode: a");
// A 5.1 V Zener clamp: in breakdown on purpose, with no reverseVoltage rating.
const zenerClamp = `models:
  z: { kind: diode, saturationCurrent: 1 nA, breakdown: { voltage: 5.1 V, current: 5 mA, resistance: 10 Ω }, ratings: { forwardCurrent: 200 mA } }
components:
  - { id: V1, kind: voltage-source, pins: { plus: s, minus: gnd }, voltage: 12 V }
  - { id: R1, kind: resistor, pins: [s, k], value: 1k }
  - { id: D1, kind: diode, model: z, pins: { anode: gnd, cathode: k } }
`;

const boundaryModel = { id: "q", kind: "npn" as const, pos: { file: "f", line: 1, column: 1 }, beta: { min: 100, typ: 100, max: 100 }, reverseBeta: { min: 1, typ: 1, max: 1 }, saturationCurrent: { min: 1e-14, typ: 1e-14, max: 1e-14 }, earlyVoltage: { min: Infinity, typ: Infinity, max: Infinity }, saturationEdge: 0.3, drift: { voltage: -0.002, current: 1e-3 }, betaDrift: 0.005, betaAt: { collectorEmitterVoltage: 5, collectorCurrent: 2e-3 }, ratings: { collectorEmitter: 10 } };
const boundary = circuit({ components: [bjt("Q1", "pnp", 20)], models: [boundaryModel] });
const atVce = (vce: number) => [analysis(boundary, op({ Q1: bjtPoint("pnp", { collectorEmitterVoltage: vce, baseEmitterVoltage: -0.65 }) }))];
const mosModel = { id: "m", kind: "pmos" as const, pos: { file: "f", line: 1, column: 1 }, threshold: { min: -1, typ: -1, max: -1 }, kPrime: { min: 1e-3, typ: 1e-3, max: 1e-3 }, width: 1e-6, length: 1e-6, channelLengthModulation: { min: 0, typ: 0, max: 0 }, bodyEffect: 0, fermiPotential: 0.3, thresholdTempco: -0.002, kPrimeExponent: -1.5, ratings: { gateSource: 20, drainCurrent: 0.1 } };
const mosBoundary = circuit({ components: [mos("M1", "pmos", 30)], models: [mosModel] });
const atVgs = (vgs: number, id = 1e-3) => [analysis(mosBoundary, op({ M1: mosPoint("pmos", { gateSourceVoltage: vgs, drainCurrent: id, drainSourceVoltage: -5 }) }))];

testsFromVerdict(await verifyRule(deviceRatings, [
  { name: "a gate at 12 V is within 80% of a 20 V VGS rating", circuit: gateAtRail("12 V"), expect: [], passed: ["M1"] },
  { name: "a gate over its VGS maximum: 18 V against 16 V allowed", circuit: gateAtRail("18 V"), expect: [{ subject: "M1", messageIncludes: "VGS is 18 V; allowed 16 V (80% of its VGS max rating of 20 V)" }] },
  { name: "PMOS: VGS = −18 V is judged by its magnitude", circuit: pmosGate("18 V"), expect: [{ subject: "M1", messageIncludes: "VGS is 18 V" }] },
  { name: "PMOS: −12 V passes", circuit: pmosGate("12 V"), expect: [], passed: ["M1"] },
  { name: "NPN held off across 30 V: VCE 30 V within 32 V", circuit: offNpn("30 V"), expect: [], passed: ["Q1"] },
  { name: "NPN across 36 V: VCE over 80% of VCEO", circuit: offNpn("36 V"), expect: [{ subject: "Q1", messageIncludes: "VCE is 36 V; allowed 32 V (80% of its VCEO rating of 40 V)" }] },
  { name: "PNP across 36 V: the same, by magnitude", circuit: offNpn("36 V", "pnp"), expect: [{ subject: "Q1", messageIncludes: "VCE is 36 V" }] },
  { name: "an emitter–base junction reversed by 8 V against VEBO 6 V", circuit: reversedEmitter, expect: [{ subject: "Q1", messageIncludes: "reverse VEB is 8 V; allowed 4.8 V" }] },
  { name: "a status LED at ≈ 20 mA is within 24 mA", circuit: led("150"), expect: [], passed: ["D1"] },
  { name: "the LED at ≈ 29 mA through 100 Ω is over its current rating", circuit: led("100"), expect: [{ subject: "D1", messageIncludes: "forward current is 2" }] },
  { name: "the LED fitted the wrong way round: 5 V reverse against 4 V", circuit: reversedLed, expect: [{ subject: "D1", messageIncludes: "reverse voltage is 5 V; allowed 4 V" }] },
  { name: "a Zener in breakdown with no reverse rating is not a finding", circuit: zenerClamp, expect: [], passed: ["D1"] },
  { name: "a looser policy from the config lets 36 V pass", circuit: offNpn("36 V"), options: { voltageFraction: 0.95 }, expect: [], passed: ["Q1"] },
  { name: "boundary: PNP VCE −8.001 V against 8 V fails", circuit: boundary, analyses: atVce(-8.001), expect: [{ subject: "Q1" }] },
  { name: "boundary: PNP VCE −7.999 V passes", circuit: boundary, analyses: atVce(-7.999), expect: [], passed: ["Q1"] },
  { name: "two ratings over: the worst is reported and the other listed", circuit: mosBoundary, analyses: atVgs(-30, 0.09), expect: [{ subject: "M1", messageIncludes: "VGS is 30 V; allowed 16 V (80% of its VGS max rating of 20 V); also ID 90 mA over 80 mA" }] },
]));

describe("the worst corner", () => {
  it("a collector over its breakdown rating only at the high-supply corner is found there", async () => {
    // 30 V ± 10 %: 30 V nominal passes (32 V allowed), the high end 33 V does not.
    const text = offNpn("30 V, tolerance: 10%");
    const result = await runRuleCase(deviceRatings, { name: "high-supply corner", circuit: text, variation: CORNERS, expect: [] });
    expect(result.findings).toHaveLength(1);
    const f = result.findings[0]!;
    expect(f.measured).toBeCloseTo(33, 3);
    const scenarios = buildScenarios(loadCaseCircuit(text, "high-supply corner"), CORNERS);
    const label = scenarios.find((s) => s.id === f.scenario)!.label;
    expect(label).toMatch(/VCC max|supplies max/);
  });
  it("a gate over its maximum only at the high-supply corner", async () => {
    const text = gateAtRail("15 V", ", tolerance: 10%");
    const result = await runRuleCase(deviceRatings, { name: "gate corner", circuit: text, variation: CORNERS, expect: [] });
    expect(result.findings.map((f) => f.measured)).toEqual([expect.closeTo(16.5, 3)]);
  });
});
