// solve: a solved circuit passes; a failed solve names its reason, parts and nodes at the first part.
import { verifyRule } from "../src/review/tester.js";
import { testsFromVerdict } from "../test/verdict-tests.js";
import { analysis, bjt, bjtPoint, circuit, failure, op } from "../test/review/fixtures.js";
import { npnStage } from "../test/review/circuits.js";
import solve from "./solve.js";

const c = circuit({ components: [bjt("Q1", "npn", 10), bjt("Q2", "npn", 14)] });

testsFromVerdict(await verifyRule(solve, [
  { name: "the NPN stage solves", circuit: npnStage(), expect: [], passed: ["the-npn-stage-solves"] },
  {
    name: "a failed solve is reported with the solver's reason, parts and nodes",
    circuit: c,
    analyses: [analysis(c, failure("Newton did not converge after gmin and source stepping", ["Q2", "Q1"], ["col"]))],
    expect: [{ subject: "tide-gauge-front-end", severity: "error", messageIncludes: "did not converge after gmin and source stepping; parts: Q2, Q1; nodes: col" }],
  },
  {
    name: "a corner that fails to solve is a finding even when nominal solves",
    circuit: c,
    analyses: [analysis(c, op({ Q1: bjtPoint("npn"), Q2: bjtPoint("npn") })), analysis(c, failure("Newton did not converge"), "corner-03")],
    expect: [{ subject: "tide-gauge-front-end", scenario: "corner-03" }],
  },
]));
