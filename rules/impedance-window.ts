// Rule `impedance-window`: each gain's midband input and output impedance lies inside the
// window its spec gives (inputImpedance / outputImpedance).
import { defineRule } from "../src/review/rule.js";
import { formatQuantity } from "../src/review/quantities.js";
import { judgeWindow } from "../src/review/window.js";

export default defineRule({
  id: "impedance-window",
  description: "Checks each gain's midband input and output impedance against the windows its spec gives",
  severity: "error",
  docs: `Checks every entry of specs.gains that gives \`inputImpedance\` or \`outputImpedance\`
({ min, max } in Ω, either side optional) against the midband (flat-band) values:
- input impedance: the voltage of the ideal input source over the current it delivers, so any
  source resistance drawn in the circuit between the source and the stage is included (draw
  the source without one to judge the stage alone); for a current input, the voltage across it;
- output impedance: looking into the output with the input source zeroed (a voltage input
  shorted, a current input open), so a load drawn in the circuit is included in parallel.
An open circuit (an input that draws no signal current) counts as infinite.

Why it matters: a sensor that needs a 100 kΩ load, a line that must be driven from under
100 Ω, a filter that assumes its source impedance — these are specs like the gain, and a
bias change can break them silently.

How to fix: change the bias resistors, degeneration or feedback that set the impedance, add a
buffer stage, or correct the window.`,
  check({ circuit, smallSignal }, report) {
    for (const spec of circuit.specs.gains) {
      for (const side of ["input", "output"] as const) {
        const window = side === "input" ? spec.inputImpedance : spec.outputImpedance;
        if (!window) continue;
        const subject = `${spec.name} ${side} impedance`;
        const result = smallSignal?.gains.find((g) => g.name === spec.name);
        if (!result) continue; // gain-window reports gains that could not be computed
        const z = side === "input" ? result.inputImpedance : result.outputImpedance;
        const verdict = judgeWindow(z, window);
        const measured = Number.isFinite(z) ? z : undefined;
        const check = { ...(measured !== undefined ? { measured } : {}), limit: verdict.limit, unit: "Ω", bound: verdict.bound };
        if (verdict.ok) {
          report.pass(subject, check);
          continue;
        }
        const shown = Number.isFinite(z) ? formatQuantity(z, "Ω") : "an open circuit";
        report.fail({
          subject,
          message: `gain \`${spec.name}\` has a midband ${side} impedance of ${shown}, ${verdict.bound === "max" ? "above" : "below"} its ${verdict.bound} of ${formatQuantity(verdict.limit, "Ω")}${side === "input" ? " (seen by the ideal input source, source resistance in the circuit included)" : " (input zeroed, the circuit's load included)"}`,
          hint:
            side === "input"
              ? verdict.bound === "min"
                ? "raise the input impedance: larger bias resistors, emitter/source degeneration, or a follower in front"
                : "lower the input impedance: a shunt termination resistor or smaller bias resistors"
              : verdict.bound === "max"
                ? "lower the output impedance: a smaller collector/drain resistor, feedback, or a follower stage"
                : "raise the output impedance: series resistance at the output or a larger collector/drain resistor",
          pos: spec.pos,
          ...check,
        });
      }
    }
  },
});
