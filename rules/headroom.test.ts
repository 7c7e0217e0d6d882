// headroom: NPN/PNP/NMOS/PMOS stages through the real pipeline, the boundary on hand-built points.
import { expect, it } from "vitest";
import { verifyRule, runRuleCase } from "../src/review/tester.js";
import { testsFromVerdict } from "../test/verdict-tests.js";
import { analysis, bjt, bjtPoint, circuit, mos, mosPoint, op } from "../test/review/fixtures.js";
import { nmosStage, npnStage, pmosStage, pnpStage } from "../test/review/circuits.js";
import headroom from "./headroom.js";

const q1 = circuit({ components: [bjt("Q1", "npn", 10), bjt("Q2", "pnp", 11), mos("M1", "nmos", 12), mos("M2", "pmos", 13)] });
const points = (bjtHeadroom: number, mosHeadroom: number) =>
  op({ Q1: bjtPoint("npn", { headroom: bjtHeadroom }), Q2: bjtPoint("pnp", { headroom: bjtHeadroom, collectorEmitterVoltage: -(bjtHeadroom + 0.3) }), M1: mosPoint("nmos", { headroom: mosHeadroom }), M2: mosPoint("pmos", { headroom: mosHeadroom, drainSourceVoltage: -(mosHeadroom + 0.5) }) });

testsFromVerdict(await verifyRule(headroom, [
  { name: "NPN stage with VCE ≈ 5 V passes", circuit: npnStage(), expect: [], passed: ["Q1"] },
  { name: "NPN stage with RC 8k7 sits 0.09 V from saturation", circuit: npnStage({ rc: "8k7" }), expect: [{ subject: "Q1", severity: "error", messageIncludes: "saturation edge" }] },
  { name: "PNP mirror stage passes", circuit: pnpStage(), expect: [], passed: ["Q1"] },
  { name: "PNP stage with RC 8k7 fails like the NPN one", circuit: pnpStage({ rc: "8k7" }), expect: [{ subject: "Q1", messageIncludes: "(pnp)" }] },
  { name: "NMOS stage with VDS 6.3 V passes", circuit: nmosStage(), expect: [], passed: ["M1"] },
  { name: "NMOS stage with RD 9k8 has 0.2 V to the triode edge", circuit: nmosStage({ rd: "9k8" }), expect: [{ subject: "M1", messageIncludes: "triode edge" }] },
  { name: "PMOS mirror stage passes", circuit: pmosStage(), expect: [], passed: ["M1"] },
  { name: "PMOS stage with RD 9k8 fails like the NMOS one", circuit: pmosStage({ rd: "9k8" }), expect: [{ subject: "M1", messageIncludes: "(pmos)" }] },
  { name: "a lower margin in the config passes the tight stage", circuit: npnStage({ rc: "8k7" }), options: { bjt: 0.05 }, expect: [] },
  {
    name: "a circuit file may lower the margin for itself",
    circuit: npnStage({ rc: "8k7", review: "review:\n  headroom: { options: { bjt: 0.05 }, reason: output swings only a few millivolts }" }),
    expect: [],
  },
  { name: "a stage meant to saturate is not judged", circuit: npnStage({ rc: "8k7", specs: "  devices:\n    Q1: { region: saturation }" }), expect: [] },
  { name: "BJT boundary: 0.5001 V passes, 0.4999 V fails (default 0.5 V)", circuit: q1, analyses: [analysis(q1, points(0.4999, 1))], expect: [{ subject: "Q1" }, { subject: "Q2" }] },
  { name: "BJT boundary: just above passes", circuit: q1, analyses: [analysis(q1, points(0.5001, 1))], expect: [], passed: ["Q1", "Q2"] },
  { name: "MOS boundary: 0.2999 V fails (default 0.3 V)", circuit: q1, analyses: [analysis(q1, points(1, 0.2999))], expect: [{ subject: "M1" }, { subject: "M2" }] },
  { name: "MOS boundary: 0.3001 V passes", circuit: q1, analyses: [analysis(q1, points(1, 0.3001))], expect: [], passed: ["M1", "M2"] },
]));

it("measures the square-law headroom a hand analysis gives, equal for NMOS and PMOS", async () => {
  // Square law (textbook closed form): VG = 3 V, k = 2 mA/V², RS = 1 kΩ → ID = 1 mA, Vov = 1 V,
  // VS = 1 V; RD = 9.8 kΩ → VD = 2.2 V, VDS = 1.2 V, headroom = VDS − Vov = 0.2 V.
  const n = await runRuleCase(headroom, { name: "nmos", circuit: nmosStage({ rd: "9k8" }), expect: [] });
  const p = await runRuleCase(headroom, { name: "pmos", circuit: pmosStage({ rd: "9k8" }), expect: [] });
  expect(n.findings[0]!.measured).toBeCloseTo(0.2, 6);
  expect(p.findings[0]!.measured).toBeCloseTo(n.findings[0]!.measured!, 9);
  expect(n.findings[0]!.margin).toBeCloseTo((0.2 - 0.3) / 0.3, 5);
  expect(n.findings[0]).toMatchObject({ unit: "V", limit: 0.3, scenario: "nominal", line: expect.any(Number) });
});

it("keeps the worst corner: RC 8k2 passes at nominal and saturates at a supply/spread/temperature corner", async () => {
  const corners = { mode: "corners" as const, samples: 1, seed: 1, temperature: { min: 253.15, max: 333.15 } };
  const nominal = await runRuleCase(headroom, { name: "nominal", circuit: npnStage({ rc: "8k2" }), expect: [] });
  expect(nominal.findings).toEqual([]);
  expect(nominal.passed[0]!.measured).toBeGreaterThan(0.5);
  const worst = await runRuleCase(headroom, { name: "corners", circuit: npnStage({ rc: "8k2" }), variation: corners, expect: [] });
  expect(worst.findings).toHaveLength(1);
  expect(worst.findings[0]!.scenario).not.toBe("nominal");
  expect(worst.findings[0]!.measured).toBeLessThan(nominal.passed[0]!.measured!);
});

// Current mirrors (textbook topologies, from memory): the diode-connected reference device sits
// at VCB = 0 (VCE = VBE ≈ 0.65 V, 0.35 V beyond a 0.3 V saturation edge, under the 0.5 V margin)
// and is not judged; the output devices keep their headroom. Tidewater bias cells (invented values).
const MIRROR_MODELS = `models:
  tw-npn: { kind: npn, beta: { min: 150, typ: 250, max: 400 }, saturationCurrent: 1e-14 A, earlyVoltage: 100 V }
  tw-nmos: { kind: nmos, threshold: 0.7 V, kPrime: 200u, width: 20u, length: 1u }
`;
const supply = `  - { id: VCC, kind: voltage-source, pins: { plus: vcc, minus: gnd }, voltage: 12 V }
  - { id: RREF, kind: resistor, pins: [vcc, ref], value: 22k }
  - { id: RLOAD, kind: resistor, pins: [vcc, out], value: 4k7 }
`;
const basicMirror = `${MIRROR_MODELS}components:
${supply}  - { id: Q1, kind: npn, model: tw-npn, pins: { collector: ref, base: ref, emitter: gnd } }
  - { id: Q2, kind: npn, model: tw-npn, pins: { collector: out, base: ref, emitter: gnd } }
`;
// Wilson: Q1 senses, Q2 diode-connected under the output device Q3.
const wilsonMirror = `${MIRROR_MODELS}components:
${supply}  - { id: Q1, kind: npn, model: tw-npn, pins: { collector: ref, base: b, emitter: gnd } }
  - { id: Q2, kind: npn, model: tw-npn, pins: { collector: b, base: b, emitter: gnd } }
  - { id: Q3, kind: npn, model: tw-npn, pins: { collector: out, base: ref, emitter: b } }
`;
// Widlar: emitter resistor under the output device sets a smaller current.
const widlarMirror = `${MIRROR_MODELS}components:
${supply}  - { id: Q1, kind: npn, model: tw-npn, pins: { collector: ref, base: ref, emitter: gnd } }
  - { id: Q2, kind: npn, model: tw-npn, pins: { collector: out, base: ref, emitter: e2 } }
  - { id: RE2, kind: resistor, pins: [e2, gnd], value: 1k }
`;
// MOSFET mirror: the reference device has its drain on its gate.
const mosMirror = `${MIRROR_MODELS}components:
${supply}  - { id: M1, kind: nmos, model: tw-nmos, pins: { drain: ref, gate: ref, source: gnd } }
  - { id: M2, kind: nmos, model: tw-nmos, pins: { drain: out, gate: ref, source: gnd } }
`;
// Cascode whose upper base is biased by two diode-connected transistors and a resistor
// (≈ 0.47 mA: bias ≈ 2·0.65 + 0.47 ≈ 1.8 V, so Q1 keeps VCE ≈ 1.1 V).
const cascodeBias = `${MIRROR_MODELS}components:
  - { id: VCC, kind: voltage-source, pins: { plus: vcc, minus: gnd }, voltage: 12 V }
  - { id: VIN, kind: voltage-source, pins: { plus: in, minus: gnd }, voltage: 0.66 V, signal: 1 mV }
  - { id: RB, kind: resistor, pins: [vcc, bias], value: 22k }
  - { id: QB1, kind: npn, model: tw-npn, pins: { collector: bias, base: bias, emitter: mid1 } }
  - { id: QB2, kind: npn, model: tw-npn, pins: { collector: mid1, base: mid1, emitter: mid2 } }
  - { id: RB2, kind: resistor, pins: [mid2, gnd], value: 1k }
  - { id: Q1, kind: npn, model: tw-npn, pins: { collector: x, base: in, emitter: gnd } }
  - { id: Q2, kind: npn, model: tw-npn, pins: { collector: out, base: bias, emitter: x } }
  - { id: RC, kind: resistor, pins: [vcc, out], value: 4k7 }
`;

testsFromVerdict(await verifyRule(headroom, [
  { name: "basic mirror: the diode-connected Q1 is not judged, Q2 passes", circuit: basicMirror, expect: [], passed: ["Q2"] },
  { name: "Wilson mirror: Q2 (diode-connected) not judged; Q1 and Q3 pass", circuit: wilsonMirror, expect: [], passed: ["Q1", "Q3"] },
  { name: "Widlar mirror: Q1 not judged, Q2 passes", circuit: widlarMirror, expect: [], passed: ["Q2"] },
  { name: "MOSFET mirror: M1 (drain on gate) not judged, M2 passes", circuit: mosMirror, expect: [], passed: ["M2"] },
  { name: "cascode with a diode-connected bias chain: QB1, QB2 not judged; Q1 and Q2 pass", circuit: cascodeBias, expect: [], passed: ["Q1", "Q2"] },
]));

it("the diode-connected devices are exempt, not silently passed: they appear neither as findings nor as passed checks", async () => {
  const r = await runRuleCase(headroom, { name: "wilson", circuit: wilsonMirror, expect: [] });
  expect(r.passed.map((p) => p.subject).sort()).toEqual(["Q1", "Q3"]);
});
