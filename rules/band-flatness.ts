// Rule `band-flatness`: at band.low and band.high each gain is within the flatness option
// (default 1 dB) of midband. Deviations beyond 3 dB are band-edges' errors and are not
// repeated here.
import { defineRule } from "../src/review/rule.js";
import { BAND_EDGE_DB, edgeMeasures, explainEdge } from "../src/review/band-edges.js";
import { formatQuantity } from "../src/review/quantities.js";

export default defineRule({
  id: "band-flatness",
  description: "Checks that each gain at the band edges stays within a flatness limit of midband (default 1 dB)",
  severity: "warning",
  options: {
    type: "object",
    additionalProperties: false,
    properties: {
      // 1 dB (about 11% in gain) rather than 3 dB: at 3 dB the band edge is the corner itself and
      // the gain there is 29% below midband. A flatness of 1 dB at the band edges is common
      // practice for choosing coupling and bypass capacitors and for an audio or sensor band.
      flatnessDb: { type: "number", exclusiveMinimum: 0, maximum: 3, default: 1, description: "Largest |gain(band edge) − gain(midband)| in dB before a warning" },
    },
  },
  circuitOptions: ["flatnessDb"],
  docs: `Checks every entry of specs.gains when specs.band is given: the gain at band.low and
band.high, with every capacitor and inductor at its real impedance, must be within
\`flatnessDb\` (default 1 dB) of the midband (flat-band) gain. Between the flatness limit and
3 dB this rule warns; beyond 3 dB the band is not met, which \`band-edges\` reports as an error
(this rule then stays silent for that edge). The finding names the capacitor that sets the
corner and the value that would keep the edge within the flatness limit.

Why it matters: a band edge within 3 dB is passed in name only if the gain there is 2.9 dB down;
a reviewer usually wants the whole band within about 1 dB of the midband figure the design was
computed for.

How to fix: change the capacitor the finding names to the value it gives, or relax
\`flatnessDb\` for a circuit whose band edges are meant to roll off.`,
  check({ circuit, op, smallSignal, options }, report) {
    for (const m of edgeMeasures(circuit, op, smallSignal?.gains)) {
      const deviation = Math.abs(m.relativeDb);
      if (deviation > BAND_EDGE_DB) continue; // band-edges' error
      const check = { measured: deviation, limit: options.flatnessDb, unit: "dB", bound: "max" as const };
      if (deviation <= options.flatnessDb) {
        report.pass(m.subject, check);
        continue;
      }
      const { text, hint } = explainEdge(circuit, op, m, options.flatnessDb);
      report.fail({
        subject: m.subject,
        message: `gain \`${m.spec.name}\` at band.${m.edge} (${formatQuantity(m.frequency, "Hz")}) is ${formatQuantity(m.relativeDb, "dB")} from midband; at most ±${formatQuantity(options.flatnessDb, "dB")} is allowed: ${text}`,
        hint,
        pos: m.spec.pos,
        ...check,
      });
    }
  },
});
