// region: each polarity in and out of its amplifying region through the real pipeline.
import { verifyRule } from "../src/review/tester.js";
import { testsFromVerdict } from "../test/verdict-tests.js";
import { analysis, at, bjt, bjtPoint, circuit, op } from "../test/review/fixtures.js";
import { nmosStage, npnStage, pmosStage, pnpStage } from "../test/review/circuits.js";
import region from "./region.js";

const wrongSpec = circuit({ components: [bjt("Q1", "npn", 10)], specs: { devices: [{ device: "Q1", region: "triode", pos: at(30) }] } });

testsFromVerdict(await verifyRule(region, [
  { name: "NPN stage is active", circuit: npnStage(), expect: [], passed: ["Q1"] },
  { name: "NPN with RC 10k saturates", circuit: npnStage({ rc: "10k" }), expect: [{ subject: "Q1", messageIncludes: "is in saturation, expected active" }] },
  { name: "NPN with R2 1k is cut off (VB ≈ 0.21 V)", circuit: npnStage({ r2: "1k" }), expect: [{ subject: "Q1", messageIncludes: "is in cutoff" }] },
  { name: "a saturated stage whose spec names saturation passes", circuit: npnStage({ rc: "10k", specs: "  devices:\n    Q1: { region: saturation }" }), expect: [], passed: ["Q1"] },
  { name: "an active stage whose spec names saturation fails", circuit: npnStage({ specs: "  devices:\n    Q1: { region: saturation }" }), expect: [{ subject: "Q1", messageIncludes: "expected saturation (specs.devices)" }] },
  { name: "PNP mirror stage is active", circuit: pnpStage(), expect: [], passed: ["Q1"] },
  { name: "PNP with RC 10k saturates", circuit: pnpStage({ rc: "10k" }), expect: [{ subject: "Q1", messageIncludes: "(pnp) is in saturation" }] },
  { name: "NMOS stage is in saturation", circuit: nmosStage(), expect: [], passed: ["M1"] },
  { name: "NMOS with RD 11k is in triode (VD would be 1 V < VG − Vt)", circuit: nmosStage({ rd: "11k" }), expect: [{ subject: "M1", messageIncludes: "is in triode, expected saturation" }] },
  { name: "PMOS mirror stage is in saturation", circuit: pmosStage(), expect: [], passed: ["M1"] },
  { name: "PMOS with RD 11k is in triode", circuit: pmosStage({ rd: "11k" }), expect: [{ subject: "M1", messageIncludes: "(pmos) is in triode" }] },
  { name: "a spec region that is not a BJT region is reported at the spec", circuit: wrongSpec, analyses: [analysis(wrongSpec, op({ Q1: bjtPoint("npn") }))], expect: [{ subject: "Q1", messageIncludes: "not a region of a npn" }] },
]));
