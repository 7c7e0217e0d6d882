// A team review rule: every base bias divider draws at least ten times the base current, so
// that the spread of beta barely moves the base voltage (a "stiff" divider; common practice).
//
// A rule is a plain object: this file needs no import and works in any repository. (With opgate
// installed as a dev dependency you may wrap it in `defineRule` from "opgate" for type checking.)
// `opgate rules team/divider-current` shows it; `opgate check` runs it on every circuit.
export default {
  id: "team/divider-current",
  description: "Checks that each base bias divider draws at least ten times the base current",
  severity: "warning",
  // JSON Schema of the rule's options; the config sets them under rules.<id>.options.
  options: {
    type: "object",
    additionalProperties: false,
    properties: { ratio: { type: "number", minimum: 1, default: 10 } },
  },
  docs: "The smaller of the currents in the divider's upper and lower legs must be at least `ratio` × |IB|. Fix: lower both divider resistors in proportion.",
  check({ circuit, op, options }, report) {
    for (const q of circuit.components) {
      if (q.kind !== "npn" && q.kind !== "pnp") continue;
      const point = op.devices[q.id];
      if (point?.kind !== q.kind) continue;
      const base = q.pins.base;
      let upper = 0; // current into the base node through resistors
      let lower = 0; // current out of it
      for (const r of circuit.components) {
        const rp = op.devices[r.id];
        if (r.kind !== "resistor" || rp?.kind !== "resistor" || (r.pins.a === base) === (r.pins.b === base)) continue;
        const intoBase = r.pins.b === base ? rp.current : -rp.current; // rp.current flows from pin a to pin b
        if (intoBase > 0) upper += intoBase;
        else lower -= intoBase;
      }
      if (upper === 0 || lower === 0) continue; // a single base resistor is not a divider
      const check = { measured: Math.min(upper, lower), limit: options.ratio * Math.abs(point.baseCurrent), unit: "A", bound: "min" };
      if (check.measured >= check.limit) report.pass(q.id, check);
      else
        report.fail({
          subject: q.id,
          message: `the base divider of ${q.id} draws less than ${options.ratio} × its base current`,
          ...check,
          hint: "lower both divider resistors in proportion",
        });
    }
  },
};
