// capacitor-voltage: DC across coupling and bypass capacitors against 80% of their rating.
import { verifyRule } from "../src/review/tester.js";
import { testsFromVerdict } from "../test/verdict-tests.js";
import { analysis, capacitor, circuit, op } from "../test/review/fixtures.js";
import { npnStage, pnpStage } from "../test/review/circuits.js";
import capacitorVoltage from "./capacitor-voltage.js";

const bypass = (rating: string) => `  - { id: CB, kind: capacitor, pins: [vcc, gnd], value: 100n${rating} }`;
const rated = circuit({ components: [capacitor("C1", 12, 10)] });
const across = (v: number) => [analysis(rated, op({ C1: { kind: "capacitor", voltage: v } }))];

testsFromVerdict(await verifyRule(capacitorVoltage, [
  { name: "NPN stage coupling capacitors are well inside their ratings", circuit: npnStage(), expect: [], passed: ["C1", "C2"] },
  { name: "12 V across a 10 V bypass capacitor (8 V allowed) fails", circuit: npnStage({ parts: bypass(", voltageRating: 10 V") }), expect: [{ subject: "CB", messageIncludes: "allowed 8 V (80% of its 10 V rating)" }] },
  { name: "12 V across a 16 V part (12.8 V allowed) passes", circuit: npnStage({ parts: bypass(", voltageRating: 16 V") }), expect: [], passed: ["CB"] },
  // The PNP's input capacitor has the base (≈ 9.9 V) on its far side: a negative voltage, judged by magnitude.
  { name: "PNP input capacitor with −9.9 V across a 10 V rating fails", circuit: pnpStage().replace("value: 22u, voltageRating: 16 V", "value: 22u, voltageRating: 10 V"), expect: [{ subject: "C1" }] },
  { name: "an unrated capacitor is not judged by default", circuit: npnStage({ parts: bypass("") }), expect: [] },
  { name: "requireRating makes an unrated capacitor with DC across it a finding", circuit: npnStage({ parts: bypass("") }), options: { requireRating: true }, expect: [{ subject: "CB", messageIncludes: "no voltageRating" }] },
  { name: "boundary: 8.001 V across a 10 V part fails", circuit: rated, analyses: across(8.001), expect: [{ subject: "C1" }] },
  { name: "boundary: −7.999 V passes", circuit: rated, analyses: across(-7.999), expect: [], passed: ["C1"] },
]));
