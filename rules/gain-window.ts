// Rule `gain-window`: each gain in specs.gains lies inside its acceptance window, judged at
// midband or at the spec's own frequency (the small-signal stage's `judged` value).
import { defineRule } from "../src/review/rule.js";
import { formatQuantity } from "../src/review/quantities.js";

const RAISE = "raise the gain's magnitude (less degeneration, larger load) or correct the target";
const REDUCE = "reduce the gain's magnitude (more degeneration, smaller load) or correct the target";

/** Advice by magnitude, so that an inverting stage (negative window) gets the right direction. */
function advice(g: number, min: number, max: number): { why: string; hint: string } {
  if ((min > 0 && g <= 0) || (max < 0 && g >= 0)) {
    return { why: "the sign is wrong", hint: "check which node is the output and whether the stage inverts, or the sign of the target" };
  }
  const low = Math.min(Math.abs(min), Math.abs(max));
  return Math.abs(g) < low ? { why: "too little gain", hint: RAISE } : { why: "too much gain", hint: REDUCE };
}

export default defineRule({
  id: "gain-window",
  description: "Checks that each specified gain lies within its tolerance window of the target",
  severity: "error",
  docs: `Checks every entry of specs.gains: the signed gain (V/V) from the input source to the output,
at midband (capacitors short, inductors open) or at the entry's own frequency, must lie inside
the window the spec gives (target ± tolerance, or explicit min/max). The sign counts: an
inverting stage specified at −10 does not pass at +10.

Why it matters: the gain is usually the number the design exists for; a resistor change that
moves it outside the window is exactly what a reviewer must catch, at every corner.

How to fix: adjust the gain-setting parts (load and emitter/source degeneration resistors,
feedback network), or correct the target if the spec was wrong.`,
  check({ circuit, smallSignal }, report) {
    for (const spec of circuit.specs.gains) {
      const result = smallSignal?.gains.find((g) => g.name === spec.name);
      if (!result) {
        const why = smallSignal?.errors.find((e) => e.gain === spec.name)?.message ?? "no small-signal result";
        report.fail({ subject: spec.name, message: `gain \`${spec.name}\` could not be computed: ${why}`, hint: "check the gain's input and output nodes and the small-signal network" });
        continue;
      }
      const g = result.judged;
      const { min, max } = spec.window;
      const where = spec.frequency !== undefined ? `at ${formatQuantity(spec.frequency, "Hz")}` : "at midband";
      const window = `[${formatQuantity(min, "V/V")}, ${formatQuantity(max, "V/V")}]`;
      if (g > max || g < min) {
        const { why, hint } = advice(g, min, max);
        const side = g > max ? "above" : "below";
        report.fail({ subject: spec.name, message: `gain \`${spec.name}\` is ${formatQuantity(g, "V/V")} ${where}, ${side} its window ${window} (${why})`, measured: g, limit: g > max ? max : min, unit: "V/V", bound: g > max ? "max" : "min", hint });
      } else {
        // Report the nearer edge so that the margin shows how close the gain came.
        const toMax = (max - g) / (max === 0 ? 1 : Math.abs(max));
        const toMin = (g - min) / (min === 0 ? 1 : Math.abs(min));
        report.pass(spec.name, toMax <= toMin ? { measured: g, limit: max, unit: "V/V", bound: "max" } : { measured: g, limit: min, unit: "V/V", bound: "min" });
      }
    }
  },
});
