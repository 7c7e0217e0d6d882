// Rule `supply-budget`: each source in specs.supplies delivers no more current (and power)
// than its budget. Budgets compare magnitudes, so a negative rail is judged like a positive one.
import { defineRule } from "../src/review/rule.js";
import { formatQuantity } from "../src/review/quantities.js";

export default defineRule({
  id: "supply-budget",
  description: "Checks that each budgeted supply delivers no more than its maximum current and power",
  severity: "error",
  docs: `Checks every entry of specs.supplies: the magnitude of the DC current the source delivers
must not exceed maxCurrent, and the magnitude of the power it delivers must not exceed maxPower
(each when given). A negative rail delivers a negative current; its magnitude is compared.

Why it matters: field instruments run from batteries and regulators with a fixed budget; a bias
change that doubles the quiescent current shortens battery life or overloads the regulator.

How to fix: raise the bias resistors of the stages that draw most, or raise the budget if the
extra current is intended.`,
  check({ circuit, op }, report) {
    for (const spec of circuit.specs.supplies) {
      const point = op.sources[spec.source];
      if (!point) {
        report.fail({ subject: spec.source, message: `specs.supplies names \`${spec.source}\`, which the solved circuit has no source for`, pos: spec.pos });
        continue;
      }
      if (spec.maxCurrent !== undefined) {
        const i = Math.abs(point.current);
        const check = { measured: i, limit: spec.maxCurrent, unit: "A", bound: "max" as const };
        if (i <= spec.maxCurrent) report.pass(spec.source, check);
        else report.fail({ subject: spec.source, message: `${spec.source} delivers ${formatQuantity(i, "A")}, over its budget of ${formatQuantity(spec.maxCurrent, "A")}`, hint: "reduce the quiescent current of the stages on this supply, or raise the budget", ...check });
      }
      if (spec.maxPower !== undefined) {
        const p = Math.abs(point.power);
        const check = { measured: p, limit: spec.maxPower, unit: "W", bound: "max" as const };
        if (p <= spec.maxPower) report.pass(spec.source, check);
        else report.fail({ subject: spec.source, message: `${spec.source} delivers ${formatQuantity(p, "W")}, over its budget of ${formatQuantity(spec.maxPower, "W")}`, hint: "reduce the quiescent current of the stages on this supply, or raise the budget", ...check });
      }
    }
  },
});
