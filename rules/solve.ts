// Rule `solve`: the bias point was found. A failed solve (no convergence, a floating node, a
// loop of voltage sources) is reported with the parts and nodes involved.
import { defineRule } from "../src/review/rule.js";

export default defineRule({
  id: "solve",
  description: "Checks that the DC operating point was found in every scenario",
  severity: "error",
  docs: `Checks that the bias solve (Newton–Raphson on the nonlinear device equations, with
convergence aids) found an operating point in every scenario. When it did not, the finding gives
the solver's reason and the parts and nodes involved: a node with no DC path to ground, a loop
of voltage sources (or inductors), or a network that did not converge.

Why it matters: without an operating point no other rule can judge the circuit; a circuit that
fails to solve at one corner often has a real problem there (a transistor forced hard into
saturation, a source shorted).

How to fix: give every node a DC path to ground (a bias resistor on a floating gate or base),
break the source loop, or check the values the reason points at.`,
  check({ circuit }, report) {
    report.pass(circuit.name);
  },
  checkFailedSolve({ circuit, failure }, report) {
    const parts = failure.parts.length ? `; parts: ${failure.parts.join(", ")}` : "";
    const nodes = failure.nodes.length ? `; nodes: ${failure.nodes.join(", ")}` : "";
    const first = circuit.components.find((c) => c.id === failure.parts[0]);
    report.fail({
      subject: circuit.name,
      message: `no operating point for \`${circuit.name}\`: ${failure.reason}${parts}${nodes}`,
      hint: "give every node a DC path to ground, break voltage-source loops, or check the values involved",
      ...(first ? { pos: first.pos } : {}),
    });
  },
});
