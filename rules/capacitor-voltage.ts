// Rule `capacitor-voltage`: the DC voltage across each rated capacitor stays below a derated
// fraction of its voltage rating.
import { defineRule } from "../src/review/rule.js";
import { formatQuantity } from "../src/review/quantities.js";

export default defineRule({
  id: "capacitor-voltage",
  description: "Checks that the DC voltage across each capacitor stays within a derated fraction of its rating",
  severity: "error",
  options: {
    type: "object",
    additionalProperties: false,
    properties: {
      // Common practice: at most 80% of the rated voltage (electrolytic and tantalum parts fail
      // early near their rating; class 2 ceramics lose capacitance under DC bias).
      fraction: { type: "number", exclusiveMinimum: 0, maximum: 1, default: 0.8, description: "Allowed fraction of voltageRating" },
      // Off by default: many example and early-stage files leave ratings out; turn it on to make
      // a missing rating on a capacitor with DC across it a finding.
      requireRating: { type: "boolean", default: false, description: "Report capacitors with DC voltage across them and no voltageRating" },
    },
  },
  circuitOptions: ["fraction"],
  docs: `Checks every capacitor that gives a voltageRating: the magnitude of the DC voltage across it at
the operating point must not exceed fraction × voltageRating (default 80%). With
\`requireRating: true\`, a capacitor with DC voltage across it and no rating is a finding too.

Why it matters: a coupling or bypass capacitor near its rating fails early (electrolytic,
tantalum) or loses much of its capacitance (class 2 ceramic), and a supply corner adds more.

How to fix: use a part with a higher voltage rating, or move the capacitor to a node with less
DC across it.`,
  check({ circuit, op, options }, report) {
    for (const c of circuit.components) {
      if (c.kind !== "capacitor") continue;
      const point = op.devices[c.id];
      if (!point || point.kind !== "capacitor") continue;
      const v = Math.abs(point.voltage);
      if (c.voltageRating === undefined) {
        // Below a millivolt a capacitor has, for a rating's sake, no DC across it.
        if (options.requireRating && v > 1e-3)
          report.fail({ subject: c.id, message: `${c.id} has ${formatQuantity(v, "V")} DC across it and no voltageRating`, hint: "add the part's voltageRating" });
        continue;
      }
      const allowed = c.voltageRating * options.fraction;
      const check = { measured: v, limit: allowed, unit: "V", bound: "max" as const };
      if (v <= allowed) report.pass(c.id, check);
      else
        report.fail({
          subject: c.id,
          message: `${c.id} has ${formatQuantity(v, "V")} DC across it; allowed ${formatQuantity(allowed, "V")} (${Math.round(options.fraction * 100)}% of its ${formatQuantity(c.voltageRating, "V")} rating)`,
          hint: "use a capacitor with a higher voltageRating",
          ...check,
        });
    }
  },
});
