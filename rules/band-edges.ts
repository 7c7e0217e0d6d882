// Rule `band-edges`: at band.low and band.high each gain is within 3 dB of its midband value —
// the band the specs name is actually passed. Beyond 3 dB the band spec is not met: an error.
import { defineRule } from "../src/review/rule.js";
import { BAND_EDGE_DB, edgeMeasures, explainEdge } from "../src/review/band-edges.js";
import { formatQuantity } from "../src/review/quantities.js";

export default defineRule({
  id: "band-edges",
  description: "Checks that each gain at band.low and band.high is within 3 dB of midband, naming the capacitor that sets the corner",
  severity: "error",
  docs: `Checks every entry of specs.gains when specs.band is given: the gain at band.low and at
band.high, with every capacitor (device capacitances included) and inductor at its real
impedance, must be within 3 dB of the midband (flat-band) gain. 3 dB is the half-power point
that defines a band edge, so beyond it the band spec is not met. Each finding gives the −3 dB
corner itself, the capacitor that sets that corner (its share by short-circuit time constants
at the low edge, open-circuit time constants at the high edge) and the value of that capacitor
that would meet the edge. The tighter flatness check is \`band-flatness\` (a warning). A scenario
in which a transistor meant to amplify is outside its amplifying region is not judged here: the
band of a stage that does not amplify is not the designed band (\`region\` and \`gain-window\`
report it).

Why it matters: midband analysis assumes the coupling and bypass capacitors are large enough and
the load, cable and device capacitances small enough; this rule checks both where they are
weakest. A bypass capacitor that is too small loses most of a stage's gain at the bottom of the
band; a cable capacitor on a high-impedance output loses the top.

How to fix: change the capacitor the finding names to the value it gives (or the resistance it
sees), or correct the band if it was specified wider than the product needs.`,
  check({ circuit, op, smallSignal }, report) {
    for (const m of edgeMeasures(circuit, op, smallSignal?.gains)) {
      const deviation = Math.abs(m.relativeDb);
      const check = { measured: deviation, limit: BAND_EDGE_DB, unit: "dB", bound: "max" as const };
      if (deviation <= BAND_EDGE_DB) {
        report.pass(m.subject, check);
        continue;
      }
      const { text, hint } = explainEdge(circuit, op, m, BAND_EDGE_DB);
      report.fail({
        subject: m.subject,
        message: `gain \`${m.spec.name}\` at band.${m.edge} (${formatQuantity(m.frequency, "Hz")}) is ${formatQuantity(m.relativeDb, "dB")} from midband, beyond the ${formatQuantity(BAND_EDGE_DB, "dB")} of a band edge: ${text}`,
        hint,
        pos: m.spec.pos,
        ...check,
      });
    }
  },
});
