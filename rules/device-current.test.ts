// device-current: collector and drain current windows, both polarities.
import { verifyRule } from "../src/review/tester.js";
import { testsFromVerdict } from "../test/verdict-tests.js";
import { analysis, at, bjt, bjtPoint, circuit, op } from "../test/review/fixtures.js";
import { nmosStage, npnStage, pmosStage, pnpStage } from "../test/review/circuits.js";
import deviceCurrent from "./device-current.js";

const window = (id: string, w: string) => `  devices:\n    ${id}: { ${w} }`;
const pnp = circuit({ components: [bjt("Q1", "pnp", 10)], specs: { devices: [{ device: "Q1", minCurrent: 1e-3, maxCurrent: 2e-3, pos: at(30) }] } });
const ic = (value: number) => [analysis(pnp, op({ Q1: bjtPoint("pnp", { collectorCurrent: value }) }))];

testsFromVerdict(await verifyRule(deviceCurrent, [
  { name: "NPN IC ≈ 1.18 mA inside 1–1.5 mA", circuit: npnStage({ specs: window("Q1", "minCurrent: 1 mA, maxCurrent: 1.5 mA") }), expect: [], passed: ["Q1"] },
  { name: "NPN IC above a 1 mA maximum", circuit: npnStage({ specs: window("Q1", "maxCurrent: 1 mA") }), expect: [{ subject: "Q1", messageIncludes: "collector current is 1.18 mA, above its maximum of 1 mA" }] },
  // The PNP's collector current is reported positive (out of the collector), so the same window works.
  { name: "PNP IC ≈ 1.18 mA below a 1.5 mA minimum", circuit: pnpStage({ specs: window("Q1", "minCurrent: 1.5 mA") }), expect: [{ subject: "Q1", messageIncludes: "below its minimum" }] },
  // Square law, closed form: ID = 1 mA exactly for this stage (see test/review/circuits.ts).
  { name: "NMOS ID = 1 mA inside 0.99–1.01 mA", circuit: nmosStage({ specs: window("M1", "minCurrent: 0.99 mA, maxCurrent: 1.01 mA") }), expect: [], passed: ["M1"] },
  { name: "PMOS ID = 1 mA outside 1.01–1.2 mA", circuit: pmosStage({ specs: window("M1", "minCurrent: 1.01 mA, maxCurrent: 1.2 mA") }), expect: [{ subject: "M1", messageIncludes: "drain current is 1 mA, below" }] },
  { name: "boundary: 2.0001 mA is above the maximum", circuit: pnp, analyses: ic(2.0001e-3), expect: [{ subject: "Q1", messageIncludes: "above" }] },
  { name: "boundary: 1.9999 mA is inside", circuit: pnp, analyses: ic(1.9999e-3), expect: [], passed: ["Q1"] },
  { name: "boundary: 0.9999 mA is below the minimum", circuit: pnp, analyses: ic(0.9999e-3), expect: [{ subject: "Q1", messageIncludes: "below" }] },
]));
