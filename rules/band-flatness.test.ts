// band-flatness: between the flatness limit (default 1 dB) and 3 dB at a band edge, a warning.
// A load capacitor CL on the NPN stage's output sees RC ‖ RL = 3.2 kΩ (test/review/circuits.ts):
// 2 nF puts the corner near 1/(2π·3.2k·2n) ≈ 25 kHz, so 20 kHz is ≈ 2 dB down (one pole,
// 10·log10(1 + (20/25)²)); 10 nF is far beyond 3 dB (band-edges' error, silent here).
import { verifyRule } from "../src/review/tester.js";
import { testsFromVerdict } from "../test/verdict-tests.js";
import { analysis, at, circuit, gain, op, small } from "../test/review/fixtures.js";
import { npnStage } from "../test/review/circuits.js";
import bandFlatness from "./band-flatness.js";

const specs = `  gains:\n    - { name: stage, input: VIN, output: out, target: -2.6, tolerance: 10% }\n  band: { low: 20 Hz, high: 20 kHz }`;
const load = (value: string) => `  - { id: CL, kind: capacitor, pins: [out, gnd], value: ${value} }`;
const banded = circuit({ specs: { gains: [{ name: "stage", input: "VIN", output: { plus: "out", minus: "gnd" }, target: -10, window: { min: -11, max: -9 }, pos: at(40) }], band: { low: 20, high: 20000, pos: at(44) } } });
const drop = (db: number) => {
  const g = gain("stage", -10);
  const low = { frequency: 20, re: 0, im: 0, magnitude: 10 * 10 ** (-db / 20), db: g.db - db, phaseDeg: 0 };
  return [analysis(banded, op({}), "nominal", small([{ ...g, points: [low] }]))];
};

testsFromVerdict(await verifyRule(bandFlatness, [
  { name: "NPN stage holds both edges within 1 dB", circuit: npnStage({ specs }), expect: [], passed: ["stage at band.low", "stage at band.high"] },
  { name: "a 2 nF load capacitor costs ~2 dB at 20 kHz: a warning naming it", circuit: npnStage({ specs, parts: load("2n") }), expect: [{ subject: "stage at band.high", severity: "warning", messageIncludes: "CL (2 nF) sets" }] },
  { name: "beyond 3 dB it is band-edges' error, not repeated here", circuit: npnStage({ specs, parts: load("10n") }), expect: [] },
  { name: "boundary: 1.001 dB down warns", circuit: banded, analyses: drop(1.001), expect: [{ subject: "stage at band.low", severity: "warning" }] },
  { name: "boundary: 0.999 dB down passes", circuit: banded, analyses: drop(0.999), expect: [], passed: ["stage at band.low"] },
  { name: "2 dB allowed in the config passes 1.5 dB", circuit: banded, analyses: drop(1.5), options: { flatnessDb: 2 }, expect: [] },
]));
