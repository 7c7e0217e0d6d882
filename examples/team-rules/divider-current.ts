// Tidewater Instruments house rule: every base bias divider draws at least ten times the base
// current, so that the spread of beta barely moves the base voltage (a "stiff" divider).
import { defineRule } from "opgate";

export default defineRule({
  id: "tidewater/divider-current",
  description: "Checks that each base bias divider draws at least ten times the base current",
  severity: "warning",
  options: {
    type: "object",
    additionalProperties: false,
    // Common practice: a divider current of ten times the base current keeps the base voltage
    // within a few percent over the beta spread.
    properties: { ratio: { type: "number", minimum: 1, default: 10 } },
  },
  circuitOptions: ["ratio"],
  docs: "The smaller of the currents in the divider's upper and lower legs must be at least `ratio` × |IB|. Fix: lower both divider resistors in proportion.",
  check({ circuit, op, options }, report) {
    for (const q of circuit.components) {
      if (q.kind !== "npn" && q.kind !== "pnp") continue;
      const point = op.devices[q.id];
      if (point?.kind !== q.kind) continue;
      const base = q.pins.base;
      let upper = 0;
      let lower = 0;
      for (const r of circuit.components) {
        const rp = op.devices[r.id];
        if (r.kind !== "resistor" || rp?.kind !== "resistor" || (r.pins.a === base) === (r.pins.b === base)) continue;
        const intoBase = r.pins.b === base ? rp.current : -rp.current; // rp.current flows from pin a to pin b
        if (intoBase > 0) upper += intoBase;
        else lower -= intoBase;
      }
      if (upper === 0 || lower === 0) continue; // a single base resistor is not a divider
      const check = { measured: Math.min(upper, lower), limit: options.ratio * Math.abs(point.baseCurrent), unit: "A", bound: "min" as const };
      if (check.measured >= check.limit) report.pass(q.id, check);
      else report.fail({ subject: q.id, message: `the base divider of ${q.id} draws ${(check.measured * 1e6).toFixed(1)} µA, less than ${options.ratio} × IB = ${(check.limit * 1e6).toFixed(1)} µA`, ...check, hint: "lower both divider resistors in proportion" });
    }
  },
});
