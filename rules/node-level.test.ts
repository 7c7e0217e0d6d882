// node-level: DC level windows on named nodes of the NPN stage of test/review/circuits.ts
// (hand: VC ≈ 12 − 1.2 mA·4k7 ≈ 6.4 V).
import { verifyRule } from "../src/review/tester.js";
import { testsFromVerdict } from "../test/verdict-tests.js";
import { npnStage } from "../test/review/circuits.js";
import nodeLevel from "./node-level.js";

const nodes = (text: string) => `  nodes:\n${text}`;

testsFromVerdict(await verifyRule(nodeLevel, [
  { name: "collector inside 6…7 V passes", circuit: npnStage({ specs: nodes("    col: { min: 6 V, max: 7 V }") }), expect: [], passed: ["col"] },
  { name: "collector above a 5 V maximum fails", circuit: npnStage({ specs: nodes("    col: { max: 5 V }") }), expect: [{ subject: "col", severity: "error", messageIncludes: "above its max of 5 V" }] },
  { name: "emitter below a 2 V minimum fails", circuit: npnStage({ specs: nodes("    emit: { min: 2 V }") }), expect: [{ subject: "emit", messageIncludes: "below its min" }] },
  { name: "an unknown node is reported", circuit: npnStage({ specs: nodes("    colector: { max: 5 V }") }), expect: [{ subject: "colector", messageIncludes: "not in the circuit" }] },
]));
