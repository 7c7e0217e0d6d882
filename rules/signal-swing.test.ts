// signal-swing: the stated input amplitude against the largest undistorted swing, checked
// against the textbook closed forms (from memory, standard load-line results):
//  - common emitter with the emitter bypassed: the largest undistorted output swing is the
//    lesser of VCE − saturation edge (toward saturation) and IC·(RC ‖ RL) (toward cutoff, the
//    AC load line);
//  - emitter follower with a capacitor-coupled resistive load: the negative-side limit is
//    IE·(RE ‖ RL) (the transistor cuts off when the load pulls the emitter current to zero).
// IC, VCE and IE are read from the tool's own operating point, so the check isolates the swing
// computation. Tidewater Instruments stages (invented values).
import { describe, expect, it } from "vitest";
import { verifyRule, runRuleCase } from "../src/review/tester.js";
import { testsFromVerdict } from "../test/verdict-tests.js";
import { loadCaseCircuit } from "../src/review/tester.js";
import { solveOperatingPoint } from "../src/solve/index.js";
import type { BjtPoint } from "../src/solve/types.js";
import { analyseSmallSignal } from "../src/smallsignal/index.js";
import signalSwing from "./signal-swing.js";

const MODEL = `models:
  tw-npn: { kind: npn, beta: 250, saturationCurrent: 1e-14 A }
`;

/** Common emitter, emitter bypassed, output coupled into RL = 10k. */
const ce = (signal: string, rc = "4k7") => `${MODEL}components:
  - { id: VCC, kind: voltage-source, pins: { plus: vcc, minus: gnd }, voltage: 12 V }
  - { id: VIN, kind: voltage-source, pins: { plus: in, minus: gnd }, voltage: 0 V, signal: ${signal} }
  - { id: C1, kind: capacitor, pins: [in, base], value: 22u }
  - { id: R1, kind: resistor, pins: [vcc, base], value: 56k }
  - { id: R2, kind: resistor, pins: [base, gnd], value: 12k }
  - { id: Q1, kind: npn, model: tw-npn, pins: { collector: col, base: base, emitter: emit } }
  - { id: RC, kind: resistor, pins: [vcc, col], value: ${rc} }
  - { id: RE, kind: resistor, pins: [emit, gnd], value: 1k2 }
  - { id: CE, kind: capacitor, pins: [emit, gnd], value: 1m }
  - { id: C2, kind: capacitor, pins: [col, out], value: 10u }
  - { id: RL, kind: resistor, pins: [out, gnd], value: 10k }
specs:
  gains:
    - { name: stage, input: VIN, output: out, target: -150, tolerance: 50% }
`;

/** Emitter follower biased at mid-supply, RE = 2k2, output coupled into RL = 1k. */
const follower = (signal: string) => `${MODEL}components:
  - { id: VCC, kind: voltage-source, pins: { plus: vcc, minus: gnd }, voltage: 12 V }
  - { id: VIN, kind: voltage-source, pins: { plus: in, minus: gnd }, voltage: 0 V, signal: ${signal} }
  - { id: C1, kind: capacitor, pins: [in, base], value: 10u }
  - { id: R1, kind: resistor, pins: [vcc, base], value: 47k }
  - { id: R2, kind: resistor, pins: [base, gnd], value: 47k }
  - { id: Q1, kind: npn, model: tw-npn, pins: { collector: vcc, base: base, emitter: emit } }
  - { id: RE, kind: resistor, pins: [emit, gnd], value: 2k2 }
  - { id: C2, kind: capacitor, pins: [emit, out], value: 100u }
  - { id: RL, kind: resistor, pins: [out, gnd], value: 1k }
specs:
  gains:
    - { name: buffer, input: VIN, output: out, target: 0.98, tolerance: 5% }
`;

const par = (a: number, b: number) => (a * b) / (a + b);

function stage(text: string, name: string) {
  const circuit = loadCaseCircuit(text, name);
  const op = solveOperatingPoint(circuit);
  if (!op.ok) throw new Error(op.reason);
  const gain = analyseSmallSignal(circuit, op).gains[0]!;
  return { q: op.devices["Q1"] as BjtPoint, gain };
}

testsFromVerdict(await verifyRule(signalSwing, [
  { name: "a 1 mV input fits the common-emitter stage", circuit: ce("1 mV"), expect: [], passed: ["stage"] },
  { name: "a 200 mV input into a gain of ~150 clips (cutoff first with RC 4k7)", circuit: ce("200 mV"), expect: [{ subject: "stage", severity: "error", messageIncludes: "Q1 cuts off first" }] },
  { name: "with RC 6k8 the same stage saturates first", circuit: ce("200 mV", "6k8"), expect: [{ subject: "stage", messageIncludes: "Q1 saturates first" }] },
  { name: "a source without a signal amplitude is not judged", circuit: ce("1 mV").replace(", signal: 1 mV", ""), expect: [] },
]));

describe("closed forms", () => {
  it("common emitter, cutoff side: the largest output swing is IC·(RC ‖ RL)", async () => {
    const { q, gain } = stage(ce("1 V"), "ce-cutoff");
    const run = await runRuleCase(signalSwing, { name: "ce-cutoff", circuit: ce("1 V"), expect: [] });
    const maxOut = run.findings[0]!.limit! * Math.abs(gain.midband);
    const closed = Math.min(q.headroom, q.collectorCurrent * par(4.7e3, 10e3));
    expect(closed).toBe(q.collectorCurrent * par(4.7e3, 10e3));
    expect(Math.abs(maxOut / closed - 1)).toBeLessThan(1e-6);
    console.log(`CE RC 4k7: IC=${(q.collectorCurrent * 1e3).toPrecision(4)} mA, VCE−0.3=${q.headroom.toPrecision(4)} V, IC·(RC‖RL)=${closed.toPrecision(4)} V, tool ${maxOut.toPrecision(4)} V`);
  });

  it("common emitter, saturation side: the largest output swing is VCE − saturation edge", async () => {
    const { q, gain } = stage(ce("1 V", "6k8"), "ce-sat");
    const run = await runRuleCase(signalSwing, { name: "ce-sat", circuit: ce("1 V", "6k8"), expect: [] });
    const maxOut = run.findings[0]!.limit! * Math.abs(gain.midband);
    const closed = Math.min(q.headroom, q.collectorCurrent * par(6.8e3, 10e3));
    expect(closed).toBe(q.headroom);
    // The emitter is bypassed by 1 mF: at midband VCE swings with the collector exactly.
    expect(Math.abs(maxOut / closed - 1)).toBeLessThan(1e-6);
    console.log(`CE RC 6k8: VCE−0.3=${q.headroom.toPrecision(4)} V, IC·(RC‖RL)=${(q.collectorCurrent * par(6.8e3, 10e3)).toPrecision(4)} V, tool ${maxOut.toPrecision(4)} V`);
  });

  it("emitter follower with a resistive load: the negative-side limit is IE·(RE ‖ RL)", async () => {
    const { q, gain } = stage(follower("3 V"), "follower");
    const run = await runRuleCase(signalSwing, { name: "follower", circuit: follower("3 V"), expect: [{ subject: "buffer", messageIncludes: "Q1 cuts off first" }] });
    const maxOut = run.findings[0]!.limit! * Math.abs(gain.midband);
    const closed = q.emitterCurrent * par(2.2e3, 1e3);
    // Exact in the model: ΔIC = α·ΔIE with the model's constant β (leak conductances: ~1e-8).
    expect(Math.abs(maxOut / closed - 1)).toBeLessThan(1e-6);
    console.log(`follower: IE=${(q.emitterCurrent * 1e3).toPrecision(4)} mA, IE·(RE‖RL)=${closed.toPrecision(4)} V, tool ${maxOut.toPrecision(4)} V`);
  });
});
