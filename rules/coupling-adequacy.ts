// Rule `coupling-adequacy`: at the low edge of the band, each gain is still within N dB of its
// midband value — the "coupling and bypass capacitors are large enough" assumption holds.
import { defineRule } from "../src/review/rule.js";
import { formatQuantity } from "../src/review/quantities.js";

/** Frequencies within this relative distance are the same point (they come from the same spec value). */
const SAME_FREQUENCY = 1e-9;

export default defineRule({
  id: "coupling-adequacy",
  description: "Checks that each gain at the low band edge stays within a few dB of its midband value",
  severity: "warning",
  options: {
    type: "object",
    additionalProperties: false,
    properties: {
      // 1 dB (about 11% in gain) rather than 3 dB: at 3 dB the band edge is the low corner
      // itself and the gain there is 29% below midband, so the midband figure would no longer
      // describe the band. A flatness of 1 dB at the band edge is common practice for choosing
      // coupling and bypass capacitors.
      maxDeviationDb: { type: "number", exclusiveMinimum: 0, default: 1, description: "Largest |gain(band.low) − gain(midband)| in dB" },
    },
  },
  circuitOptions: ["maxDeviationDb"],
  docs: `Checks every entry of specs.gains when specs.band is given: the gain magnitude at band.low,
with every capacitor and inductor at its real impedance, must be within \`maxDeviationDb\`
(default 1 dB) of the midband gain, where capacitors are shorts and inductors opens.

Why it matters: midband analysis assumes the coupling and bypass capacitors are "large enough";
this rule checks that assumption where it is weakest. A bypass capacitor that is too small
loses most of a common-emitter stage's gain at the bottom of the band.

How to fix: enlarge the coupling or bypass capacitor that sets the low corner (usually the
emitter or source bypass capacitor), or raise band.low if the band was specified too wide.`,
  check({ circuit, smallSignal, options }, report) {
    const band = circuit.specs.band;
    if (!band) return;
    for (const spec of circuit.specs.gains) {
      const result = smallSignal?.gains.find((g) => g.name === spec.name);
      if (!result) continue; // gain-window reports gains that could not be computed
      const low = result.points.find((p) => Math.abs(p.frequency - band.low) <= SAME_FREQUENCY * band.low);
      if (!low || !Number.isFinite(result.db) || !Number.isFinite(low.db)) {
        report.fail({ subject: spec.name, message: `gain \`${spec.name}\` has no finite value at band.low (${formatQuantity(band.low, "Hz")}) to compare with midband`, hint: "check the small-signal network at the band edge" });
        continue;
      }
      const deviation = Math.abs(low.db - result.db);
      const check = { measured: deviation, limit: options.maxDeviationDb, unit: "dB", bound: "max" as const };
      if (deviation <= options.maxDeviationDb) report.pass(spec.name, check);
      else
        report.fail({
          subject: spec.name,
          message: `gain \`${spec.name}\` at band.low (${formatQuantity(band.low, "Hz")}) is ${formatQuantity(low.db - result.db, "dB")} from midband; at most ±${formatQuantity(options.maxDeviationDb, "dB")} is allowed`,
          ...check,
          hint: "enlarge the coupling or bypass capacitor that sets the low corner",
        });
    }
  },
});
