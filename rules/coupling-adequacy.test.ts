// coupling-adequacy: the gain at band.low against midband, with a generous and a starved
// output coupling capacitor.
import { ruleTester } from "../src/review/tester.js";
import { analysis, at, circuit, gain, op, small } from "../test/review/fixtures.js";
import { npnStage, pnpStage } from "../test/review/circuits.js";
import couplingAdequacy from "./coupling-adequacy.js";

const specs = `  gains:\n    - { name: stage, input: VIN, output: out, target: -2.6, tolerance: 10% }\n  band: { low: 20 Hz, high: 20 kHz }`;
const banded = circuit({ specs: { gains: [{ name: "stage", input: "VIN", output: { plus: "out", minus: "gnd" }, target: -10, window: { min: -11, max: -9 }, pos: at(40) }], band: { low: 20, high: 20000, pos: at(44) } } });
const drop = (db: number) => {
  const g = gain("stage", -10);
  const low = { frequency: 20, re: 0, im: 0, magnitude: 10 * 10 ** (-db / 20), db: g.db - db, phaseDeg: 0 };
  return [analysis(banded, op({}), "nominal", small([{ ...g, points: [low] }]))];
};

ruleTester(couplingAdequacy).run([
  // C2 = 10 µF into RC + RL = 14.7 kΩ: corner 1/(2π·14.7k·10µ) ≈ 1.1 Hz, far below 20 Hz.
  { name: "NPN stage with 10 µF coupling holds its gain at 20 Hz", circuit: npnStage({ specs }), expect: [], passed: ["stage"] },
  // C2 = 100 nF: corner ≈ 108 Hz, so at 20 Hz the gain is ≈ 15 dB down (one pole: 20·log10(√(1+(108/20)²))).
  { name: "NPN stage with 100 nF coupling loses its gain at 20 Hz", circuit: npnStage({ specs, c2: "100n" }), expect: [{ subject: "stage", messageIncludes: "from midband" }] },
  { name: "PNP stage with 10 µF coupling passes", circuit: pnpStage({ specs }), expect: [], passed: ["stage"] },
  { name: "boundary: 1.001 dB down fails", circuit: banded, analyses: drop(1.001), expect: [{ subject: "stage", severity: "warning" }] },
  { name: "boundary: 0.999 dB down passes", circuit: banded, analyses: drop(0.999), expect: [], passed: ["stage"] },
  { name: "3 dB allowed in the config passes 2 dB", circuit: banded, analyses: drop(2), options: { maxDeviationDb: 3 }, expect: [] },
  { name: "no band in the specs: nothing to judge", circuit: npnStage({ specs: `  gains:\n    - { name: stage, input: VIN, output: out, target: -2.6, tolerance: 10% }`, c2: "100n" }), expect: [] },
]);
