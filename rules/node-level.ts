// Rule `node-level`: each node named in specs.nodes sits at a DC level inside its window.
import { defineRule } from "../src/review/rule.js";
import { formatQuantity } from "../src/review/quantities.js";
import { judgeWindow } from "../src/review/window.js";

export default defineRule({
  id: "node-level",
  description: "Checks the DC voltage of each node named in specs.nodes against its window",
  severity: "error",
  docs: `Checks every entry of specs.nodes (node name → { min, max } in V against ground, either side
optional) against the node's DC voltage at the operating point: an output offset, a bias
level, a reference voltage, a mid-supply point.

Why it matters: the gain and the currents can be right while the output sits 2 V off centre or
a reference drifts out of the converter's range; reviewers state those levels and expect them
checked at every corner.

How to fix: adjust the divider, reference or feedback resistors that set the level, or correct
the window.`,
  check({ circuit, op }, report) {
    for (const spec of circuit.specs.nodes ?? []) {
      const v = spec.node === circuit.ground ? 0 : op.nodes[spec.node];
      if (v === undefined) {
        report.fail({ subject: spec.node, message: `specs.nodes names node \`${spec.node}\`, which is not in the circuit`, hint: "check the node name against the component pins", pos: spec.pos });
        continue;
      }
      const verdict = judgeWindow(v, spec);
      const check = { measured: v, limit: verdict.limit, unit: "V", bound: verdict.bound };
      if (verdict.ok) {
        report.pass(spec.node, check);
        continue;
      }
      report.fail({
        subject: spec.node,
        message: `node \`${spec.node}\` sits at ${formatQuantity(v, "V")}, ${verdict.bound === "max" ? "above" : "below"} its ${verdict.bound} of ${formatQuantity(verdict.limit, "V")}`,
        hint: "adjust the divider, reference or feedback resistors that set this level, or correct the window",
        pos: spec.pos,
        ...check,
      });
    }
  },
});
